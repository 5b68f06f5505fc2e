import { InputError } from "../core/errors.js";

/** Length units for positions and vehicle dimensions. */
export type LengthUnit = "m" | "cm" | "mm" | "ft";
/** Speed units. */
export type SpeedUnit = "m/s" | "km/h" | "mph" | "ft/s";
/** Acceleration units ("g" = standard gravity). */
export type AccelerationUnit = "m/s2" | "ft/s2" | "g";
/** Time units for a t column. */
export type TimeUnit = "s" | "ms";

/** Units of the user's file; everything is converted to SI (m, s, m/s, m/s²) at reading. */
export interface UnitMapping {
  /** x, y. Default "m". */
  position?: LengthUnit;
  /** length, width. Default: the position unit. */
  size?: LengthUnit;
  /** vx, vy. Default "m/s". */
  speed?: SpeedUnit;
  /** ax, ay. Default "m/s2". */
  acceleration?: AccelerationUnit;
  /** t. Default "s". */
  time?: TimeUnit;
  /** Frame rate (Hz) for a frame column (t = frame / frameRate). Default: the road's frameRate. */
  frameRate?: number;
}

// Factors to SI, exact by definition, kept as integer ratios [multiply, divide] so that converting a
// decimal value rounds once (v * mul / div) instead of multiplying by an inexact binary factor:
// cm, mm (SI prefixes); international foot = 0.3048 m exactly (international yard and pound
// agreement, 1959); km/h = 1000 m / 3600 s = 5/18 m/s; mile = 1609.344 m exactly, so
// mph = 0.44704 m/s = 1397/3125 m/s; standard gravity g = 9.80665 m/s² (3rd CGPM, 1901).
export type Ratio = readonly [mul: number, div: number];
export const LENGTH_TO_M: Readonly<Record<LengthUnit, Ratio>> = { m: [1, 1], cm: [1, 100], mm: [1, 1000], ft: [3048, 10000] };
export const SPEED_TO_MS: Readonly<Record<SpeedUnit, Ratio>> = { "m/s": [1, 1], "km/h": [5, 18], mph: [1397, 3125], "ft/s": [3048, 10000] };
export const ACCELERATION_TO_MS2: Readonly<Record<AccelerationUnit, Ratio>> = { "m/s2": [1, 1], "ft/s2": [3048, 10000], g: [980665, 100000] };
export const TIME_TO_S: Readonly<Record<TimeUnit, Ratio>> = { s: [1, 1], ms: [1, 1000] };

/** Conversion ratios to SI, validated. */
export interface UnitFactors {
  position: Ratio;
  size: Ratio;
  speed: Ratio;
  acceleration: Ratio;
  time: Ratio;
  frameRate: number | undefined;
}

/** v in the file's unit → SI, rounding once for decimal inputs. */
export function toSI(v: number, r: Ratio): number {
  return r[0] === 1 ? (r[1] === 1 ? v : v / r[1]) : (v * r[0]) / r[1];
}

export function unitFactors(units: UnitMapping | undefined): UnitFactors {
  const u = units ?? {};
  const known = new Set(["position", "size", "speed", "acceleration", "time", "frameRate"]);
  for (const k of Object.keys(u))
    if (!known.has(k)) throw new InputError(`units.${k} is not a unit setting; expected one of ${[...known].join(", ")}`);
  const pick = <U extends string>(name: string, table: Readonly<Record<U, Ratio>>, value: U | undefined, dflt: U): Ratio => {
    const v = value ?? dflt;
    const f = (table as Record<string, Ratio>)[v];
    if (f === undefined)
      throw new InputError(`units.${name}=${JSON.stringify(v)} should be one of ${Object.keys(table).map((k) => JSON.stringify(k)).join(", ")}`);
    return f;
  };
  const position = pick("position", LENGTH_TO_M, u.position, "m");
  const size = u.size === undefined ? position : pick("size", LENGTH_TO_M, u.size, "m");
  if (u.frameRate !== undefined && !(u.frameRate > 0 && Number.isFinite(u.frameRate)))
    throw new InputError(`units.frameRate=${u.frameRate} should be a finite number > 0 (Hz)`);
  return {
    position,
    size,
    speed: pick("speed", SPEED_TO_MS, u.speed, "m/s"),
    acceleration: pick("acceleration", ACCELERATION_TO_MS2, u.acceleration, "m/s2"),
    time: pick("time", TIME_TO_S, u.time, "s"),
    frameRate: u.frameRate,
  };
}
