/** A lane change found on one run of samples (sample indices into the track, inclusive). */
export interface FoundLaneChange {
  from: number;
  to: number;
  /** First sample in the new lane. */
  cross: number;
  start: number;
  end: number;
  /** Sample range the movement may occupy without touching its neighbours (inclusive). */
  lo: number;
  hi: number;
  flag?: string;
}

/**
 * Remove marking touches in place on [s, e): an episode in another lane shorter than minSamples,
 * with the same lane before and after it, is given that lane. A stack pass, O(n).
 */
export function debounceLanes(lane: Int32Array, s: number, e: number, minSamples: number): void {
  const runLane: number[] = [];
  const runStart: number[] = [];
  const runEnd: number[] = [];
  let i = s;
  while (i < e) {
    let j = i;
    while (j + 1 < e && lane[j + 1] === lane[i]) j++;
    runLane.push(lane[i]!);
    runStart.push(i);
    runEnd.push(j + 1);
    // Merge while the middle of the last three runs is short and its neighbours share a lane.
    for (;;) {
      const k = runLane.length;
      if (k < 3) break;
      const midLen = runEnd[k - 2]! - runStart[k - 2]!;
      if (midLen >= minSamples || runLane[k - 3] !== runLane[k - 1]) break;
      lane.fill(runLane[k - 1]!, runStart[k - 2]!, runEnd[k - 2]!);
      const end = runEnd[k - 1]!;
      runLane.length = runStart.length = runEnd.length = k - 2;
      runEnd[k - 3] = end;
    }
    i = j + 1;
  }
}

/**
 * Lane changes on [s, e) of a debounced lane sequence: every step between two valid lanes (>= 0)
 * differing by one. The movement around crossing c in direction d (+1 left, −1 right) spans the
 * samples around c where d · vy stays above `lateralSpeed`; two crossings in a row are separated
 * at the sample of least |vy| between them so that their movements never overlap.
 */
export function findLaneChanges(
  lane: Int32Array,
  vy: Float64Array,
  s: number,
  e: number,
  lateralSpeed: number,
  warnings: string[],
  trackId: number,
): FoundLaneChange[] {
  const crossings: Array<{ c: number; from: number; to: number }> = [];
  for (let i = s + 1; i < e; i++) {
    const a = lane[i - 1]!;
    const b = lane[i]!;
    if (a === b || a < 0 || b < 0) continue;
    if (Math.abs(b - a) !== 1) {
      warnings.push(`track ${trackId}: lane jumps ${a}→${b} at sample ${i}; not counted as a lane change`);
      continue;
    }
    crossings.push({ c: i, from: a, to: b });
  }
  const out: FoundLaneChange[] = [];
  // Separators between consecutive crossings.
  const sep: number[] = [];
  for (let k = 0; k + 1 < crossings.length; k++) {
    const lo = crossings[k]!.c;
    const hi = crossings[k + 1]!.c;
    let best = lo;
    let bestV = Infinity;
    for (let i = lo; i < hi; i++) {
      const v = Math.abs(vy[i]!);
      if (v < bestV) {
        bestV = v;
        best = i;
      }
    }
    sep.push(best);
  }
  for (let k = 0; k < crossings.length; k++) {
    const { c, from, to } = crossings[k]!;
    const d = to > from ? 1 : -1;
    const lo = k > 0 ? sep[k - 1]! + 1 : s;
    const hi = k + 1 < crossings.length ? sep[k]! : e - 1;
    // The crossing sample itself always belongs to the movement.
    let start = Math.max(c - 1, lo);
    while (start > lo && d * vy[start - 1]! > lateralSpeed) start--;
    if (d * vy[start]! <= lateralSpeed && start < c) start++;
    let end = Math.min(c, hi);
    while (end < hi && d * vy[end + 1]! > lateralSpeed) end++;
    out.push({ from, to, cross: c, start: Math.min(start, c), end: Math.max(end, c), lo, hi });
  }
  return out;
}
