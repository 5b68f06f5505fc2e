import { InputError } from "../core/errors.js";
import { zeros, type Matrix } from "../core/matrix.js";
import { Rng } from "../core/rng.js";
import { abundance } from "../coverage/abundance.js";
import { discoveryCurve, type DiscoveryCurve } from "../coverage/discoveryCurve.js";
import { rarefiedRichness } from "../coverage/rarefaction.js";
import { standardize } from "../embed/scale.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { checkLevel } from "../exposure/poissonInterval.js";
import type { CategoryKind } from "../catalogue/scenarioCategories.js";
import type { CatalogueSample } from "./catalogueSample.js";
import { catalogueDifferences } from "./catalogueDifferences.js";
import { coarsenSparseCategories, homogeneityTest, typeKeyParent, type TestStatistic } from "./homogeneityTest.js";
import { chiSquarePermutationTest, energyDistanceTest, type PermutationResult, type PermutationUnits } from "./permutationTests.js";
import { newcombeDifference, type ProportionInterval } from "./proportionDifference.js";

export interface CompareOptions {
  /** Level of the intervals (default 0.95). */
  level?: number;
  /** Categories with a smaller expected count in some group are pooled before the frequency test (default 5). */
  minExpected?: number;
  /** Permutations of the permutation tests (default 999). */
  permutations?: number;
  /** Bootstrap resamples of the share-difference intervals (default 999). */
  bootstrap?: number;
  /** What the permutation tests and the bootstrap move: whole drives (default) or single scenarios. */
  unit?: "drive" | "scenario";
  /** What a share is a share of (default "km"). */
  weightBy?: "km" | "hours";
  /** Run the energy-distance test on the features (default true). */
  embeddingTest?: boolean;
  /** At most this many scenarios enter the energy test (a seeded sample of drives beyond it; default 1500). */
  maxEmbeddingScenarios?: number;
  seed?: number;
}

export type ResolvedCompareOptions = Required<CompareOptions>;

export const COMPARE_DEFAULTS: Readonly<ResolvedCompareOptions> = {
  level: 0.95,
  minExpected: 5,
  permutations: 999,
  bootstrap: 999,
  unit: "drive",
  weightBy: "km",
  embeddingTest: true,
  maxEmbeddingScenarios: 1500,
  seed: 1,
};

export function resolveCompareOptions(options: CompareOptions = {}): ResolvedCompareOptions {
  const o = { ...COMPARE_DEFAULTS };
  for (const k of Object.keys(options) as (keyof CompareOptions)[]) if (options[k] !== undefined) (o as Record<string, unknown>)[k] = options[k];
  checkLevel(o.level);
  const int = (name: keyof CompareOptions, v: number, min: number) => {
    if (!(Number.isInteger(v) && v >= min)) throw new InputError(`${name}=${v} should be an integer >= ${min}`, { column: name, value: v });
  };
  int("permutations", o.permutations, 1);
  int("bootstrap", o.bootstrap, 1);
  int("maxEmbeddingScenarios", o.maxEmbeddingScenarios, 4);
  if (!(o.minExpected >= 0 && Number.isFinite(o.minExpected))) throw new InputError(`minExpected=${o.minExpected} should be >= 0`, { column: "minExpected", value: o.minExpected });
  if (o.unit !== "drive" && o.unit !== "scenario") throw new InputError(`unit should be "drive" or "scenario"`, { column: "unit", value: o.unit });
  if (o.weightBy !== "km" && o.weightBy !== "hours") throw new InputError(`weightBy should be "km" or "hours"`, { column: "weightBy", value: o.weightBy });
  if (!Number.isFinite(o.seed)) throw new InputError(`seed should be a number`, { column: "seed", value: o.seed });
  return o;
}

/** One side in figures. */
export interface SideFigures {
  name: string;
  scenarios: number;
  drives: number;
  recordings: string[];
  km: number;
  hours: number;
  categories: number;
}

export interface CategoryComparison {
  category: string;
  /** Where it was seen. */
  seenIn: "both" | "a only" | "b only";
  a: { scenarios: number; km: number; hours: number; share: number; countShare: number };
  b: { scenarios: number; km: number; hours: number; share: number; countShare: number };
  /** b.share − a.share (shares of km or hours, as weightBy). */
  difference: number;
  /** Percentile bootstrap interval of the difference, resampling whole drives (or scenarios) in each side. */
  interval: { lower: number; upper: number; level: number; method: string };
  /** Newcombe interval of the difference of the count shares (b − a), windows taken as independent. */
  countDifference: ProportionInterval;
}

export interface CatalogueComparison {
  categoryKind: CategoryKind;
  a: SideFigures;
  b: SideFigures;
  /** Every category of either side, by the larger of its two shares (descending, then name). */
  categories: CategoryComparison[];
  onlyInA: string[];
  onlyInB: string[];
  /** Homogeneity of the category frequencies (counts of scenarios). */
  frequency: {
    /** Columns of the tested table (after merging sparse categories into coarser ones and pooling the rest). */
    categories: string[];
    /** Category → the column it went into, for every category that is not a column of its own. */
    merged: Record<string, string>;
    /** Columns (after merging) that went into "(pooled)". */
    pooled: string[];
    counts: number[][];
    minExpected: number;
    chiSquare: TestStatistic;
    gTest: TestStatistic;
    /** The chi-square statistic against its permutation distribution over drives. */
    permutation: PermutationResult;
  };
  /** Energy-distance test on the standardized features, or null when switched off or unavailable. */
  embedding: PermutationResult | null;
  discovery: {
    a: DiscoveryCurve;
    b: DiscoveryCurve;
    /** Expected number of categories at the smaller side's number of scenarios (rarefaction, Hurlbert 1971). */
    atEqualEffort: { scenarios: number; a: number; b: number };
  };
  options: ResolvedCompareOptions;
  cautions: string[];
  warnings: string[];
}

export const COMPARE_CAUTIONS: readonly string[] = [
  "Windows of one ego drive are correlated (the same vehicle, the same neighbours). The asymptotic chi-square and G-test p-values treat every scenario as independent and therefore overstate the evidence; the permutation p-values move whole drives and only assume that drives are exchangeable. Read the permutation p-values first.",
  "Drives of one recording share its conditions and its hour; a difference between two recordings cannot be told apart from any other difference between them (site, day, sensor). More recordings per condition are the remedy, not more windows.",
  "A test that does not reject is not evidence that two catalogues are alike: with few scenarios it has little power. Statistical estimates are not a safety argument on their own; defer to ISO 26262 / ISO 21448 processes and the safety assessment.",
];

/**
 * Compare two catalogues (or two condition groups of one): per category the share in each with the
 * difference and its interval; which categories appear in only one; a chi-square and a G-test of
 * homogeneity of the category frequencies (with a drive-permutation p-value beside the asymptotic
 * ones); an energy-distance permutation test on the features; and both discovery curves. Throws an
 * InputError naming what differs when the catalogues were made with a different tool version or
 * incompatible options.
 */
export function compareCatalogues(a: CatalogueSample, b: CatalogueSample, options: CompareOptions = {}): CatalogueComparison {
  const o = resolveCompareOptions(options);
  const diffs = catalogueDifferences(a, b);
  if (diffs.length > 0) throw new InputError(`"${a.name}" and "${b.name}" cannot be compared: ${diffs.join("; ")}`);
  for (const s of [a, b]) if (s.categories.length === 0) throw new InputError(`"${s.name}" has no scenarios`);
  const rng = new Rng(o.seed);
  const warnings: string[] = [];
  const w = (s: CatalogueSample) => (o.weightBy === "km" ? s.km : s.hours);

  // Category index over both sides.
  const allCats = [...new Set([...a.categories, ...b.categories])].sort();
  const catIndex = new Map(allCats.map((c, i) => [c, i]));
  const K = allCats.length;
  const side = (s: CatalogueSample) => {
    const count = new Array<number>(K).fill(0);
    const km: number[][] = Array.from({ length: K }, () => []);
    const hours: number[][] = Array.from({ length: K }, () => []);
    const wt: number[][] = Array.from({ length: K }, () => []);
    const ws = w(s);
    s.categories.forEach((c, i) => {
      const j = catIndex.get(c)!;
      count[j]!++;
      km[j]!.push(s.km[i]!);
      hours[j]!.push(s.hours[i]!);
      wt[j]!.push(ws[i]!);
    });
    const total = compensatedSum(ws);
    return { count, km: km.map((v) => compensatedSum(v)), hours: hours.map((v) => compensatedSum(v)), weight: wt.map((v) => compensatedSum(v)), total, n: s.categories.length };
  };
  const A = side(a);
  const B = side(b);
  const figures = (s: CatalogueSample): SideFigures => ({
    name: s.name,
    scenarios: s.categories.length,
    drives: new Set(s.drives).size,
    recordings: [...new Set(s.recordings)].sort(),
    km: compensatedSum(s.km),
    hours: compensatedSum(s.hours),
    categories: new Set(s.categories).size,
  });

  // Bootstrap of the share differences over units (drives or scenarios) within each side.
  const boot = bootstrapShareDifferences(a, b, catIndex, o, rng.fork("bootstrap"));
  const categories: CategoryComparison[] = allCats.map((c, j) => {
    const sa = A.total > 0 ? A.weight[j]! / A.total : 0;
    const sb = B.total > 0 ? B.weight[j]! / B.total : 0;
    return {
      category: c,
      seenIn: A.count[j]! > 0 && B.count[j]! > 0 ? "both" : A.count[j]! > 0 ? "a only" : "b only",
      a: { scenarios: A.count[j]!, km: A.km[j]!, hours: A.hours[j]!, share: sa, countShare: A.count[j]! / A.n },
      b: { scenarios: B.count[j]!, km: B.km[j]!, hours: B.hours[j]!, share: sb, countShare: B.count[j]! / B.n },
      difference: sb - sa,
      interval: boot[j]!,
      countDifference: newcombeDifference(A.count[j]!, A.n, B.count[j]!, B.n, o.level),
    };
  });
  categories.sort((x, y) => Math.max(y.a.share, y.b.share) - Math.max(x.a.share, x.b.share) || (x.category < y.category ? -1 : 1));
  const onlyInA = categories.filter((c) => c.seenIn === "a only").map((c) => c.category);
  const onlyInB = categories.filter((c) => c.seenIn === "b only").map((c) => c.category);

  // Frequency test on the pooled table.
  // Sparse type keys merge into their coarser keys first (classes have no parent), then the rest is pooled.
  const pooled = coarsenSparseCategories(allCats, [A.count, B.count], o.minExpected, a.categoryKind === "type key" ? typeKeyParent : () => null);
  let chiSquare: TestStatistic;
  let gTest: TestStatistic;
  let minE = 0;
  if (pooled.names.length < 2) {
    warnings.push(`after pooling categories with expected counts below ${o.minExpected}, fewer than 2 columns are left: the frequency test has nothing to compare (p = 1)`);
    chiSquare = { statistic: 0, df: 0, p: 1 };
    gTest = { statistic: 0, df: 0, p: 1 };
  } else {
    const h = homogeneityTest(pooled.counts);
    chiSquare = h.chiSquare;
    gTest = h.gTest;
    minE = h.minExpected;
  }
  const mergedCount = Object.keys(pooled.merged).length;
  if (mergedCount > 0)
    warnings.push(`${mergedCount} of ${K} categories with expected counts below ${o.minExpected} were merged into coarser ones${pooled.pooled.length > 0 ? ` (${pooled.pooled.length} of those into one pooled column)` : ""} for the frequency test; the table has ${pooled.names.length} columns`);
  const colOf = new Map<string, number>();
  pooled.names.forEach((nm, j) => colOf.set(nm, j));
  const cat = Int32Array.from([...a.categories, ...b.categories], (c) => colOf.get(pooled.merged[c] ?? c)!);
  const units = permutationUnits(a, b, o.unit);
  const permutation = chiSquarePermutationTest(cat, pooled.names.length, units, { permutations: o.permutations, rng: rng.fork("chi-square permutations") });

  // Energy test on the features, standardized on both sides together.
  let embedding: PermutationResult | null = null;
  if (o.embeddingTest) {
    if (!a.features || !b.features) warnings.push("no features on one side: the energy-distance test was not run");
    else embedding = embeddingTest(a, b, o, rng.fork("energy"), warnings);
  }

  const dA = discoveryCurve(a.categories, a.km);
  const dB = discoveryCurve(b.categories, b.km);
  const m = Math.min(A.n, B.n);
  const atEqualEffort = { scenarios: m, a: rarefiedRichness(abundance(a.categories).counts, m), b: rarefiedRichness(abundance(b.categories).counts, m) };
  if (units.units.a < 10 || units.units.b < 10)
    warnings.push(`few ${o.unit}s (${units.units.a} and ${units.units.b}): the permutation tests have little power and a coarse p-value`);
  return {
    categoryKind: a.categoryKind,
    a: figures(a),
    b: figures(b),
    categories,
    onlyInA,
    onlyInB,
    frequency: { categories: pooled.names, merged: pooled.merged, pooled: pooled.pooled, counts: pooled.counts, minExpected: minE, chiSquare, gTest, permutation },
    embedding,
    discovery: { a: dA, b: dB, atEqualEffort },
    options: o,
    cautions: [...COMPARE_CAUTIONS],
    warnings,
  };
}

/** Units for the permutation tests: drives (scenarios of one ego drive together) or single scenarios, A's first. */
function permutationUnits(a: CatalogueSample, b: CatalogueSample, unit: "drive" | "scenario"): PermutationUnits & { units: { a: number; b: number } } {
  const n = a.categories.length + b.categories.length;
  const unitOf = new Int32Array(n);
  const groups: number[] = [];
  if (unit === "scenario") {
    for (let i = 0; i < n; i++) {
      unitOf[i] = i;
      groups.push(i < a.categories.length ? 0 : 1);
    }
  } else {
    const index = new Map<string, number>();
    const drives = [...a.drives.map((d) => `a\u0000${d}`), ...b.drives.map((d) => `b\u0000${d}`)];
    drives.forEach((d, i) => {
      let u = index.get(d);
      if (u === undefined) {
        index.set(d, (u = groups.length));
        groups.push(i < a.categories.length ? 0 : 1);
      }
      unitOf[i] = u;
    });
  }
  const unitGroup = Uint8Array.from(groups);
  let na = 0;
  for (const g of unitGroup) if (g === 0) na++;
  return { unitOf, unitGroup, unit, units: { a: na, b: unitGroup.length - na } };
}

function bootstrapShareDifferences(
  a: CatalogueSample,
  b: CatalogueSample,
  catIndex: Map<string, number>,
  o: ResolvedCompareOptions,
  rng: Rng,
): CategoryComparison["interval"][] {
  const K = catIndex.size;
  // Per unit: weight per category (sparse) and total.
  const units = (s: CatalogueSample) => {
    const ws = o.weightBy === "km" ? s.km : s.hours;
    const map = new Map<string, { cats: Map<number, number>; total: number }>();
    const key = (i: number) => (o.unit === "drive" ? s.drives[i]! : String(i));
    s.categories.forEach((c, i) => {
      let u = map.get(key(i));
      if (!u) map.set(key(i), (u = { cats: new Map(), total: 0 }));
      const j = catIndex.get(c)!;
      u.cats.set(j, (u.cats.get(j) ?? 0) + ws[i]!);
      u.total += ws[i]!;
    });
    return [...map.values()];
  };
  const ua = units(a);
  const ub = units(b);
  const B = o.bootstrap;
  const diffs: Float64Array[] = Array.from({ length: K }, () => new Float64Array(B));
  const shareA = new Float64Array(K);
  const shareB = new Float64Array(K);
  const resample = (u: ReturnType<typeof units>, out: Float64Array) => {
    out.fill(0);
    let total = 0;
    for (let k = 0; k < u.length; k++) {
      const x = u[rng.int(u.length)]!;
      total += x.total;
      for (const [j, v] of x.cats) out[j]! += v;
    }
    for (let j = 0; j < K; j++) out[j] = total > 0 ? out[j]! / total : 0;
  };
  for (let r = 0; r < B; r++) {
    resample(ua, shareA);
    resample(ub, shareB);
    for (let j = 0; j < K; j++) diffs[j]![r] = shareB[j]! - shareA[j]!;
  }
  const lo = (1 - o.level) / 2;
  const method = `percentile bootstrap over ${o.unit}s, ${B} resamples`;
  return diffs.map((d) => {
    d.sort();
    return { lower: quantileSorted(d, lo), upper: quantileSorted(d, 1 - lo), level: o.level, method };
  });
}

/** Linear-interpolation quantile of sorted values (Hyndman & Fan 1996, type 7, as numpy's default). */
function quantileSorted(x: Float64Array, q: number): number {
  const h = (x.length - 1) * q;
  const i = Math.floor(h);
  const f = h - i;
  return i + 1 < x.length ? x[i]! + f * (x[i + 1]! - x[i]!) : x[i]!;
}

function embeddingTest(a: CatalogueSample, b: CatalogueSample, o: ResolvedCompareOptions, rng: Rng, warnings: string[]): PermutationResult {
  const fa = a.features!;
  const fb = b.features!;
  let rowsA = Array.from({ length: fa.rows }, (_, i) => i);
  let rowsB = Array.from({ length: fb.rows }, (_, i) => i);
  const total = fa.rows + fb.rows;
  if (total > o.maxEmbeddingScenarios) {
    // Keep a seeded sample of whole drives from each side, in proportion.
    const pick = (s: CatalogueSample, rows: number[], limit: number) => {
      const drives = [...new Set(s.drives)];
      rng.shuffle(drives);
      const keep = new Set<string>();
      let count = 0;
      const size = new Map<string, number>();
      for (const d of s.drives) size.set(d, (size.get(d) ?? 0) + 1);
      for (const d of drives) {
        if (count >= limit) break;
        keep.add(d);
        count += size.get(d)!;
      }
      return rows.filter((i) => keep.has(s.drives[i]!));
    };
    const la = Math.max(2, Math.round((o.maxEmbeddingScenarios * fa.rows) / total));
    rowsA = pick(a, rowsA, la);
    rowsB = pick(b, rowsB, o.maxEmbeddingScenarios - la);
    warnings.push(`the energy-distance test used a seeded sample of whole drives: ${rowsA.length} of ${fa.rows} and ${rowsB.length} of ${fb.rows} scenarios`);
  }
  const cols = fa.cols;
  const X: Matrix = zeros(rowsA.length + rowsB.length, cols);
  rowsA.forEach((i, r) => X.data.set(fa.data.subarray(i * cols, (i + 1) * cols), r * cols));
  rowsB.forEach((i, r) => X.data.set(fb.data.subarray(i * cols, (i + 1) * cols), (rowsA.length + r) * cols));
  for (let i = 0; i < X.data.length; i++) if (!Number.isFinite(X.data[i]!)) X.data[i] = 0;
  // Standardized on both sides together, with the embedding's feature groups (each group the same total variance).
  const st = standardize(X, { groups: a.featureGroups });
  const sub: CatalogueSample = { ...a, drives: rowsA.map((i) => a.drives[i]!), categories: rowsA.map((i) => a.categories[i]!) };
  const subB: CatalogueSample = { ...b, drives: rowsB.map((i) => b.drives[i]!), categories: rowsB.map((i) => b.categories[i]!) };
  const units = permutationUnits(sub, subB, o.unit);
  return energyDistanceTest(st.matrix, units, { permutations: o.permutations, rng });
}
