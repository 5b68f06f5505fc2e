import { describe, expect, it } from "vitest";
import { sweepK } from "../src/cluster/index.js";
import { makeBlobs } from "./helpers/blobs.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping the scikit-learn check of the sampled silhouette: ${missing}`);

describe("sweepK on a sample (large inputs)", () => {
  // Blobs that touch (std 1.2 in a box of ±6) so that silhouettes vary from row to row and the
  // sampling error is visible, yet every seed finds the same 5-cluster partition; 5 true centres
  // (the generator's ground truth).
  const N = 6000;
  const { X } = makeBlobs(N, 4, 5, { seed: 21, std: 1.2, box: 6 });

  it("fits on the stated sample, states the silhouette sample, and still finds the generator's k", () => {
    // Well separated (std 0.8 in ±10, as the exact sweepK test): the silhouette peaks at the true k.
    const sep = makeBlobs(N, 4, 5, { seed: 13, std: 0.8, box: 10 }).X;
    const r = sweepK(sep, { kMin: 2, kMax: 7, seed: 3, fitSampleSize: 2000, silhouetteSampleSize: 600 });
    expect(r.fitSample).toBe(2000);
    expect(r.silhouetteSample).toBe(600);
    expect(r.silhouetteExact).toBe(false);
    for (const row of r.rows) expect(row.silhouetteSe).toBeGreaterThan(0);
    expect(r.suggestedK).toBe(5); // makeBlobs' 5 centres
  });

  it("exact inputs keep silhouetteSe = 0 and fitSample = n", () => {
    const small = makeBlobs(300, 3, 3, { seed: 2, std: 0.5, box: 8 }).X;
    const r = sweepK(small, { kMin: 2, kMax: 4, seed: 1 });
    expect(r.fitSample).toBe(300);
    expect(r.silhouetteExact).toBe(true);
    for (const row of r.rows) expect(row.silhouetteSe).toBe(0);
  });

  it.skipIf(missing !== null)("the stated standard error matches the spread of the sampled silhouette around scikit-learn's exact value", () => {
    // At k = 5 every seed recovers the same partition of these blobs, so sampled silhouettes differ
    // by sampling alone. Reference: scikit-learn's KMeans(5) on all N rows scored by
    // sklearn.metrics.silhouette_score on all N rows (Rousseeuw 1987). The spread across 30 seeds should match the mean stated SE (the sd
    // of a sample sd from 30 draws is about 13 %, so ±30 % is a loose but failing-capable bound; the
    // plain sd/√m, which ignores that each row is scored against the sample, gave 0.0082 here against a
    // spread of 0.0118 and fails it).
    const estimates: number[] = [];
    const ses: number[] = [];
    for (let seed = 0; seed < 30; seed++) {
      const r = sweepK(X, { kMin: 5, kMax: 5, seed, fitSampleSize: N, silhouetteSampleSize: 400 });
      estimates.push(r.rows[0]!.silhouette);
      ses.push(r.rows[0]!.silhouetteSe);
    }
    const ws = new PyWorkspace();
    let exact: number;
    try {
      ws.writeF64("X.bin", X.data);
      exact = ws.run<number>(`
from sklearn.cluster import KMeans
from sklearn.metrics import silhouette_score
X = np.fromfile(DIR + '/X.bin').reshape(${N}, 4)
L = KMeans(5, n_init=10, random_state=0).fit(X).labels_
print(json.dumps(float(silhouette_score(X, L))))`);
    } finally {
      ws.dispose();
    }
    const mean = estimates.reduce((a, b) => a + b, 0) / estimates.length;
    const sd = Math.sqrt(estimates.reduce((a, b) => a + (b - mean) ** 2, 0) / (estimates.length - 1));
    const meanSe = ses.reduce((a, b) => a + b, 0) / ses.length;
    console.log(`sampled silhouette: mean ${mean.toFixed(4)}, sd ${sd.toFixed(4)}, stated SE ${meanSe.toFixed(4)}; exact (scikit-learn) ${exact.toFixed(4)}`);
    expect(Math.abs(mean - exact)).toBeLessThan((3 * meanSe) / Math.sqrt(estimates.length) + 0.01);
    expect(sd / meanSe).toBeGreaterThan(0.7);
    expect(sd / meanSe).toBeLessThan(1.3);
    for (const e of estimates) expect(Math.abs(e - exact)).toBeLessThan(4 * meanSe + 0.01);
  });
});
