import { describe, expect, it } from "vitest";
import { kmeans as mlKmeans } from "ml-kmeans";
import { kmeans, kmeansPlusPlus, shareMatrix } from "../src/cluster/index.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import type { Matrix } from "../src/core/matrix.js";
import { toRows } from "../src/core/matrix.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping scikit-learn comparisons: ${missing}`);

/** Plain Lloyd, obviously correct: the slow reference beside the fast path. */
function referenceLloyd(X: Matrix, init: Matrix, iters: number): { labels: Int32Array; centres: Float64Array } {
  const { rows: n, cols: d } = X;
  const k = init.rows;
  const C = Float64Array.from(init.data);
  const labels = new Int32Array(n);
  const assign = (): void => {
    for (let i = 0; i < n; i++) {
      let best = 0;
      let bd = Infinity;
      for (let j = 0; j < k; j++) {
        let s = 0;
        for (let t = 0; t < d; t++) s += (X.data[i * d + t]! - C[j * d + t]!) ** 2;
        if (s < bd) {
          bd = s;
          best = j;
        }
      }
      labels[i] = best;
    }
  };
  // `iters` assign + update steps, then a final assignment to the final centres.
  for (let it = 0; it < iters; it++) {
    assign();
    const sums = new Float64Array(k * d);
    const cnt = new Float64Array(k);
    for (let i = 0; i < n; i++) {
      cnt[labels[i]!]!++;
      for (let t = 0; t < d; t++) sums[labels[i]! * d + t]! += X.data[i * d + t]!;
    }
    for (let j = 0; j < k; j++) if (cnt[j]! > 0) for (let t = 0; t < d; t++) C[j * d + t] = sums[j * d + t]! / cnt[j]!;
  }
  assign();
  return { labels, centres: C };
}

function inertiaOf(X: Matrix, labels: ArrayLike<number>, C: ArrayLike<number>): number {
  let s = 0;
  for (let i = 0; i < X.rows; i++)
    for (let t = 0; t < X.cols; t++) s += (X.data[i * X.cols + t]! - C[labels[i]! * X.cols + t]!) ** 2;
  return s;
}

/** Same labels up to nothing: with the same initial centres the numbering is the same too. */
function expectSameLabels(a: ArrayLike<number>, b: ArrayLike<number>): void {
  let diff = 0;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) diff++;
  expect(diff).toBe(0);
}

function sizes(labels: Int32Array, k: number): number[] {
  const s = new Array<number>(k).fill(0);
  for (const l of labels) s[l]!++;
  return s;
}

const iris = loadIris().X;
// Rows 0, 50 and 100 of Iris (one flower of each species) as initial centres.
const irisInit: Matrix = { data: new Float64Array([5.1, 3.5, 1.4, 0.2, 7.0, 3.2, 4.7, 1.4, 6.3, 3.3, 6.0, 2.5]), rows: 3, cols: 4 };

describe("kmeans on Iris", () => {
  it("kmeans(iris, 3) reaches the known optimum: inertia 78.851441, sizes 50/62/38", () => {
    // Values from the issue (scikit-learn's copy of Iris, KMeans k=3); also checked live below.
    for (const algorithm of ["hamerly", "lloyd"] as const) {
      const r = kmeans(iris, 3, { init: irisInit, algorithm });
      expect(r.inertia).toBeCloseTo(78.851441, 6);
      expect(sizes(r.labels, 3).sort()).toEqual([38, 50, 62].sort());
      expect(r.converged).toBe(true);
    }
    const seeded = kmeans(iris, 3, { seed: 7, nInit: 3 });
    expect(seeded.inertia).toBeCloseTo(78.851441, 6);
    expect(seeded.nInit).toBe(3);
  });

  it("kmeans(iris, 3, {init}) equals ml-kmeans from the same initial centres", () => {
    const r = kmeans(iris, 3, { init: irisInit, tol: 0 });
    const ml = mlKmeans(toRows(iris), 3, { initialization: toRows(irisInit), tolerance: 0, maxIterations: 1000 });
    expectSameLabels(r.labels, ml.clusters);
    const mlC = ml.centroids.flat();
    const mlInertia = inertiaOf(iris, ml.clusters, mlC);
    expect(Math.abs(r.inertia - mlInertia) / mlInertia).toBeLessThan(1e-9);
  });

  it.skipIf(missing !== null)("kmeans(iris, 3, {init}) equals scikit-learn KMeans(lloyd, init=array, n_init=1)", () => {
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", iris.data);
      ws.writeF64("C.bin", irisInit.data);
      const sk = ws.run<{ labels: number[]; inertia: number; n_iter: number; sizes: number[] }>(`
from sklearn.cluster import KMeans
X = np.fromfile(DIR + '/X.bin', dtype='<f8').reshape(150, 4)
C = np.fromfile(DIR + '/C.bin', dtype='<f8').reshape(3, 4)
km = KMeans(n_clusters=3, init=C, n_init=1, algorithm='lloyd').fit(X)
print(json.dumps({'labels': km.labels_.tolist(), 'inertia': float(km.inertia_), 'n_iter': int(km.n_iter_),
                  'sizes': np.bincount(km.labels_).tolist()}))
`);
      const r = kmeans(iris, 3, { init: irisInit });
      expectSameLabels(r.labels, sk.labels);
      expect(Math.abs(r.inertia - sk.inertia) / sk.inertia).toBeLessThan(1e-9);
      expect(r.iterations).toBe(sk.n_iter);
      expect(sk.inertia).toBeCloseTo(78.851441, 6);
    } finally {
      ws.dispose();
    }
  });
});

describe("kmeans on generated blobs", () => {
  // Overlapping blobs (std 2.5 in a box of ±6) so that Lloyd needs many iterations and bounds matter.
  const { X } = makeBlobs(4000, 6, 8, { seed: 11, std: 2.5, box: 6 });
  const init = kmeansPlusPlus(X, 8, { seed: 3 });

  it("hamerly and lloyd give identical labels and inertia, equal to a plain reference Lloyd", () => {
    const h = kmeans(X, 8, { init, tol: 0, maxIter: 500 });
    const l = kmeans(X, 8, { init, tol: 0, maxIter: 500, algorithm: "lloyd" });
    expect(h.converged).toBe(true);
    expectSameLabels(h.labels, l.labels);
    expect(h.iterations).toBe(l.iterations);
    expect(Math.abs(h.inertia - l.inertia) / l.inertia).toBeLessThan(1e-12);
    // The bounds skip most distance evaluations (Hamerly 2010).
    expect(h.distanceEvaluations).toBeLessThan(0.5 * l.distanceEvaluations);
    const ref = referenceLloyd(X, init, h.iterations);
    expectSameLabels(h.labels, ref.labels);
  });

  it("kmeans(blobs, 8, {init}) equals ml-kmeans from the same centres", () => {
    const r = kmeans(X, 8, { init, tol: 0, maxIter: 1000 });
    const ml = mlKmeans(toRows(X), 8, { initialization: toRows(init), tolerance: 0, maxIterations: 1000 });
    expectSameLabels(r.labels, ml.clusters);
    const mlInertia = inertiaOf(X, ml.clusters, ml.centroids.flat());
    expect(Math.abs(r.inertia - mlInertia) / mlInertia).toBeLessThan(1e-9);
  });

  it.skipIf(missing !== null)("kmeans equals scikit-learn (lloyd and elkan) on blobs, unweighted and weighted", () => {
    const w = new Float64Array(X.rows);
    const rng = new Rng(5);
    for (let i = 0; i < w.length; i++) w[i] = rng.uniform(0.1, 3); // kilometres per scenario
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", X.data);
      ws.writeF64("C.bin", init.data);
      ws.writeF64("w.bin", w);
      type Out = { labels: number[]; inertia: number; n_iter: number };
      const sk = ws.run<Record<string, Out>>(`
from sklearn.cluster import KMeans
X = np.fromfile(DIR + '/X.bin', dtype='<f8').reshape(${X.rows}, ${X.cols})
C = np.fromfile(DIR + '/C.bin', dtype='<f8').reshape(8, ${X.cols})
w = np.fromfile(DIR + '/w.bin', dtype='<f8')
out = {}
for name, alg, sw in [('lloyd', 'lloyd', None), ('elkan', 'elkan', None), ('weighted', 'lloyd', w)]:
    km = KMeans(n_clusters=8, init=C, n_init=1, algorithm=alg, max_iter=300, tol=1e-4).fit(X, sample_weight=sw)
    out[name] = {'labels': km.labels_.tolist(), 'inertia': float(km.inertia_), 'n_iter': int(km.n_iter_)}
print(json.dumps(out))
`);
      const r = kmeans(X, 8, { init });
      for (const name of ["lloyd", "elkan"]) {
        expectSameLabels(r.labels, sk[name]!.labels);
        expect(Math.abs(r.inertia - sk[name]!.inertia) / sk[name]!.inertia).toBeLessThan(1e-9);
        expect(r.iterations).toBe(sk[name]!.n_iter);
      }
      const rw = kmeans(X, 8, { init, weights: w });
      expectSameLabels(rw.labels, sk.weighted!.labels);
      expect(Math.abs(rw.inertia - sk.weighted!.inertia) / sk.weighted!.inertia).toBeLessThan(1e-9);
      expect(rw.iterations).toBe(sk.weighted!.n_iter);
    } finally {
      ws.dispose();
    }
  });

  it.skipIf(missing !== null)("an empty cluster is moved onto the farthest row, as scikit-learn does", () => {
    // The third centre is far from every row, so its cluster is empty after the first assignment.
    const init3: Matrix = { data: new Float64Array([5.1, 3.5, 1.4, 0.2, 6.3, 3.3, 6.0, 2.5, 100, 100, 100, 100]), rows: 3, cols: 4 };
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", iris.data);
      ws.writeF64("C.bin", init3.data);
      const sk = ws.run<{ labels: number[]; inertia: number; n_iter: number }>(`
from sklearn.cluster import KMeans
X = np.fromfile(DIR + '/X.bin', dtype='<f8').reshape(150, 4)
C = np.fromfile(DIR + '/C.bin', dtype='<f8').reshape(3, 4)
km = KMeans(n_clusters=3, init=C, n_init=1, algorithm='lloyd').fit(X)
print(json.dumps({'labels': km.labels_.tolist(), 'inertia': float(km.inertia_), 'n_iter': int(km.n_iter_)}))
`);
      for (const algorithm of ["hamerly", "lloyd"] as const) {
        const r = kmeans(iris, 3, { init: init3, algorithm });
        expect(r.warnings.some((w) => w.includes("empty cluster"))).toBe(true);
        expectSameLabels(r.labels, sk.labels);
        expect(Math.abs(r.inertia - sk.inertia) / sk.inertia).toBeLessThan(1e-9);
        expect(r.iterations).toBe(sk.n_iter);
      }
    } finally {
      ws.dispose();
    }
  });
});

describe("kmeans with worker threads", () => {
  it("gives byte-identical results with 1 and 2 threads (fixed chunks, ordered reduction)", () => {
    const { X } = makeBlobs(60_000, 8, 12, { seed: 2, std: 3, box: 8 });
    const init = kmeansPlusPlus(X, 12, { seed: 1 });
    const one = kmeans(X, 12, { init, threads: 1 });
    const two = kmeans(X, 12, { init, threads: 2 });
    expect(one.threads).toBe(1);
    expect(two.threads).toBe(2);
    expect(two.warnings).toEqual(one.warnings);
    expect(Buffer.from(two.labels.buffer).equals(Buffer.from(one.labels.buffer))).toBe(true);
    expect(Buffer.from(two.centroids.data.buffer).equals(Buffer.from(one.centroids.data.buffer))).toBe(true);
    expect(two.inertia).toBe(one.inertia);
    expect(two.iterations).toBe(one.iterations);
    // The worker pool is kept between calls: a second call reuses it and gives the same bytes; a
    // matrix already in shared memory (shareMatrix) is used in place and changes nothing either.
    const shared = shareMatrix(X);
    expect(shared.data.buffer).toBeInstanceOf(SharedArrayBuffer);
    expect(shareMatrix(shared)).toBe(shared);
    const again = kmeans(shared, 12, { init, threads: 2 });
    expect(Buffer.from(again.labels.buffer).equals(Buffer.from(one.labels.buffer))).toBe(true);
    expect(again.inertia).toBe(one.inertia);
    const ref = referenceLloyd(X, init, one.iterations);
    expectSameLabels(one.labels, ref.labels);
    // Weighted fits too (the weights go to the workers as well).
    const w = Float64Array.from({ length: X.rows }, (_, i) => 0.5 + (i % 7) / 3);
    const w1 = kmeans(X, 12, { init, weights: w, threads: 1 });
    const w2 = kmeans(X, 12, { init, weights: w, threads: 2 });
    expect(Buffer.from(w2.labels.buffer).equals(Buffer.from(w1.labels.buffer))).toBe(true);
    expect(w2.inertia).toBe(w1.inertia);
    expect(Array.from(w2.clusterWeights)).toEqual(Array.from(w1.clusterWeights));
  });
});

describe("kmeans options and seeding", () => {
  it("kmeansPlusPlus picks k distinct real rows and is deterministic for a seed", () => {
    const { X } = makeBlobs(500, 3, 5, { seed: 4 });
    const a = kmeansPlusPlus(X, 5, { seed: 9 });
    const b = kmeansPlusPlus(X, 5, { seed: 9 });
    expect(Array.from(a.data)).toEqual(Array.from(b.data));
    const rows = new Set<number>();
    for (let c = 0; c < 5; c++) {
      let found = -1;
      for (let i = 0; i < X.rows && found < 0; i++) {
        let same = true;
        for (let t = 0; t < 3; t++) if (X.data[i * 3 + t] !== a.data[c * 3 + t]) same = false;
        if (same) found = i;
      }
      expect(found).toBeGreaterThanOrEqual(0);
      rows.add(found);
    }
    expect(rows.size).toBe(5);
  });

  it("kmeans keeps the restart with the lowest inertia", () => {
    const { X } = makeBlobs(1500, 4, 10, { seed: 8, std: 2, box: 5 });
    const multi = kmeans(X, 10, { seed: 21, nInit: 4 });
    const rng = new Rng(21);
    let bestSingle = Infinity;
    for (let r = 0; r < 4; r++) {
      const init = kmeansPlusPlus(X, 10, { rng: rng.fork(`kmeans++/${r}`), sampleSize: 40_000 });
      bestSingle = Math.min(bestSingle, kmeans(X, 10, { init }).inertia);
    }
    expect(multi.inertia).toBe(bestSingle);
  });

  it("kmeans rejects bad input with messages that quote the value", () => {
    expect(() => kmeans(iris, 200)).toThrow(InputError);
    expect(() => kmeans(iris, 200)).toThrow("n_samples=150 should be >= n_clusters=200");
    expect(() => kmeans(iris, 3, { maxIter: 0 })).toThrow("maxIter=0 should be an integer >= 1");
    const bad = { data: Float64Array.from(iris.data), rows: 150, cols: 4 };
    bad.data[7 * 4 + 2] = NaN;
    expect(() => kmeans(bad, 3)).toThrow("X: row 7, column 2 is NaN; expected a finite number");
    expect(() => kmeans(iris, 3, { weights: new Float64Array(3) })).toThrow("weights.length=3 should equal n_samples=150");
    // @ts-expect-error -- testing a wrong literal
    expect(() => kmeans(iris, 3, { algorithm: "fast" })).toThrow('algorithm="fast" should be "hamerly" or "lloyd"');
  });

  it("kmeans reports non-convergence as a warning, not an error", () => {
    const { X } = makeBlobs(2000, 4, 6, { seed: 8, std: 3, box: 4 });
    const r = kmeans(X, 6, { seed: 1, maxIter: 1, nInit: 1 });
    expect(r.converged).toBe(false);
    expect(r.iterations).toBe(1);
    expect(r.warnings).toContain("did not converge within maxIter=1 iterations");
  });
});
