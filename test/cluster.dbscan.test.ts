import { describe, expect, it } from "vitest";
import DensityClustering from "density-clustering";
import { dbscan, kneeOfIncreasing, suggestEps } from "../src/cluster/index.js";
import { InputError } from "../src/core/errors.js";
import type { Matrix } from "../src/core/matrix.js";
import { fromRows, toRows } from "../src/core/matrix.js";
import { Rng } from "../src/core/rng.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping scikit-learn comparisons: ${missing}`);

/** DBSCAN straight from Ester et al. 1996 with brute-force neighbourhoods: the slow reference. */
function referenceCore(X: Matrix, eps: number, minPts: number): Uint8Array {
  const core = new Uint8Array(X.rows);
  for (let i = 0; i < X.rows; i++) {
    let c = 0;
    for (let j = 0; j < X.rows; j++) {
      let s = 0;
      for (let t = 0; t < X.cols; t++) s += (X.data[i * X.cols + t]! - X.data[j * X.cols + t]!) ** 2;
      if (s <= eps * eps) c++;
    }
    core[i] = c >= minPts ? 1 : 0;
  }
  return core;
}

/**
 * Compare two labelings up to relabelling: core rows must form the same partition exactly and noise
 * must agree; a border row (non-core, in a cluster) may be claimed by a different cluster when it is
 * within eps of core rows of two clusters — DBSCAN leaves that to processing order (Ester et al. 1996,
 * Lemma 2 only fixes core rows) — so for border rows only "in some cluster" is compared.
 */
function expectSameClustering(a: Int32Array, b: ArrayLike<number>, core: Uint8Array): void {
  const map = new Map<number, number>();
  const back = new Map<number, number>();
  let mismatches = 0;
  for (let i = 0; i < a.length; i++) {
    const x = a[i]!;
    const y = b[i]!;
    if ((x < 0) !== (y < 0)) {
      mismatches++;
      continue;
    }
    if (x < 0 || !core[i]) continue;
    if (!map.has(x)) map.set(x, y);
    if (!back.has(y)) back.set(y, x);
    if (map.get(x) !== y || back.get(y) !== x) mismatches++;
  }
  expect(mismatches).toBe(0);
}

/** density-clustering returns clusters as index lists; turn them into labels (-1 = noise). */
function labelsFromClusters(n: number, clusters: number[][]): Int32Array {
  const l = new Int32Array(n).fill(-1);
  clusters.forEach((c, j) => c.forEach((i) => (l[i] = j)));
  return l;
}

describe("dbscan definitions", () => {
  it("dbscan(iris, {eps: 0.5, minPts: 5}) gives clusters of 49 and 84 and 17 noise rows", () => {
    // Values from the issue (scikit-learn's DBSCAN on its copy of Iris).
    const r = dbscan(loadIris().X, { eps: 0.5, minPts: 5 });
    expect(r.nClusters).toBe(2);
    expect(r.nNoise).toBe(17);
    const sizes = [0, 0];
    for (const l of r.labels) if (l >= 0) sizes[l]!++;
    expect(sizes).toEqual([49, 84]);
  });

  it("dbscan treats eps as inclusive and counts the row itself in minPts", () => {
    // Two rows exactly 1 apart (integers: the distance is exact): with eps = 1 and minPts = 2 each
    // has itself plus the other, so both are core and form one cluster (scikit-learn's convention).
    const X = fromRows([[0, 0], [1, 0], [5, 5]]);
    const r = dbscan(X, { eps: 1, minPts: 2 });
    expect(Array.from(r.labels)).toEqual([0, 0, -1]);
    expect(Array.from(r.core)).toEqual([1, 1, 0]);
    const r2 = dbscan(X, { eps: 0.999999, minPts: 2 });
    expect(Array.from(r2.labels)).toEqual([-1, -1, -1]);
    const r3 = dbscan(X, { eps: 1, minPts: 3 });
    expect(r3.nClusters).toBe(0);
    expect(r3.warnings[0]).toContain("no core rows");
  });

  it("a border row within eps of two clusters goes to the lower-numbered one (scikit-learn's order)", () => {
    // Group B (rows 0-3) near x = 1, group A (rows 4-7) near x = -1, and row 8 at the origin exactly
    // 1 from the nearest row of each group: it has 3 rows within eps = 1 (itself included), so it is
    // a border row of both clusters; B holds the lowest core row, so it is cluster 0 and claims row 8.
    const X = fromRows([[1, 0], [1.05, 0], [1.1, 0], [1.15, 0], [-1, 0], [-1.05, 0], [-1.1, 0], [-1.15, 0], [0, 0]]);
    const r = dbscan(X, { eps: 1, minPts: 4 });
    expect(r.nClusters).toBe(2);
    expect(Array.from(r.core)).toEqual([1, 1, 1, 1, 1, 1, 1, 1, 0]);
    expect(Array.from(r.labels)).toEqual([0, 0, 0, 0, 1, 1, 1, 1, 0]);
  });

  it("weights: a row is core when the weights within eps sum to minPts", () => {
    const X = fromRows([[0, 0], [0.5, 0], [9, 9]]);
    const r = dbscan(X, { eps: 1, minPts: 3, weights: new Float64Array([2, 1, 1]) });
    expect(Array.from(r.core)).toEqual([1, 1, 0]);
    expect(Array.from(r.labels)).toEqual([0, 0, -1]);
  });

  it("dbscan rejects a bad eps with a message that quotes it", () => {
    expect(() => dbscan(loadIris().X, { eps: 0 })).toThrow(InputError);
    expect(() => dbscan(loadIris().X, { eps: -1 })).toThrow("eps=-1 should be a finite number > 0");
  });
});

describe("dbscan against reference implementations", () => {
  it("equals density-clustering and a brute-force core test on blobs up to 5,000 rows", () => {
    for (const [n, d, eps] of [
      [600, 2, 0.35],
      [2000, 4, 0.9],
      [5000, 3, 0.45],
    ] as const) {
      const { X } = makeBlobs(n, d, 6, { seed: n, std: 1, box: 6 });
      const r = dbscan(X, { eps, minPts: 5 });
      // density-clustering uses dist < eps (strict); random doubles make ties impossible here.
      const dc = new DensityClustering.DBSCAN().run(toRows(X), eps, 5);
      const theirs = labelsFromClusters(n, dc);
      expectSameClustering(r.labels, theirs, r.core);
      expect(r.nClusters).toBe(dc.length);
      if (n <= 2000) expect(Array.from(r.core)).toEqual(Array.from(referenceCore(X, eps, 5)));
      expect(r.nNoise).toBeGreaterThan(0);
    }
  });

  it.skipIf(missing !== null)("equals scikit-learn's DBSCAN on 100,000 rows (labels, core rows) and on Iris", () => {
    const { X } = makeBlobs(100_000, 3, 10, { seed: 77, std: 1, box: 10 });
    const eps = 0.3;
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", X.data);
      ws.writeF64("I.bin", loadIris().X.data);
      const sk = ws.run<{ labels: number[]; core: number[]; irisLabels: number[] }>(`
from sklearn.cluster import DBSCAN
X = np.fromfile(DIR + '/X.bin').reshape(-1, 3)
db = DBSCAN(eps=${eps}, min_samples=5).fit(X)
I = np.fromfile(DIR + '/I.bin').reshape(150, 4)
di = DBSCAN(eps=0.5, min_samples=5).fit(I)
print(json.dumps({'labels': db.labels_.tolist(), 'core': db.core_sample_indices_.tolist(), 'irisLabels': di.labels_.tolist()}))
`);
      const r = dbscan(X, { eps, minPts: 5 });
      const core = new Uint8Array(X.rows);
      for (const i of sk.core) core[i] = 1;
      expect(Buffer.from(r.core).equals(Buffer.from(core))).toBe(true);
      // Same numbering and same border choice as scikit-learn, so labels are identical outright.
      let diff = 0;
      for (let i = 0; i < X.rows; i++) if (r.labels[i] !== sk.labels[i]) diff++;
      expect(diff).toBe(0);
      expect(r.nNoise).toBe(sk.labels.filter((l) => l < 0).length);
      expect(Array.from(dbscan(loadIris().X, { eps: 0.5, minPts: 5 }).labels)).toEqual(sk.irisLabels);
    } finally {
      ws.dispose();
    }
  });
});

describe("dbscan threads and weights", () => {
  it("gives identical labels and core rows on 1 and 2 threads", () => {
    const { X } = makeBlobs(30_000, 4, 8, { seed: 3, std: 1, box: 8 });
    const one = dbscan(X, { eps: 0.6, minPts: 6, threads: 1 });
    const two = dbscan(X, { eps: 0.6, minPts: 6, threads: 2 });
    expect(one.nClusters).toBeGreaterThan(1);
    expect(Buffer.from(two.labels.buffer).equals(Buffer.from(one.labels.buffer))).toBe(true);
    expect(Buffer.from(two.core).equals(Buffer.from(one.core))).toBe(true);
  });

  it.skipIf(missing !== null)("with fractional weights equals scikit-learn's DBSCAN(sample_weight=…)", () => {
    // Weights of 0.1–0.5 make rows need 10–50 neighbours to be core, so non-core rows have long
    // neighbour lists (the overflow path) — and 1 and 2 threads must agree too.
    const { X } = makeBlobs(25_000, 3, 6, { seed: 8, std: 1, box: 6 });
    const rng = new Rng(2);
    const w = Float64Array.from({ length: X.rows }, () => rng.uniform(0.1, 0.5));
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", X.data);
      ws.writeF64("w.bin", w);
      const sk = ws.run<number[]>(`
from sklearn.cluster import DBSCAN
X = np.fromfile(DIR + '/X.bin').reshape(-1, 3)
w = np.fromfile(DIR + '/w.bin')
print(json.dumps(DBSCAN(eps=0.35, min_samples=5).fit(X, sample_weight=w).labels_.tolist()))
`);
      for (const threads of [1, 2]) {
        const r = dbscan(X, { eps: 0.35, minPts: 5, weights: w, threads });
        let diff = 0;
        for (let i = 0; i < X.rows; i++) if (r.labels[i] !== sk[i]) diff++;
        expect(diff, `threads=${threads}`).toBe(0);
        expect(r.nNoise).toBeGreaterThan(0);
      }
    } finally {
      ws.dispose();
    }
  });
});

describe("suggestEps", () => {
  it("kneeOfIncreasing finds the corner of a hockey-stick curve", () => {
    const y = new Float64Array(100);
    for (let i = 0; i < 100; i++) y[i] = i < 80 ? 1 + i * 0.01 : 1.8 + (i - 80) * 1;
    // The curve bends at index 80 (last point of the slow part, 1 + 0.01·80 = 1.8, is also the start of the steep one).
    expect(kneeOfIncreasing(y)).toBe(80);
  });

  it("suggestEps returns the exact k-distance (k = minPts - 1) at the knee, and that eps makes the dense rows core", () => {
    const { X } = makeBlobs(1500, 2, 3, { seed: 5, std: 0.5, box: 10 });
    // Sprinkle 60 uniform noise rows over a wider box.
    const rng = new Rng(9);
    const noise = Array.from({ length: 60 }, () => [rng.uniform(-15, 15), rng.uniform(-15, 15)]);
    const all = fromRows([...toRows(X), ...noise]);
    const s = suggestEps(all, { minPts: 4 });
    expect(s.k).toBe(3);
    expect(s.sampleSize).toBe(all.rows);
    // Brute-force k-distances (3rd nearest other row) must equal the sorted curve.
    const brute = new Float64Array(all.rows);
    for (let i = 0; i < all.rows; i++) {
      const ds: number[] = [];
      for (let j = 0; j < all.rows; j++)
        if (j !== i) ds.push(Math.hypot(all.data[i * 2]! - all.data[j * 2]!, all.data[i * 2 + 1]! - all.data[j * 2 + 1]!));
      ds.sort((a, b) => a - b);
      brute[i] = ds[2]!;
    }
    brute.sort();
    for (let i = 0; i < all.rows; i++) expect(s.kDistances[i]).toBeCloseTo(brute[i]!, 12);
    expect(s.eps).toBe(s.kDistances[s.kneeIndex]);
    // Every row whose k-distance is <= eps is core under dbscan with that eps (the definition).
    const r = dbscan(all, { eps: s.eps, minPts: 4 });
    let coreCount = 0;
    for (const c of r.core) coreCount += c;
    expect(coreCount).toBe(s.kneeIndex + 1 + countTiesAbove(s.kDistances, s.kneeIndex));
    expect(r.nClusters).toBe(3);
  });
});

function countTiesAbove(a: Float64Array, i: number): number {
  let c = 0;
  for (let j = i + 1; j < a.length && a[j] === a[i]; j++) c++;
  return c;
}
