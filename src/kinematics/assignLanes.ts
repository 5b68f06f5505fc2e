import { InputError } from "../core/errors.js";

/**
 * Lane index per sample from the lateral position y (road frame, y to the left) and the lane
 * markings (strictly ascending, right edge line first). Lane i is m[i] <= y < m[i+1], lane 0 the
 * rightmost; the leftmost lane also includes its left edge line, so the carriageway is the closed
 * interval [m[0], m[N]]. Outside it, or y not finite: -1. Binary search, O(n log lanes).
 */
export function assignLanes(y: Float64Array, laneMarkings: number[]): Int32Array {
  validateMarkings(laneMarkings);
  const m = laneMarkings;
  const nm = m.length;
  const lo0 = m[0]!;
  const hi0 = m[nm - 1]!;
  const out = new Int32Array(y.length);
  for (let i = 0; i < y.length; i++) {
    const v = y[i]!;
    if (!(v >= lo0 && v <= hi0)) {
      out[i] = -1; // also NaN
      continue;
    }
    // Largest j with m[j] <= v, capped at the last lane.
    let lo = 0;
    let hi = nm - 1;
    while (hi - lo > 1) {
      const mid = (lo + hi) >> 1;
      if (m[mid]! <= v) lo = mid;
      else hi = mid;
    }
    out[i] = lo;
  }
  return out;
}

/** Lane markings must be at least two finite, strictly ascending offsets. */
export function validateMarkings(laneMarkings: number[], file?: string): void {
  if (!Array.isArray(laneMarkings) || laneMarkings.length < 2)
    throw new InputError(
      `laneMarkings=${JSON.stringify(laneMarkings)} should list at least 2 lateral offsets (N lanes need N + 1 markings)`,
      { file, column: "laneMarkings" },
    );
  for (let i = 0; i < laneMarkings.length; i++) {
    const v = laneMarkings[i];
    if (typeof v !== "number" || !Number.isFinite(v))
      throw new InputError(`laneMarkings[${i}]=${JSON.stringify(v)} should be a finite number (m)`, { file, column: "laneMarkings" });
    if (i > 0 && !(v > laneMarkings[i - 1]!))
      throw new InputError(
        `laneMarkings[${i}]=${v} should be greater than laneMarkings[${i - 1}]=${laneMarkings[i - 1]} (strictly ascending, right edge first)`,
        { file, column: "laneMarkings" },
      );
  }
}
