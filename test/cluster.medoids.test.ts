import { describe, expect, it } from "vitest";
import { medoids } from "../src/cluster/index.js";
import type { Matrix } from "../src/core/matrix.js";
import { Rng } from "../src/core/rng.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";

/** O(m²) brute force: every member's distance sum, lowest sum wins, ties to the lowest row. */
function bruteMedoids(X: Matrix, labels: Int32Array): { indices: number[]; sums: number[] } {
  const k = Math.max(-1, ...labels) + 1;
  const indices: number[] = [];
  const sums: number[] = [];
  for (let c = 0; c < k; c++) {
    const rows = [...labels.keys()].filter((i) => labels[i] === c);
    let best = Infinity;
    let bi = -1;
    for (const i of rows) {
      let s = 0;
      for (const j of rows) {
        let q = 0;
        for (let t = 0; t < X.cols; t++) q += (X.data[i * X.cols + t]! - X.data[j * X.cols + t]!) ** 2;
        s += Math.sqrt(q);
      }
      if (s < best) {
        best = s;
        bi = i;
      }
    }
    indices.push(bi);
    sums.push(best);
  }
  return { indices, sums };
}

describe("medoids", () => {
  it("medoid of all 150 Iris rows is row 61 with distance sum 284.8487", () => {
    // Values from the issue (Euclidean, scikit-learn's copy of Iris, 0-based row).
    const r = medoids(loadIris().X, new Int32Array(150));
    expect(r.indices[0]).toBe(61);
    expect(r.distanceSums[0]).toBeCloseTo(284.8487, 4);
    expect(r.sizes[0]).toBe(150);
  });

  it("medoids per Iris species equal brute force", () => {
    const { X, species } = loadIris();
    const r = medoids(X, species);
    const b = bruteMedoids(X, species);
    expect(Array.from(r.indices)).toEqual(b.indices);
    for (let c = 0; c < 3; c++) expect(r.distanceSums[c]).toBeCloseTo(b.sums[c]!, 9);
  });

  it("exact medoids equal a brute-force reference on random clusters (d = 1, 2, 5, 32; Gaussian, uniform, skewed)", () => {
    const rng = new Rng(31);
    for (const d of [1, 2, 5, 32]) {
      for (const shape of ["blobs", "uniform", "skewed"] as const) {
        const n = 1500;
        let X: Matrix;
        let labels: Int32Array;
        if (shape === "blobs") {
          const b = makeBlobs(n, d, 4, { seed: d * 7, std: 1.5, box: 3 });
          X = b.X;
          labels = b.truth;
        } else {
          X = { data: new Float64Array(n * d), rows: n, cols: d };
          for (let i = 0; i < n * d; i++) X.data[i] = shape === "uniform" ? rng.uniform(-1, 1) : Math.exp(2 * rng.normal());
          labels = Int32Array.from({ length: n }, () => rng.int(5));
        }
        const r = medoids(X, labels);
        const b = bruteMedoids(X, labels);
        expect(Array.from(r.indices), `${shape} d=${d}`).toEqual(b.indices);
        for (let c = 0; c < b.sums.length; c++) expect(Math.abs(r.distanceSums[c]! - b.sums[c]!) / b.sums[c]!).toBeLessThan(1e-12);
        // The bounds rule out most rows: far fewer full sums than rows.
        if (shape === "blobs") expect(r.evaluated.reduce((a, v) => a + v, 0)).toBeLessThan(n / 3);
      }
    }
  });

  it("clusters made of several separated blobs (the grouped-bound path) still give the brute-force medoid", () => {
    for (const d of [2, 8, 32]) {
      // 3 blobs of 400 rows each, all labelled as one cluster, plus a second single-blob cluster.
      const { X, truth } = makeBlobs(1600, d, 4, { seed: 40 + d, std: 1, box: 10 });
      const labels = Int32Array.from(truth, (t) => (t < 3 ? 0 : 1));
      const r = medoids(X, labels);
      const b = bruteMedoids(X, labels);
      expect(Array.from(r.indices), `d=${d}`).toEqual(b.indices);
      expect(Math.abs(r.distanceSums[0]! - b.sums[0]!) / b.sums[0]!).toBeLessThan(1e-12);
      expect(r.evaluated[0]!).toBeLessThan(400);
    }
  });

  it("medoids: ties go to the lowest row, noise (-1) is left out, tiny and empty clusters are handled", () => {
    // Rows 0 and 1 are identical (a tie), row 2 is noise far away, cluster 1 has one row, cluster 2 none.
    const X: Matrix = { data: new Float64Array([0, 0, 0, 0, 100, 100, 5, 5, 1, 0]), rows: 5, cols: 2 };
    const labels = new Int32Array([0, 0, -1, 1, 0]);
    const withEmpty = new Int32Array([0, 0, -1, 1, 0]);
    const r = medoids(X, labels);
    expect(Array.from(r.indices)).toEqual([0, 3]);
    expect(Array.from(r.distanceSums)).toEqual([1, 0]);
    const three = Int32Array.from(withEmpty);
    three[3] = 2; // cluster 1 now empty
    const r2 = medoids(X, three);
    expect(Array.from(r2.indices)).toEqual([0, -1, 3]);
    expect(r2.warnings).toEqual(["cluster 1 has no rows: no medoid"]);
  });
});
