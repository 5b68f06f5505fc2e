import { describe, expect, it } from "vitest";
import { fromRows } from "../src/core/matrix.js";
import { Rng } from "../src/core/rng.js";
import { homogeneityTest, poolSparseCategories } from "../src/compare/homogeneityTest.js";
import { chiSquarePermutationTest, energyDistanceTest } from "../src/compare/permutationTests.js";
import { newcombeDifference, wilsonInterval } from "../src/compare/proportionDifference.js";
import { runPython, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping scipy reference checks: ${missing}`);

const TABLES: number[][][] = [
  [
    [12, 5, 30, 2],
    [20, 9, 14, 6],
  ],
  [
    [3, 0, 17],
    [8, 4, 11],
    [1, 9, 2],
  ],
  [
    [40, 2],
    [31, 11],
  ],
  [
    [118, 44, 7, 25, 3, 9],
    [96, 61, 12, 15, 8, 2],
  ],
];

describe("homogeneityTest (chi-square and G-test)", () => {
  it.skipIf(missing !== null)("matches scipy.stats.chi2_contingency (correction=False; lambda_='log-likelihood' for G)", () => {
    // Reference library: scipy.stats.chi2_contingency.
    const ref = runPython<{ x2: number; px2: number; g: number; pg: number; df: number }[]>(`
from scipy.stats import chi2_contingency
out = []
for t in ${JSON.stringify(TABLES)}:
    a = chi2_contingency(np.array(t), correction=False)
    b = chi2_contingency(np.array(t), correction=False, lambda_="log-likelihood")
    out.append(dict(x2=float(a[0]), px2=float(a[1]), g=float(b[0]), pg=float(b[1]), df=int(a[2])))
print(json.dumps(out))`);
    TABLES.forEach((t, k) => {
      const h = homogeneityTest(t);
      const r = ref[k]!;
      expect(h.chiSquare.df).toBe(r.df);
      expect(h.chiSquare.statistic).toBeCloseTo(r.x2, 10);
      expect(h.gTest.statistic).toBeCloseTo(r.g, 10);
      expect(Math.abs(h.chiSquare.p - r.px2)).toBeLessThan(1e-10 * Math.max(1, r.px2) + 1e-14);
      expect(Math.abs(h.gTest.p - r.pg)).toBeLessThan(1e-10 * Math.max(1, r.pg) + 1e-14);
    });
  });

  it("drops empty categories (they carry no degrees of freedom)", () => {
    const a = homogeneityTest([
      [12, 0, 5],
      [20, 0, 9],
    ]);
    const b = homogeneityTest([
      [12, 5],
      [20, 9],
    ]);
    expect(a.chiSquare.df).toBe(1);
    expect(a.chiSquare.statistic).toBeCloseTo(b.chiSquare.statistic, 14);
  });

  it("pools categories with small expected counts until every column reaches the minimum (hand-worked)", () => {
    // Totals 60 and 40 (smallest group 40, total 100): a column needs a total of 5 · 100 / 40 = 12.5.
    // Column totals: A 50, B 30, C 8, D 7, E 5 → pool E, D (12 < 12.5), then C (20): pooled = C, D, E.
    const p = poolSparseCategories(
      ["A", "B", "C", "D", "E"],
      [
        [30, 18, 5, 4, 3],
        [20, 12, 3, 3, 2],
      ],
      5,
    );
    expect(p.names).toEqual(["A", "B", "(pooled)"]);
    expect(p.counts).toEqual([
      [30, 18, 12],
      [20, 12, 8],
    ]);
    expect(p.pooled).toEqual(["C", "D", "E"]);
    expect(homogeneityTest(p.counts).minExpected).toBeGreaterThanOrEqual(5);
  });
});

describe("Wilson and Newcombe intervals", () => {
  it.skipIf(missing !== null)("Wilson matches scipy.stats.binomtest(...).proportion_ci(method='wilson')", () => {
    const cases = [
      [56, 70],
      [48, 80],
      [0, 10],
      [10, 10],
      [1, 29],
      [3, 7],
    ];
    // Reference library: scipy.stats.binomtest.
    const ref = runPython<number[][]>(`
from scipy.stats import binomtest
print(json.dumps([[float(c.low), float(c.high)] for c in [binomtest(k, n).proportion_ci(0.95, method="wilson") for k, n in ${JSON.stringify(cases)}]]))`);
    cases.forEach(([k, n], i) => {
      const w = wilsonInterval(k!, n!, 0.95);
      expect(w.lower).toBeCloseTo(ref[i]![0]!, 10);
      expect(w.upper).toBeCloseTo(ref[i]![1]!, 10);
    });
  });

  it("Newcombe's hybrid score interval reproduces the worked example 56/70 vs 48/80 (Newcombe 1998, Table II, method 10)", () => {
    // Newcombe 1998 example (a): 56/70 − 48/80 = 0.2000, 95 % interval 0.0524 to 0.3339 (values from memory
    // of the paper's table; the formula is checked independently against scipy's Wilson limits above).
    const d = newcombeDifference(48, 80, 56, 70, 0.95);
    expect(d.estimate).toBeCloseTo(0.2, 12);
    expect(d.lower).toBeCloseTo(0.0524, 4);
    expect(d.upper).toBeCloseTo(0.3339, 4);
    // Example (h) of the same table: 0/10 − 0/20 gives −0.1611 to 0.2775.
    const z = newcombeDifference(0, 20, 0, 10, 0.95);
    expect(z.lower).toBeCloseTo(-0.1611, 4);
    expect(z.upper).toBeCloseTo(0.2775, 4);
  });
});

describe("energy-distance permutation test", () => {
  const rng = new Rng(7);
  const sample = (n: number, shift: number, dims: number) => Array.from({ length: n }, () => Array.from({ length: dims }, (_, d) => rng.normal(d === 0 ? shift : 0, 1)));
  const units = (na: number, nb: number) => ({
    unitOf: Int32Array.from({ length: na + nb }, (_, i) => i),
    unitGroup: Uint8Array.from({ length: na + nb }, (_, i) => (i < na ? 0 : 1)),
    unit: "scenario" as const,
  });

  it.skipIf(missing !== null)("its statistic matches scipy.stats.energy_distance in one dimension and a numpy V-statistic in four", () => {
    const a1 = sample(23, 0, 1);
    const b1 = sample(31, 0.7, 1);
    const a4 = sample(20, 0, 4);
    const b4 = sample(17, 1, 4);
    // Reference library: scipy.stats.energy_distance (1-D) = sqrt(E); scipy.spatial.distance.cdist for the 4-D V-statistic.
    const ref = runPython<{ e1: number; e4: number }>(`
from scipy.stats import energy_distance
from scipy.spatial.distance import cdist
a1 = np.array(${JSON.stringify(a1)}).ravel(); b1 = np.array(${JSON.stringify(b1)}).ravel()
a4 = np.array(${JSON.stringify(a4)}); b4 = np.array(${JSON.stringify(b4)})
e4 = 2 * cdist(a4, b4).mean() - cdist(a4, a4).mean() - cdist(b4, b4).mean()
print(json.dumps(dict(e1=float(energy_distance(a1, b1) ** 2), e4=float(e4))))`);
    const t1 = energyDistanceTest(fromRows([...a1, ...b1]), units(23, 31), { permutations: 9, rng: new Rng(1) });
    expect((t1.statistic * (23 + 31)) / (23 * 31)).toBeCloseTo(ref.e1, 10);
    const t4 = energyDistanceTest(fromRows([...a4, ...b4]), units(20, 17), { permutations: 9, rng: new Rng(1) });
    expect((t4.statistic * (20 + 17)) / (20 * 17)).toBeCloseTo(ref.e4, 10);
  });

  it("rejects a shift of one standard deviation and keeps p uniform-ish without one (seeded)", () => {
    const shifted = energyDistanceTest(fromRows([...sample(40, 0, 3), ...sample(40, 1, 3)]), units(40, 40), { permutations: 199, rng: new Rng(2) });
    // With 199 permutations the smallest possible p is 1/200.
    expect(shifted.p).toBe(1 / 200);
    let rejections = 0;
    for (let k = 0; k < 20; k++) {
      const t = energyDistanceTest(fromRows([...sample(25, 0, 3), ...sample(25, 0, 3)]), units(25, 25), { permutations: 99, rng: new Rng(100 + k) });
      if (t.p < 0.05) rejections++;
    }
    // Under the null P(p < 0.05) <= 0.05; 20 tries: P(>= 5 rejections) < 0.003 (binomial).
    expect(rejections).toBeLessThan(5);
  });
});

describe("chi-square permutation test", () => {
  it.skipIf(missing !== null)("over single scenarios, agrees with the exact hypergeometric tail of the chi-square statistic (2 × 2)", () => {
    // 2 × 2 table [[9, 21], [17, 13]]: under permutation the first cell is hypergeometric; the exact p is
    // the probability of tables at least as extreme in Pearson's statistic (scipy.stats.hypergeom).
    const table = [
      [9, 21],
      [17, 13],
    ];
    const ref = runPython<{ p: number }>(`
from scipy.stats import hypergeom
a, b, c, d = 9, 21, 17, 13
N, K, n = a + b + c + d, a + c, a + b
def x2(x):
    t = np.array([[x, n - x], [K - x, N - n - K + x]], float)
    e = t.sum(1)[:, None] * t.sum(0)[None, :] / N
    return ((t - e) ** 2 / e).sum()
obs = x2(a)
p = sum(hypergeom.pmf(x, N, K, n) for x in range(max(0, n + K - N), min(n, K) + 1) if x2(x) >= obs - 1e-9)
print(json.dumps(dict(p=float(p))))`);
    const cat: number[] = [];
    const group: number[] = [];
    table.forEach((row, g) => row.forEach((k, c) => {
      for (let i = 0; i < k; i++) {
        cat.push(c);
        group.push(g);
      }
    }));
    const B = 19999;
    const t = chiSquarePermutationTest(Int32Array.from(cat), 2, { unitOf: Int32Array.from(cat, (_, i) => i), unitGroup: Uint8Array.from(group), unit: "scenario" }, { permutations: B, rng: new Rng(3) });
    expect(t.statistic).toBeCloseTo(homogeneityTest(table).chiSquare.statistic, 12);
    // Monte Carlo error: sd = sqrt(p(1-p)/B) ≈ 0.0035 at p ≈ 0.07; allow 4 sd.
    expect(Math.abs(t.p - ref.p)).toBeLessThan(4 * Math.sqrt((ref.p * (1 - ref.p)) / B) + 1 / B);
  });
});
