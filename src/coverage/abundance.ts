import { InputError } from "../core/errors.js";

/** How often each distinct kind (type key or cluster) was seen. */
export interface Abundance<K> {
  /** Distinct kinds, most frequent first (ties in ascending key order, so the order is deterministic). */
  kinds: K[];
  counts: number[];
  /** Total number of observations n. */
  n: number;
}

/** Count the distinct kinds among the items. */
export function abundance<K extends string | number>(items: ArrayLike<K>): Abundance<K> {
  const map = new Map<K, number>();
  for (let i = 0; i < items.length; i++) map.set(items[i]!, (map.get(items[i]!) ?? 0) + 1);
  const kinds = [...map.keys()].sort((a, b) => {
    const d = map.get(b)! - map.get(a)!;
    if (d !== 0) return d;
    return a < b ? -1 : a > b ? 1 : 0;
  });
  return { kinds, counts: kinds.map((k) => map.get(k)!), n: items.length };
}

/** Validate an abundance vector (positive integers; zeros are dropped) and return its positive entries. */
export function checkCounts(counts: ArrayLike<number>, name = "counts"): number[] {
  const out: number[] = [];
  for (let i = 0; i < counts.length; i++) {
    const c = counts[i]!;
    if (!(Number.isInteger(c) && c >= 0)) throw new InputError(`${name}[${i}]=${c}; expected an integer count >= 0`, { column: name, row: i + 1, value: c });
    if (c > 0) out.push(c);
  }
  if (out.length === 0) throw new InputError(`${name} has no positive count; coverage needs at least one observation`, { column: name });
  return out;
}

/** Frequency counts: f[k] = number of kinds seen exactly k times (f[0] is 0), plus n and S_obs. */
export interface FrequencyCounts {
  n: number;
  sObs: number;
  f: Int32Array;
  f1: number;
  f2: number;
}

export function frequencyCounts(counts: ArrayLike<number>): FrequencyCounts {
  const c = checkCounts(counts);
  let max = 0;
  let n = 0;
  for (const x of c) {
    n += x;
    if (x > max) max = x;
  }
  const f = new Int32Array(max + 1);
  for (const x of c) f[x]!++;
  return { n, sObs: c.length, f, f1: f[1] ?? 0, f2: max >= 2 ? f[2]! : 0 };
}
