import { InputError } from "../core/errors.js";
import { regularizedGammaQ } from "../exposure/gamma.js";

/** One test statistic with its degrees of freedom and asymptotic p-value. */
export interface TestStatistic {
  statistic: number;
  df: number;
  /** Upper tail of the chi-square distribution with df degrees of freedom. */
  p: number;
}

export interface HomogeneityResult {
  /** Pearson's chi-square statistic Σ (O − E)² / E. */
  chiSquare: TestStatistic;
  /** The likelihood-ratio (G) statistic 2 Σ O ln(O / E). */
  gTest: TestStatistic;
  /** Expected counts under homogeneity, rows × columns. */
  expected: number[][];
  /** Smallest expected count. */
  minExpected: number;
}

/** Chi-square upper tail Q(df/2, x/2). */
export function chiSquareSurvival(x: number, df: number): number {
  if (!(df > 0)) throw new InputError(`df=${df} should be > 0`, { column: "df", value: df });
  if (!(x > 0)) return 1;
  return regularizedGammaQ(df / 2, x / 2);
}

/**
 * Test of homogeneity of the category frequencies across groups (rows = groups, columns =
 * categories): Pearson's chi-square and the G-test, both against the chi-square distribution with
 * (rows − 1)(columns − 1) degrees of freedom. No continuity correction (as scipy.stats.
 * chi2_contingency with correction=False). Empty rows or columns are dropped first. Both are
 * asymptotic: they assume independent observations and expected counts that are not small
 * (common practice: at least 5 in every cell; see poolSparseCategories).
 */
export function homogeneityTest(counts: readonly (readonly number[])[]): HomogeneityResult {
  if (counts.length < 2) throw new InputError(`the homogeneity test needs at least 2 groups, got ${counts.length}`);
  const cols = counts[0]!.length;
  for (const r of counts) {
    if (r.length !== cols) throw new InputError(`every group needs the same number of categories (${cols}), got ${r.length}`);
    for (const v of r) if (!(Number.isFinite(v) && v >= 0)) throw new InputError(`counts should be finite and >= 0`, { value: v });
  }
  const rowSum = counts.map((r) => r.reduce((a, b) => a + b, 0));
  const colSum = Array.from({ length: cols }, (_, j) => counts.reduce((a, r) => a + r[j]!, 0));
  const rowsKept = rowSum.map((s, i) => (s > 0 ? i : -1)).filter((i) => i >= 0);
  const colsKept = colSum.map((s, j) => (s > 0 ? j : -1)).filter((j) => j >= 0);
  if (rowsKept.length < 2) throw new InputError(`the homogeneity test needs at least 2 groups with scenarios`);
  const total = rowSum.reduce((a, b) => a + b, 0);
  const df = (rowsKept.length - 1) * (colsKept.length - 1);
  let x2 = 0;
  let g = 0;
  let minE = Infinity;
  const expected = counts.map((r, i) => r.map((_, j) => (rowSum[i]! * colSum[j]!) / total));
  for (const i of rowsKept)
    for (const j of colsKept) {
      const e = expected[i]![j]!;
      const o = counts[i]![j]!;
      minE = Math.min(minE, e);
      x2 += ((o - e) * (o - e)) / e;
      if (o > 0) g += o * Math.log(o / e);
    }
  g *= 2;
  const p = (x: number) => (df === 0 ? 1 : chiSquareSurvival(x, df));
  return { chiSquare: { statistic: x2, df, p: p(x2) }, gTest: { statistic: g, df, p: p(g) }, expected, minExpected: minE };
}

/**
 * Pool the categories whose expected count under homogeneity is below `minExpected` in some group
 * into one column "(pooled)", smallest totals first, until every remaining column and the pooled one
 * meet it (or only the pooled column would be left). Common practice (Cochran 1954 gives the rule of
 * thumb of expected counts of at least 5 for the chi-square approximation).
 */
export function poolSparseCategories(
  names: readonly string[],
  counts: readonly (readonly number[])[],
  minExpected = 5,
): { names: string[]; counts: number[][]; pooled: string[] } {
  const cols = names.length;
  const rowSum = counts.map((r) => r.reduce((a, b) => a + b, 0));
  const total = rowSum.reduce((a, b) => a + b, 0);
  const minRow = Math.min(...rowSum.filter((s) => s > 0));
  // Expected count of a column in the smallest group = minRow · colTotal / total.
  const colSum = Array.from({ length: cols }, (_, j) => counts.reduce((a, r) => a + r[j]!, 0));
  const need = (minExpected * total) / minRow;
  const order = Array.from({ length: cols }, (_, j) => j).sort((a, b) => colSum[a]! - colSum[b]! || (names[a]! < names[b]! ? -1 : 1));
  const pooledIdx = new Set<number>();
  let pooledSum = 0;
  for (const j of order) {
    if (colSum[j]! >= need && (pooledIdx.size === 0 || pooledSum >= need)) break;
    pooledIdx.add(j);
    pooledSum += colSum[j]!;
  }
  const keep = Array.from({ length: cols }, (_, j) => j).filter((j) => !pooledIdx.has(j));
  const outNames = keep.map((j) => names[j]!);
  const outCounts = counts.map((r) => keep.map((j) => r[j]!));
  if (pooledIdx.size > 0) {
    outNames.push("(pooled)");
    counts.forEach((r, i) => outCounts[i]!.push([...pooledIdx].reduce((a, j) => a + r[j]!, 0)));
  }
  return { names: outNames, counts: outCounts, pooled: [...pooledIdx].map((j) => names[j]!).sort() };
}

/**
 * The next coarser type key: the last part replaced by "*" ("LK|K|occ:ahead|ev:-" → "LK|K|occ:ahead|*"
 * → "LK|K|*" → "LK|*"), null at the top. Used to merge sparse type keys with their relatives before
 * anything is pooled into one column.
 */
export function typeKeyParent(key: string): string | null {
  const parts = key.split("|");
  while (parts.length > 0 && parts[parts.length - 1] === "*") parts.pop();
  if (parts.length <= 1) return null;
  parts.pop();
  return `${parts.join("|")}|*`;
}

/**
 * Merge sparse categories into coarser ones before pooling: every column whose expected count in the
 * smallest group is below `minExpected` is renamed to its parent (`parentOf`), columns of equal name
 * are merged, and this repeats while it changes anything; what is still sparse is then pooled by
 * poolSparseCategories. Keeps as much of the categories' meaning in the test as the counts allow.
 */
export function coarsenSparseCategories(
  names: readonly string[],
  counts: readonly (readonly number[])[],
  minExpected: number,
  parentOf: (name: string) => string | null,
): { names: string[]; counts: number[][]; pooled: string[]; merged: Record<string, string> } {
  const rowSum = counts.map((r) => r.reduce((a, b) => a + b, 0));
  const total = rowSum.reduce((a, b) => a + b, 0);
  const minRow = Math.min(...rowSum.filter((s) => s > 0));
  const need = (minExpected * total) / minRow;
  // Column → its current name; merge by name.
  let current = new Map<string, number[]>();
  const origin = new Map<string, string[]>();
  names.forEach((nm, j) => {
    current.set(nm, counts.map((r) => r[j]!));
    origin.set(nm, [nm]);
  });
  for (let changed = true; changed; ) {
    changed = false;
    const next = new Map<string, number[]>();
    const nextOrigin = new Map<string, string[]>();
    for (const [nm, col] of current) {
      const sum = col.reduce((a, b) => a + b, 0);
      const parent = sum < need ? parentOf(nm) : null;
      const to = parent ?? nm;
      if (parent !== null) changed = true;
      const have = next.get(to);
      if (have) col.forEach((v, i) => (have[i]! += v));
      else next.set(to, [...col]);
      nextOrigin.set(to, [...(nextOrigin.get(to) ?? []), ...origin.get(nm)!]);
    }
    current = next;
    origin.clear();
    for (const [k, v] of nextOrigin) origin.set(k, v);
  }
  const mergedNames = [...current.keys()].sort();
  const mergedCounts = counts.map((_, i) => mergedNames.map((nm) => current.get(nm)![i]!));
  const merged: Record<string, string> = {};
  for (const [to, from] of [...origin.entries()].sort(([x], [y]) => (x < y ? -1 : 1))) for (const f of from.sort()) if (f !== to) merged[f] = to;
  const p = poolSparseCategories(mergedNames, mergedCounts, minExpected);
  for (const nm of p.pooled) for (const f of origin.get(nm)!) merged[f] = "(pooled)";
  return { names: p.names, counts: p.counts, pooled: p.pooled, merged };
}
