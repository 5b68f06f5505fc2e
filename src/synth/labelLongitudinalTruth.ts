import { LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "../maneuvers/labels.js";

/** The numeric definition of the longitudinal ground truth (also written to GroundTruth.definitions). */
export interface LongitudinalDefinition {
  /** Enter accelerate (decelerate) when a >= enter (a <= −enter) (m/s²). */
  enter: number;
  /** Leave accelerate (decelerate) when a < exit (a > −exit) (m/s²). */
  exit: number;
  /** Minimum run length (s). */
  minDuration: number;
  /**
   * Length of the centred window over which the acceleration is averaged before labelling (s);
   * 0 or absent = label the instantaneous values.
   */
  averageWindow?: number;
}

/**
 * Centred mean of an acceleration signal: for each sample, the mean over the samples within
 * ±window/2 of it (m = floor(window·frameRate/2) on each side, clipped at the ends). Values are taken
 * at 1e-3 m/s² resolution (the resolution the generator writes) and summed exactly as integers, so
 * the result does not depend on the order of summation. With the ballistic update
 * v[k+1] = v[k] + a[k]·dt this is the speed change over the window divided by its length.
 */
export function centredMeanAcceleration(ax: ArrayLike<number>, frameRate: number, window: number): Float64Array {
  const n = ax.length;
  const out = new Float64Array(n);
  // The epsilon keeps a product meant to be whole (0.6 s · 10 Hz / 2 = 2.999…) from losing a sample.
  const m = Math.floor((window * frameRate) / 2 + 1e-9);
  const milli = new Float64Array(n);
  for (let i = 0; i < n; i++) milli[i] = Math.round(ax[i]! * 1000);
  // Sliding integer sum (exact: integers far below 2^53).
  let sum = 0;
  let lo = 0;
  let hi = -1;
  for (let i = 0; i < n; i++) {
    const a = Math.max(0, i - m);
    const b = Math.min(n - 1, i + m);
    while (hi < b) sum += milli[++hi]!;
    while (lo < a) sum -= milli[lo++]!;
    out[i] = sum / (1000 * (b - a + 1));
  }
  return out;
}

/**
 * Per-frame longitudinal labels from a clean acceleration signal:
 * 0. with averageWindow > 0, the acceleration is first replaced by its centred mean over that window
 *    (centredMeanAcceleration): a maneuver is a change of speed lasting about a second or more, and
 *    shorter wobble is none (common practice in naturalistic-driving maneuver coding);
 * 1. hysteresis state machine (enter at |a| >= enter, leave at |a| < exit; a sign flip beyond enter
 *    switches directly);
 * 2. accelerate/decelerate runs shorter than minDuration become keep;
 * 3. keep runs shorter than minDuration lying between two runs of the same class take that class.
 * Run lengths count frames: a run of n frames lasts n / frameRate seconds.
 */
export function labelLongitudinalTruth(axIn: ArrayLike<number>, frameRate: number, def: LongitudinalDefinition): Int8Array {
  const ax = def.averageWindow !== undefined && def.averageWindow > 0 ? centredMeanAcceleration(axIn, frameRate, def.averageWindow) : axIn;
  const n = ax.length;
  const out = new Int8Array(n);
  let state = LON_KEEP;
  for (let i = 0; i < n; i++) {
    const a = ax[i]!;
    if (a >= def.enter) state = LON_ACCELERATE;
    else if (a <= -def.enter) state = LON_DECELERATE;
    else if (state === LON_ACCELERATE && a < def.exit) state = LON_KEEP;
    else if (state === LON_DECELERATE && a > -def.exit) state = LON_KEEP;
    out[i] = state;
  }
  const minFrames = Math.round(def.minDuration * frameRate);
  if (minFrames <= 1) return out;
  // Step 2: drop short active runs.
  forEachRun(out, (code, start, end) => {
    if (code !== LON_KEEP && end - start < minFrames) out.fill(LON_KEEP, start, end);
  });
  // Step 3: fill short keep runs between equal active runs.
  const runs: [number, number, number][] = [];
  forEachRun(out, (code, start, end) => runs.push([code, start, end]));
  for (let r = 1; r + 1 < runs.length; r++) {
    const [code, start, end] = runs[r]!;
    if (code === LON_KEEP && end - start < minFrames && runs[r - 1]![0] === runs[r + 1]![0]) {
      out.fill(runs[r - 1]![0], start, end);
    }
  }
  return out;
}

function forEachRun(codes: Int8Array, fn: (code: number, start: number, end: number) => void): void {
  let start = 0;
  for (let i = 1; i <= codes.length; i++) {
    if (i === codes.length || codes[i] !== codes[start]) {
      fn(codes[start]!, start, i);
      start = i;
    }
  }
}
