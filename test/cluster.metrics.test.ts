import { describe, expect, it } from "vitest";
import { calinskiHarabasz, daviesBouldin, kmeans, silhouette, silhouetteDetail, sweepK } from "../src/cluster/index.js";
import type { Matrix } from "../src/core/matrix.js";
import { Rng } from "../src/core/rng.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping scikit-learn comparisons: ${missing}`);

const iris = loadIris().X;
const irisInit: Matrix = { data: new Float64Array([5.1, 3.5, 1.4, 0.2, 7.0, 3.2, 4.7, 1.4, 6.3, 3.3, 6.0, 2.5]), rows: 3, cols: 4 };

/** Silhouette straight from the definition (Rousseeuw 1987), O(n²) with no tricks. */
function referenceSilhouette(X: Matrix, labels: Int32Array): number {
  const n = X.rows;
  const d = X.cols;
  const dist = (a: number, b: number): number => {
    let s = 0;
    for (let t = 0; t < d; t++) s += (X.data[a * d + t]! - X.data[b * d + t]!) ** 2;
    return Math.sqrt(s);
  };
  const ks = [...new Set(labels)].filter((l) => l >= 0);
  let total = 0;
  let count = 0;
  for (let i = 0; i < n; i++) {
    if (labels[i]! < 0) continue;
    const mean = new Map<number, number>();
    for (const c of ks) {
      let s = 0;
      let m = 0;
      for (let j = 0; j < n; j++)
        if (j !== i && labels[j] === c) {
          s += dist(i, j);
          m++;
        }
      mean.set(c, m > 0 ? s / m : NaN);
    }
    const own = labels.filter((l) => l === labels[i]).length;
    count++;
    if (own === 1) continue;
    const a = mean.get(labels[i]!)!;
    const b = Math.min(...ks.filter((c) => c !== labels[i]).map((c) => mean.get(c)!));
    total += (b - a) / Math.max(a, b);
  }
  return total / count;
}

describe("cluster quality indices on Iris k=3", () => {
  const r = kmeans(iris, 3, { init: irisInit });

  it("silhouette, Calinski–Harabasz and Davies–Bouldin match the issue's scikit-learn values", () => {
    // Values stated in the issue for scikit-learn's copy of Iris with KMeans k=3.
    const s = silhouetteDetail(iris, r.labels);
    expect(silhouette(iris, r.labels)).toBe(s.score); // a number, like the other two indices
    expect(s.exact).toBe(true);
    expect(s.sampleSize).toBe(150);
    expect(s.score).toBeCloseTo(0.552819, 6);
    expect(calinskiHarabasz(iris, r.labels)).toBeCloseTo(561.6278, 4);
    expect(daviesBouldin(iris, r.labels)).toBeCloseTo(0.661972, 6);
    expect(s.score).toBeCloseTo(referenceSilhouette(iris, r.labels), 12);
  });

  it.skipIf(missing !== null)("all three equal scikit-learn's metrics live, also with noise rows left out", () => {
    // Mark 10 rows as noise (-1); scikit-learn gets the same rows removed.
    const withNoise = Int32Array.from(r.labels);
    for (let i = 0; i < 150; i += 15) withNoise[i] = -1;
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", iris.data);
      ws.writeF64("L.bin", Float64Array.from(r.labels));
      ws.writeF64("N.bin", Float64Array.from(withNoise));
      const sk = ws.run<number[]>(`
from sklearn.metrics import silhouette_score, calinski_harabasz_score, davies_bouldin_score
X = np.fromfile(DIR + '/X.bin').reshape(150, 4)
out = []
for f in ['L', 'N']:
    L = np.fromfile(DIR + '/' + f + '.bin').astype(int)
    keep = L >= 0
    out += [silhouette_score(X[keep], L[keep]), calinski_harabasz_score(X[keep], L[keep]), davies_bouldin_score(X[keep], L[keep])]
print(json.dumps(out))
`);
      const got = [r.labels, withNoise].flatMap((L) => [silhouette(iris, L), calinskiHarabasz(iris, L), daviesBouldin(iris, L)]);
      for (let i = 0; i < got.length; i++) expect(Math.abs(got[i]! - sk[i]!) / Math.abs(sk[i]!)).toBeLessThan(1e-10);
    } finally {
      ws.dispose();
    }
  });

  it("silhouetteDetail(X, labels, {sampleSize}) samples reproducibly and says so", () => {
    const { X, truth } = makeBlobs(3000, 5, 4, { seed: 3 });
    const a = silhouetteDetail(X, truth, { sampleSize: 500, seed: 2 });
    const b = silhouetteDetail(X, truth, { sampleSize: 500, seed: 2 });
    expect(a.exact).toBe(false);
    expect(a.sampleSize).toBe(500);
    expect(a.score).toBe(b.score);
    const full = silhouetteDetail(X, truth, { sampleSize: 3000 });
    expect(full.exact).toBe(true);
    // A 500-row sample estimates the full score closely on well-separated blobs.
    expect(Math.abs(a.score - full.score)).toBeLessThan(0.02);
  });

  it("metrics reject a single cluster with a clear message", () => {
    expect(() => silhouette(iris, new Int32Array(150))).toThrow("silhouette needs 2 <= n_labels <= n_samples - 1");
    expect(() => calinskiHarabasz(iris, new Int32Array(150))).toThrow("n_labels");
  });
});

describe("sweepK", () => {
  it("sweepK on 5 separated blobs suggests k=5 and states its rule and silhouette sample", () => {
    const { X } = makeBlobs(2000, 4, 5, { seed: 13, std: 0.8, box: 10 });
    const r = sweepK(X, { kRange: [2, 8], seed: 1, silhouetteSampleSize: 800 });
    expect(r.rows.map((x) => x.k)).toEqual([2, 3, 4, 5, 6, 7, 8]);
    expect(r.suggestedK).toBe(5);
    expect(r.silhouetteSample).toBe(800);
    expect(r.silhouetteExact).toBe(false);
    expect(r.rule).toContain("silhouette");
    // Inertia never rises with k on these blobs; CH peaks and DB bottoms at the true k.
    const at = (k: number) => r.rows.find((x) => x.k === k)!;
    expect(at(5).inertia).toBeLessThan(at(4).inertia);
    const bestCH = r.rows.reduce((a, b) => (b.calinskiHarabasz > a.calinskiHarabasz ? b : a));
    const bestDB = r.rows.reduce((a, b) => (b.daviesBouldin < a.daviesBouldin ? b : a));
    expect(bestCH.k).toBe(5);
    expect(bestDB.k).toBe(5);
  });

  it("sweepK rows equal kmeans with the per-k generator rng.fork(`k=${k}`) scored by the metric functions", () => {
    // kMin / kMax: the deprecated spelling of kRange, still accepted for one version.
    const r = sweepK(iris, { kMin: 2, kMax: 4, seed: 5 });
    expect(r.silhouetteExact).toBe(true);
    expect(r.silhouetteSample).toBe(150);
    const rng = new Rng(5);
    for (const row of r.rows) {
      const km = kmeans(iris, row.k, { rng: rng.fork(`k=${row.k}`) });
      expect(row.inertia).toBe(km.inertia);
      expect(row.silhouette).toBeCloseTo(silhouette(iris, km.labels), 12);
      expect(row.calinskiHarabasz).toBe(calinskiHarabasz(iris, km.labels));
      expect(row.daviesBouldin).toBe(daviesBouldin(iris, km.labels));
    }
    // Iris: k=2 has the highest silhouette (0.681 for k=2 vs 0.553 for k=3, scikit-learn docs' example values, from memory).
    expect(r.suggestedK).toBe(2);
  });
});
