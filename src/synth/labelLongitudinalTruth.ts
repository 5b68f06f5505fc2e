import { LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "../maneuvers/labels.js";

/** The numeric definition of the longitudinal ground truth (also written to GroundTruth.definitions). */
export interface LongitudinalDefinition {
  /** Enter accelerate (decelerate) when a >= enter (a <= −enter) (m/s²). */
  enter: number;
  /** Leave accelerate (decelerate) when a < exit (a > −exit) (m/s²). */
  exit: number;
  /** Minimum run length (s). */
  minDuration: number;
}

/**
 * Per-frame longitudinal labels from a clean acceleration signal:
 * 1. hysteresis state machine (enter at |a| >= enter, leave at |a| < exit; a sign flip beyond enter
 *    switches directly);
 * 2. accelerate/decelerate runs shorter than minDuration become keep;
 * 3. keep runs shorter than minDuration lying between two runs of the same class take that class.
 * Run lengths count frames: a run of n frames lasts n / frameRate seconds.
 */
export function labelLongitudinalTruth(ax: ArrayLike<number>, frameRate: number, def: LongitudinalDefinition): Int8Array {
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
