import { InputError } from "../core/errors.js";

/**
 * Contiguous runs of a sorted time axis: a step t[i] - t[i-1] larger than `maxGap` starts a new run.
 * Runs are half-open index ranges [start, end) (like `subarray`), cover every sample once, in order.
 * A typical `maxGap` is 1.5 frame intervals, so that one missing frame already splits.
 *
 * Throws InputError when t is not finite or not non-decreasing (tracks are sorted before this).
 */
export function splitAtGaps(t: Float64Array, maxGap: number): Array<[start: number, end: number]> {
  if (!(maxGap > 0)) throw new InputError(`maxGap=${maxGap} should be a number > 0`);
  const n = t.length;
  const runs: Array<[number, number]> = [];
  if (n === 0) return runs;
  if (!Number.isFinite(t[0]!)) throw new InputError(`t[0]=${t[0]} should be a finite number`);
  let start = 0;
  for (let i = 1; i < n; i++) {
    const d = t[i]! - t[i - 1]!;
    if (!(d >= 0) || !Number.isFinite(d))
      throw new InputError(`t[${i}]=${t[i]} should be finite and >= t[${i - 1}]=${t[i - 1]} (times must be sorted)`);
    if (d > maxGap) {
      runs.push([start, i]);
      start = i;
    }
  }
  runs.push([start, n]);
  return runs;
}
