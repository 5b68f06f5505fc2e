import { InputError } from "../core/errors.js";
import { savitzkyGolay } from "./savitzkyGolay.js";
import { splitAtGaps } from "./splitAtGaps.js";

/** The part of a track that motion is derived from: sorted times and positions (road frame). */
export interface TrackPositions {
  t: Float64Array;
  x: Float64Array;
  y: Float64Array;
}

/** Options of {@link deriveMotion}. */
export interface DeriveMotionOptions {
  /**
   * Savitzky–Golay window for positions and velocity, in seconds (converted to the nearest odd number
   * of samples). Default 1.0 s.
   */
  windowS?: number;
  /**
   * Window for acceleration, in seconds. Longer than `windowS` because the noise of a second
   * derivative falls with the window length to the power 2.5: at 0.1 m position noise and 25 Hz a
   * 1 s window leaves an acceleration sd of about 0.54 m/s², a 2 s window about 0.09 m/s². Default 2.0 s.
   */
  accelWindowS?: number;
  /** Degree of the fitted polynomial (>= 2 so that acceleration is not identically zero). Default 3. */
  order?: number;
  /**
   * A time step larger than maxGapFactor × the median frame interval splits the track into runs that
   * are smoothed separately, so no polynomial is fitted across a gap. Default 1.5.
   */
  maxGapFactor?: number;
  /**
   * Return smoothed positions (true) or the input positions unchanged (false, saves two filter passes
   * when only the derivatives are wanted). Default true.
   */
  smoothPositions?: boolean;
}

/** Smoothed positions (m) and their first and second time derivatives (m/s, m/s²), one per sample. */
export interface Motion {
  x: Float64Array;
  y: Float64Array;
  vx: Float64Array;
  vy: Float64Array;
  ax: Float64Array;
  ay: Float64Array;
}

export const DERIVE_MOTION_DEFAULTS: Readonly<Required<DeriveMotionOptions>> = {
  windowS: 1.0,
  accelWindowS: 2.0,
  order: 3,
  maxGapFactor: 1.5,
  smoothPositions: true,
};

/**
 * Smoothed position, velocity and acceleration of one track by Savitzky–Golay filtering (Savitzky &
 * Golay 1964), applied separately to each contiguous run of samples (see {@link splitAtGaps}).
 *
 * Defaults: cubic fits, 1.0 s window for position and velocity, 2.0 s for acceleration (25 and 51
 * samples at 25 Hz). Drone-like position noise of 0.1 m (sd) differentiated twice by plain differences
 * gives acceleration noise of about 0.1·√6 / 0.04² ≈ 150 m/s², which would look like violent braking;
 * with the defaults a constant-speed track shows sd(vx) ≈ 0.17 m/s and sd(ax) ≈ 0.09 m/s² (measured,
 * see docs/kinematics.md), far below the 1–2 m/s² of real speed changes, while a 6 m/s² braking
 * still reaches its full depth.
 *
 * Runs shorter than the window: a run of n >= 3 samples uses the largest odd window <= n with the
 * order lowered to window - 1 when needed (for n = 3 this is exact quadratic interpolation, i.e. central
 * differences); a run of 2 samples gets the two-point difference as velocity and zero acceleration; a
 * lone sample gets NaN velocity and acceleration (nothing can be derived from it) and its raw position.
 * Samples inside a run are assumed equally spaced; the run's mean interval is used as dt.
 */
export function deriveMotion(track: TrackPositions, options: DeriveMotionOptions = {}): Motion {
  const o = resolveOptions(options);
  const { t, x, y } = track;
  const n = t.length;
  if (x.length !== n || y.length !== n)
    throw new InputError(`track arrays differ in length: t=${n}, x=${x.length}, y=${y.length}`);
  const out: Motion = {
    x: new Float64Array(n),
    y: new Float64Array(n),
    vx: new Float64Array(n),
    vy: new Float64Array(n),
    ax: new Float64Array(n),
    ay: new Float64Array(n),
  };
  if (n === 0) return out;
  const dtMedian = medianStep(t);
  const runs = dtMedian > 0 ? splitAtGaps(t, o.maxGapFactor * dtMedian) : splitAtGaps(t, Infinity);
  const window = windowSamples(o.windowS, dtMedian, o.order);
  const accelWindow = windowSamples(o.accelWindowS, dtMedian, o.order);
  for (const [s, e] of runs) deriveRun(track, s, e, window, accelWindow, o.order, o.smoothPositions, out);
  return out;
}

function resolveOptions(options: DeriveMotionOptions): Required<DeriveMotionOptions> {
  const o = { ...DERIVE_MOTION_DEFAULTS, ...stripUndefined(options) };
  if (!(o.windowS > 0) || !Number.isFinite(o.windowS)) throw new InputError(`windowS=${o.windowS} should be a finite number > 0 (seconds)`);
  if (!(o.accelWindowS > 0) || !Number.isFinite(o.accelWindowS))
    throw new InputError(`accelWindowS=${o.accelWindowS} should be a finite number > 0 (seconds)`);
  if (!Number.isInteger(o.order) || o.order < 2 || o.order > 6)
    throw new InputError(`order=${o.order} should be an integer between 2 and 6`);
  if (!(o.maxGapFactor >= 1)) throw new InputError(`maxGapFactor=${o.maxGapFactor} should be a number >= 1`);
  return o;
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  const r: Partial<T> = {};
  for (const k of Object.keys(o) as Array<keyof T>) if (o[k] !== undefined) r[k] = o[k];
  return r;
}

/** Window in samples for a window in seconds: nearest integer, made odd, at least the smallest odd > order. */
export function windowSamples(windowS: number, dt: number, order: number): number {
  const minW = order % 2 === 0 ? order + 1 : order + 2;
  if (!(dt > 0)) return minW;
  let w = Math.round(windowS / dt);
  if (w % 2 === 0) w += 1;
  return Math.max(w, minW);
}

/** Median of the positive steps of a sorted time axis (0 when there are none). */
export function medianStep(t: Float64Array): number {
  const d: number[] = [];
  for (let i = 1; i < t.length; i++) {
    const s = t[i]! - t[i - 1]!;
    if (s > 0) d.push(s);
  }
  if (d.length === 0) return 0;
  const a = Float64Array.from(d).sort();
  const h = a.length >> 1;
  return a.length % 2 === 1 ? a[h]! : 0.5 * (a[h - 1]! + a[h]!);
}

function deriveRun(
  track: TrackPositions,
  s: number,
  e: number,
  window: number,
  accelWindow: number,
  order: number,
  smoothPositions: boolean,
  out: Motion,
): void {
  const n = e - s;
  const t = track.t.subarray(s, e);
  const x = track.x.subarray(s, e);
  const y = track.y.subarray(s, e);
  if (n === 1) {
    out.x[s] = x[0]!;
    out.y[s] = y[0]!;
    out.vx[s] = out.vy[s] = out.ax[s] = out.ay[s] = NaN;
    return;
  }
  const dt = (t[n - 1]! - t[0]!) / (n - 1);
  if (n === 2) {
    out.x.set(x, s);
    out.y.set(y, s);
    const vx = (x[1]! - x[0]!) / dt;
    const vy = (y[1]! - y[0]!) / dt;
    out.vx[s] = out.vx[s + 1] = vx;
    out.vy[s] = out.vy[s + 1] = vy;
    out.ax[s] = out.ax[s + 1] = 0;
    out.ay[s] = out.ay[s + 1] = 0;
    return;
  }
  const [w, p] = fit(n, window, order);
  out.x.set(smoothPositions ? savitzkyGolay(x, { window: w, order: p }) : x, s);
  out.y.set(smoothPositions ? savitzkyGolay(y, { window: w, order: p }) : y, s);
  out.vx.set(savitzkyGolay(x, { window: w, order: p, derivative: 1, dt }), s);
  out.vy.set(savitzkyGolay(y, { window: w, order: p, derivative: 1, dt }), s);
  const [wa, pa] = fit(n, accelWindow, order);
  out.ax.set(savitzkyGolay(x, { window: wa, order: pa, derivative: 2, dt }), s);
  out.ay.set(savitzkyGolay(y, { window: wa, order: pa, derivative: 2, dt }), s);
}

/** Window and order for a run of n >= 3 samples: the largest odd window <= n, order below it. */
function fit(n: number, window: number, order: number): [number, number] {
  if (n >= window) return [window, order];
  const w = n % 2 === 1 ? n : n - 1;
  return [w, Math.min(order, w - 1)];
}
