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

// Factors to SI are exact by definition: cm, mm (SI prefixes); international foot = 0.3048 m exactly
// (international yard and pound agreement, 1959); km/h = 1000 m / 3600 s; mile = 1609.344 m exactly,
// so mph = 0.44704 m/s; standard gravity g = 9.80665 m/s² (3rd CGPM, 1901).
export const LENGTH_TO_M: Readonly<Record<LengthUnit, number>> = { m: 1, cm: 0.01, mm: 0.001, ft: 0.3048 };
export const SPEED_TO_MS: Readonly<Record<SpeedUnit, number>> = { "m/s": 1, "km/h": 1 / 3.6, mph: 0.44704, "ft/s": 0.3048 };
export const ACCELERATION_TO_MS2: Readonly<Record<AccelerationUnit, number>> = { "m/s2": 1, "ft/s2": 0.3048, g: 9.80665 };
export const TIME_TO_S: Readonly<Record<TimeUnit, number>> = { s: 1, ms: 0.001 };

/** Conversion factors to SI, validated. */
export interface UnitFactors {
  position: number;
  size: number;
  speed: number;
  acceleration: number;
  time: number;
  frameRate: number | undefined;
}

export function unitFactors(units: UnitMapping | undefined): UnitFactors {
  const u = units ?? {};
  const known = new Set(["position", "size", "speed", "acceleration", "time", "frameRate"]);
  for (const k of Object.keys(u))
    if (!known.has(k)) throw new InputError(`units.${k} is not a unit setting; expected one of ${[...known].join(", ")}`);
  const pick = <U extends string>(name: string, table: Readonly<Record<U, number>>, value: U | undefined, dflt: U): number => {
    const v = value ?? dflt;
    const f = (table as Record<string, number>)[v];
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
