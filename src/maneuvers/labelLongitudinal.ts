import { LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "./labels.js";

/**
 * Per-sample longitudinal labels on [s, e) from the smoothed acceleration, written into `out`:
 * 1. a two-threshold (hysteresis) state machine: enter accelerate at a >= enter, decelerate at
 *    a <= −enter; leave accelerate when a < exit, decelerate when a > −exit; a sign flip beyond
 *    ±enter switches directly;
 * 2. accelerate/decelerate runs shorter than minSamples become keep;
 * 3. keep runs shorter than minSamples between two runs of the same kind take that kind.
 * Non-finite accelerations keep the current state.
 */
export function labelLongitudinal(
  ax: Float64Array,
  s: number,
  e: number,
  enter: number,
  exit: number,
  minSamples: number,
  out: Int8Array,
): void {
  let state = LON_KEEP;
  for (let i = s; i < e; i++) {
    const a = ax[i]!;
    if (a >= enter) state = LON_ACCELERATE;
    else if (a <= -enter) state = LON_DECELERATE;
    else if (state === LON_ACCELERATE && a < exit) state = LON_KEEP;
    else if (state === LON_DECELERATE && a > -exit) state = LON_KEEP;
    out[i] = state;
  }
  if (minSamples <= 1) return;
  const runs = collectRuns(out, s, e);
  for (const [code, a, b] of runs) if (code !== LON_KEEP && b - a < minSamples) out.fill(LON_KEEP, a, b);
  const merged = collectRuns(out, s, e);
  for (let r = 1; r + 1 < merged.length; r++) {
    const [code, a, b] = merged[r]!;
    if (code === LON_KEEP && b - a < minSamples && merged[r - 1]![0] === merged[r + 1]![0]) out.fill(merged[r - 1]![0], a, b);
  }
}

/** Runs of equal codes on [s, e) as [code, start, end) triples. */
export function collectRuns(codes: Int8Array, s: number, e: number): Array<[number, number, number]> {
  const runs: Array<[number, number, number]> = [];
  let a = s;
  for (let i = s + 1; i <= e; i++) {
    if (i === e || codes[i] !== codes[a]) {
      runs.push([codes[a]!, a, i]);
      a = i;
    }
  }
  return runs;
}
