/**
 * Plausibility of a recording: values that are valid numbers but cannot describe highway traffic
 * (a units mistake, a corrupted coordinate, a wrong driving direction). Each check has documented
 * bounds (docs/recording.md, "Plausibility"); a finding names file, row, column and value. Checks
 * marked "error" stop the read unless accepted on purpose (`accept`), which turns them into warnings.
 */
import { InputError } from "../core/errors.js";

/** The checks, by the name used in `accept` and on the command line (--accept). */
export const PLAUSIBILITY_CHECKS = ["frame-rate", "position", "jump", "speed", "acceleration", "direction", "mean-speed"] as const;
export type PlausibilityCheck = (typeof PLAUSIBILITY_CHECKS)[number];

/** Bounds of the plausibility checks (SI units) and the checks accepted on purpose. */
export interface PlausibilityOptions {
  /** Frame rate bounds (Hz), for the road's frameRate, units.frameRate and the data's median time step. Default 1..1000. */
  minFrameRate?: number;
  maxFrameRate?: number;
  /** Largest speed of a vehicle (m/s), given or implied by consecutive positions. Default 100 (360 km/h). */
  maxSpeed?: number;
  /** Largest magnitude of acceleration (m/s²). Default 15 (about 1.5 g). A warning, not an error. */
  maxAcceleration?: number;
  /** How far beyond the outer lane markings a centre may lie (m). Default 15. */
  lateralMargin?: number;
  /** How far beyond road.xRange a centre may lie (m); without xRange, |x| may reach 1e7 m. Default 1000. */
  xMargin?: number;
  /** Bounds of the recording's mean speed, total distance along x over total time (m/s). Default 0.5..70. */
  minMeanSpeed?: number;
  maxMeanSpeed?: number;
  /** Checks whose findings are warnings instead of errors ("I know, go on"). */
  accept?: readonly PlausibilityCheck[];
}

export type ResolvedPlausibility = Required<Omit<PlausibilityOptions, "accept">> & { accept: ReadonlySet<PlausibilityCheck> };

// Bounds: common practice for highway traffic, chosen wide so that real recordings pass. 1–1000 Hz
// covers every camera, radar or lidar rate in use; 100 m/s is above any road vehicle's speed on a
// public highway; 15 m/s² is above the ~10 m/s² that tyre friction allows when braking on dry asphalt
// (friction coefficient about 1, from memory); 15 m beyond the outer markings leaves room for
// shoulders and ramps; a mean speed below 0.5 m/s or above 70 m/s over a whole recording is no
// traffic we know of.
export const PLAUSIBILITY_DEFAULTS: Readonly<Required<Omit<PlausibilityOptions, "accept">>> = Object.freeze({
  minFrameRate: 1,
  maxFrameRate: 1000,
  maxSpeed: 100,
  maxAcceleration: 15,
  lateralMargin: 15,
  xMargin: 1000,
  minMeanSpeed: 0.5,
  maxMeanSpeed: 70,
});

/** A typical highway speed (m/s, common practice), for telling which unit mistake a ratio suggests. */
const TYPICAL_SPEED = 25;

/** Without road.xRange, no centre may lie further than this from x = 0 (m). */
const MAX_ABS_X = 1e7;

export function resolvePlausibility(o: PlausibilityOptions | undefined): ResolvedPlausibility {
  const v = o ?? {};
  if (typeof v !== "object" || v === null || Array.isArray(v)) throw new InputError(`plausibility should be an object of bounds and accept`);
  const known = new Set([...Object.keys(PLAUSIBILITY_DEFAULTS), "accept"]);
  for (const k of Object.keys(v)) if (!known.has(k)) throw new InputError(`plausibility.${k} is not a setting; expected one of ${[...known].join(", ")}`);
  const r = { ...PLAUSIBILITY_DEFAULTS } as Record<string, number>;
  for (const k of Object.keys(PLAUSIBILITY_DEFAULTS)) {
    const x = (v as Record<string, unknown>)[k];
    if (x === undefined) continue;
    if (typeof x !== "number" || !Number.isFinite(x) || x < 0) throw new InputError(`plausibility.${k}=${JSON.stringify(x)} should be a finite number >= 0`);
    r[k] = x;
  }
  if (!(r.minFrameRate! > 0 && r.minFrameRate! <= r.maxFrameRate!))
    throw new InputError(`plausibility: minFrameRate=${r.minFrameRate} and maxFrameRate=${r.maxFrameRate} should satisfy 0 < min <= max`);
  if (!(r.minMeanSpeed! <= r.maxMeanSpeed!))
    throw new InputError(`plausibility: minMeanSpeed=${r.minMeanSpeed} should be <= maxMeanSpeed=${r.maxMeanSpeed}`);
  const accept = new Set<PlausibilityCheck>();
  if (v.accept !== undefined) {
    if (!Array.isArray(v.accept)) throw new InputError(`plausibility.accept should be a list of checks: ${PLAUSIBILITY_CHECKS.join(", ")}`);
    for (const c of v.accept) {
      if (!(PLAUSIBILITY_CHECKS as readonly string[]).includes(c as string))
        throw new InputError(`plausibility.accept: ${JSON.stringify(c)} is not a check; expected some of ${PLAUSIBILITY_CHECKS.join(", ")}`);
      accept.add(c as PlausibilityCheck);
    }
  }
  return { ...(r as Required<Omit<PlausibilityOptions, "accept">>), accept };
}

/** One finding: the first offending sample of a check, and how many there were. */
interface Finding {
  problem: string;
  row?: number;
  column?: string;
  value?: unknown;
  count: number;
  /** What is counted ("samples", "tracks"). */
  unit: string;
}

/** Everything the per-track checks need to know about the file. */
export interface PlausibilityContext {
  file: string;
  /** The file's column names for x, y, vx (when given), t or frame. */
  columns: { x?: string; y?: string; vx?: string; ax?: string; time?: string };
  /** Road-frame lane markings and xRange. */
  laneMarkings: readonly number[];
  xRange?: readonly [number, number];
}

/** Collects findings over the tracks of one recording, then decides: throw, or warnings. */
export class PlausibilityChecker {
  private readonly findings = new Map<PlausibilityCheck, Finding>();
  private distance = 0;
  private duration = 0;
  private tracks = 0;
  private backwards: Array<{ id: number; row: number }> = [];
  private steps: number[] = [];

  constructor(
    private readonly o: ResolvedPlausibility,
    private readonly ctx: PlausibilityContext,
  ) {}

  private add(check: PlausibilityCheck, f: Omit<Finding, "count" | "unit">, row: number): void {
    const have = this.findings.get(check);
    if (!have) this.findings.set(check, { ...f, row, count: 1, unit: "tracks" });
    else {
      have.count++;
      if (row < (have.row ?? Infinity)) Object.assign(have, f, { row });
    }
  }

  /** Check one track (road frame, SI). `rowOf(k)` is the file row of sample k. */
  track(id: number, t: Float64Array, x: Float64Array, y: Float64Array, m: { vx: Float64Array; vy: Float64Array; ax: Float64Array; ay: Float64Array }, rowOf: (k: number) => number, skipAcceleration = false): void {
    const o = this.o;
    const c = this.ctx.columns;
    const n = t.length;
    this.tracks++;
    // A median step per track, for the recording's implied frame rate.
    if (n > 1) {
      const d: number[] = [];
      for (let k = 1; k < n; k++) d.push(t[k]! - t[k - 1]!);
      d.sort((a, b) => a - b);
      this.steps.push(d[d.length >> 1]!);
      this.distance += Math.abs(x[n - 1]! - x[0]!);
      this.duration += t[n - 1]! - t[0]!;
      if (x[n - 1]! - x[0]! < -10) this.backwards.push({ id, row: rowOf(0) });
    }
    const lo = this.ctx.laneMarkings[0]! - o.lateralMargin;
    const hi = this.ctx.laneMarkings[this.ctx.laneMarkings.length - 1]! + o.lateralMargin;
    const xr = this.ctx.xRange;
    const xlo = xr ? xr[0] - o.xMargin : -MAX_ABS_X;
    const xhi = xr ? xr[1] + o.xMargin : MAX_ABS_X;
    let jumpDone = false;
    let speedDone = false;
    let accDone = skipAcceleration;
    let posDone = false;
    for (let k = 0; k < n; k++) {
      const xi = x[k]!;
      const yi = y[k]!;
      if (!posDone && !(xi >= xlo && xi <= xhi)) {
        posDone = true;
        this.add("position", { problem: `x = ${fmt(xi)} m lies outside ${xr ? `road.xRange [${xr[0]}, ${xr[1]}] by more than ${o.xMargin} m` : `±${MAX_ABS_X} m (no road.xRange given)`}`, column: c.x, value: xi }, rowOf(k));
      } else if (!posDone && !(yi >= lo && yi <= hi)) {
        posDone = true;
        this.add("position", { problem: `y = ${fmt(yi)} m lies more than ${o.lateralMargin} m outside the outer lane markings [${this.ctx.laneMarkings[0]}, ${this.ctx.laneMarkings[this.ctx.laneMarkings.length - 1]}]`, column: c.y, value: yi }, rowOf(k));
      }
      if (k > 0 && !jumpDone) {
        const dt = t[k]! - t[k - 1]!;
        const dist = Math.hypot(xi - x[k - 1]!, yi - y[k - 1]!);
        const implied = dist / dt;
        if (!(implied <= o.maxSpeed)) {
          jumpDone = true;
          this.add(
            "jump",
            {
              problem: `jump of ${fmt(dist)} m in ${fmt(dt)} s from row ${rowOf(k - 1)} (implies ${fmt(implied)} m/s, more than ${o.maxSpeed} m/s)${unitHint(implied / TYPICAL_SPEED, "position")}`,
              column: c.x,
              value: xi,
            },
            rowOf(k),
          );
        }
      }
      if (!speedDone) {
        const s = Math.hypot(m.vx[k]!, m.vy[k]!);
        if (!(s <= o.maxSpeed)) {
          speedDone = true;
          // The file's speed against the speed its positions imply (central difference over ±5
          // samples, so that position noise barely matters): a ratio near 3.6 is km/h, near 2.237
          // mph, near 3.281 ft/s (exact unit definitions).
          const a0 = Math.max(0, k - 5);
          const a1 = Math.min(n - 1, k + 5);
          const implied = a1 > a0 ? Math.hypot(x[a1]! - x[a0]!, y[a1]! - y[a0]!) / (t[a1]! - t[a0]!) : NaN;
          this.add("speed", { problem: `speed ${fmt(s)} m/s is more than ${o.maxSpeed} m/s${c.vx ? unitHint(s / implied, "speed") : ""}`, column: c.vx ?? c.x, value: c.vx ? m.vx[k] : s }, rowOf(k));
        }
      }
      if (!accDone) {
        const a = Math.hypot(m.ax[k]!, m.ay[k]!);
        if (!(a <= o.maxAcceleration)) {
          accDone = true;
          this.add("acceleration", { problem: `acceleration ${fmt(a)} m/s² is more than ${o.maxAcceleration} m/s²`, column: c.ax ?? c.x, value: a }, rowOf(k));
        }
      }
    }
  }

  /**
   * A frame rate the reader uses (road, units.frameRate), checked before any track is built: a rate
   * of 1e9 Hz would otherwise size smoothing windows and frame clocks by it.
   */
  frameRate(rate: number, what: string, column?: string): void {
    const o = this.o;
    if (rate >= o.minFrameRate && rate <= o.maxFrameRate) return;
    const problem = `${what} ${fmt(rate)} Hz is outside ${o.minFrameRate}..${o.maxFrameRate} Hz`;
    if (!o.accept.has("frame-rate"))
      throw new InputError(`implausible (frame-rate): ${problem}. If this is really so, accept it on purpose with plausibility: { accept: ["frame-rate"] } (CLI: --accept frame-rate)`, { file: this.ctx.file, column });
    this.findings.set("frame-rate", { problem, column, count: 1, unit: "settings" });
  }

  /** Throw the first error-level finding, or return the warnings. */
  finish(): string[] {
    const o = this.o;
    const warnings: string[] = [];
    // The data's own frame rate (median over tracks of the median step).
    if (this.steps.length > 0) {
      const s = [...this.steps].sort((a, b) => a - b)[this.steps.length >> 1]!;
      const rate = 1 / s;
      if (!(rate >= o.minFrameRate && rate <= o.maxFrameRate) && !this.findings.has("frame-rate"))
        this.findings.set("frame-rate", {
          problem: `the median time step is ${fmt(s)} s, a frame rate of ${fmt(rate)} Hz, outside ${o.minFrameRate}..${o.maxFrameRate} Hz${timeHint(rate, o)}`,
          column: this.ctx.columns.time,
          count: 1,
          unit: "recordings",
        });
    }
    if (this.duration > 0) {
      const mean = this.distance / this.duration;
      if (!(mean >= o.minMeanSpeed && mean <= o.maxMeanSpeed)) {
        this.findings.set("mean-speed", {
          problem: `the tracks cover ${fmt(this.distance / 1000)} km along the road in ${fmt(this.duration / 3600)} vehicle-hours, a mean speed of ${fmt(mean)} m/s, outside ${o.minMeanSpeed}..${o.maxMeanSpeed} m/s${meanSpeedHint(mean / TYPICAL_SPEED)}`,
          count: 1,
          unit: "recordings",
        });
      }
    }
    if (this.backwards.length > 0) {
      const b = this.backwards;
      const most = b.length * 2 > this.tracks;
      const f: Finding = {
        problem: most
          ? `${b.length} of ${this.tracks} tracks move towards smaller x: the driving direction is probably "-x" (set "direction": "-x" in the road description)`
          : `${b.length} of ${this.tracks} tracks move against the driving direction by more than 10 m (track ids ${b.slice(0, 5).map((t) => t.id).join(", ")}${b.length > 5 ? ", …" : ""})`,
        row: b[0]!.row,
        column: this.ctx.columns.x,
        count: b.length,
        unit: "tracks",
      };
      if (most) this.findings.set("direction", f);
      else warnings.push(`${this.ctx.file}, row ${f.row}: ${f.problem}`);
    }
    for (const check of PLAUSIBILITY_CHECKS) {
      const f = this.findings.get(check);
      if (!f) continue;
      const more = f.count > 1 ? ` (${f.count} ${f.unit} in all)` : "";
      const soft = check === "acceleration" || o.accept.has(check);
      if (soft) {
        const where = [this.ctx.file, f.row !== undefined ? `row ${f.row}` : undefined, f.column ? `column "${f.column}"` : undefined].filter(Boolean).join(", ");
        warnings.push(`implausible (${check}${o.accept.has(check) ? ", accepted" : ""}): ${where}: ${f.problem}${more}`);
        continue;
      }
      throw new InputError(
        `implausible (${check}): ${f.problem}${more}. If this is really so, accept it on purpose with plausibility: { accept: ["${check}"] } (CLI: --accept ${check})`,
        { file: this.ctx.file, row: f.row, column: f.column, value: typeof f.value === "number" ? fmt(f.value) : f.value },
      );
    }
    return warnings;
  }
}

function fmt(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  const a = Math.abs(v);
  if (a !== 0 && (a >= 1e7 || a < 1e-3)) return v.toExponential(3);
  return String(Number(v.toPrecision(6)));
}

/**
 * The unit mistake a ratio most likely comes from. Positions: implied speed / typical speed, ~1000 is
 * mm and ~100 cm read as m (within a factor 1.5). Speeds: the file's speed / the speed its positions
 * imply, 3.6 km/h, 3.281 ft/s, 2.237 mph (within 5 %, so that the three stay apart).
 */
function unitHint(ratio: number, what: "position" | "speed"): string {
  if (!Number.isFinite(ratio)) return "";
  if (what === "position") {
    if (ratio > 1000 / 1.5 && ratio < 1000 * 1.5) return `; are these positions in mm (units.position: "mm")?`;
    if (ratio > 100 / 1.5 && ratio < 100 * 1.5) return `; are these positions in cm (units.position: "cm")?`;
    return "";
  }
  const table: Array<[number, string]> = [
    [3.6, `speeds in km/h (units.speed: "km/h")`],
    [1 / 0.3048, `speeds in ft/s (units.speed: "ft/s")`],
    [3125 / 1397, `speeds in mph (units.speed: "mph")`],
  ];
  for (const [f, hint] of table) if (Math.abs(ratio / f - 1) < 0.05) return `; the positions imply ${fmt(ratio)} times less: are these ${hint}?`;
  return "";
}

function timeHint(rate: number, o: ResolvedPlausibility): string {
  const inMs = rate * 1000;
  if (inMs >= o.minFrameRate && inMs <= o.maxFrameRate) return `; are the times in milliseconds (units.time: "ms")?`;
  return `; check the time column's unit and, for a frame column, the frame rate`;
}

function meanSpeedHint(ratio: number): string {
  // ratio = mean / typical highway speed: ~1/1000 → times in ms read as s; ~1000 → positions in mm.
  if (ratio < 1) {
    if (ratio > 1 / 3000 && ratio < 1 / 300) return `; are the times in milliseconds (units.time: "ms")?`;
    return `; check the time and position units`;
  }
  if (ratio > 300 && ratio < 3000) return `; are the positions in millimetres (units.position: "mm")?`;
  if (ratio > 30 && ratio < 300) return `; are the positions in centimetres (units.position: "cm")?`;
  return `; check the time and position units`;
}
