import type { ResolvedScenarioOptions } from "./options.js";

const EPS = 1e-9;

/**
 * Windows tiling the samples s..e−1 of one drive: pairs [start, end] of sample indices where each
 * window starts at the previous one's end, the first starts at s and the last ends at e − 1. So the
 * distance and time of the windows add up exactly to those of the drive. Needs e − s >= 2.
 *
 * - fixed: a window ends at the first sample at least `seconds` after its start; a final remainder
 *   shorter than half a window joins the window before it.
 * - events: a window ends at the first cut point at least minS after its start when that comes
 *   within maxS, otherwise maxS after its start; a remainder shorter than minS
 *   joins the last window (which may then exceed maxS by less than minS).
 *   `cuts` are sample indices (any order, duplicates allowed).
 */
export function cutWindows(t: Float64Array, s: number, e: number, window: ResolvedScenarioOptions["window"], cuts: number[] = []): Array<[number, number]> {
  const last = e - 1;
  const out: Array<[number, number]> = [];
  if (last <= s) return out;
  const firstAtOrAfter = (from: number, time: number): number => {
    let b = from;
    while (b < last && t[b]! < time - EPS) b++;
    return b;
  };
  switch (window.mode) {
    case "fixed": {
      let a = s;
      while (a < last) {
        const b = firstAtOrAfter(a + 1, t[a]! + window.lengthS);
        out.push([a, b]);
        a = b;
      }
      if (out.length >= 2) {
        const [a0, b0] = out[out.length - 1]!;
        if (t[b0]! - t[a0]! < window.lengthS / 2 - EPS) {
          out.pop();
          out[out.length - 1]![1] = b0;
        }
      }
      return out;
    }
    case "events": {
      const sorted = [...new Set(cuts.filter((c) => c > s && c < last))].sort((x, y) => x - y);
      let a = s;
      let k = 0;
      while (a < last) {
        while (k < sorted.length && (sorted[k]! <= a || t[sorted[k]!]! - t[a]! < window.minS - EPS)) k++;
        let b: number;
        if (k < sorted.length && t[sorted[k]!]! - t[a]! <= window.maxS + EPS) b = sorted[k]!;
        else b = firstAtOrAfter(a + 1, t[a]! + window.maxS);
        if (t[last]! - t[b]! < window.minS - EPS) b = last;
        out.push([a, b]);
        a = b;
      }
      return out;
    }
    default: {
      const never: never = window;
      throw new Error(`unknown window mode ${JSON.stringify(never)}`);
    }
  }
}
