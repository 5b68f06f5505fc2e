import { describe, expect, it } from "vitest";
import { map2d, membership, pca } from "../src/embed/index.js";
import { silhouette } from "../src/cluster/index.js";
import type { Matrix } from "../src/core/matrix.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";

describe("map2d", () => {
  it("map2d(X, {method: 'pca'}) is the first two principal component scores", () => {
    const { X } = loadIris();
    const m = map2d(X, { method: "pca" });
    const p = pca(X, 2);
    expect(Array.from(m.coords.data)).toEqual(Array.from(p.scores.data));
    expect(m.fittedOn).toBe(150);
  });

  it("map2d UMAP on all rows is seeded (same seed, same bytes) and keeps blobs apart", () => {
    const { X, truth } = makeBlobs(600, 10, 4, { seed: 2, std: 1, box: 8 });
    const a = map2d(X, { method: "umap", seed: 5, nEpochs: 100 });
    const b = map2d(X, { method: "umap", seed: 5, nEpochs: 100 });
    expect(Buffer.from(a.coords.data.buffer).equals(Buffer.from(b.coords.data.buffer))).toBe(true);
    expect(a.fittedOn).toBe(600);
    expect(a.placement).toBe("");
    // Well-separated blobs stay separated in the map: high silhouette of the true labels in 2-D
    // (UMAP preserves local neighbourhoods; McInnes et al. 2018).
    expect(silhouette(a.coords, truth)).toBeGreaterThan(0.7);
  });

  it("map2d UMAP on a sample places the other rows next to their sampled neighbours", () => {
    const { X, truth } = makeBlobs(5000, 8, 5, { seed: 4, std: 1, box: 8 });
    const m = map2d(X, { method: "umap", seed: 1, sampleSize: 800, nEpochs: 100 });
    expect(m.fittedOn).toBe(800);
    expect(m.placement).toContain("membership-weighted mean");
    expect(m.coords.rows).toBe(5000);
    for (const v of m.coords.data) expect(Number.isFinite(v)).toBe(true);
    expect(silhouette(m.coords, truth, { sampleSize: 2000 })).toBeGreaterThan(0.7);
  });

  it("membership weights follow UMAP's smooth-kNN rule: they sum to log2(k), the nearest gets 1", () => {
    // McInnes et al. 2018, §3.1 (definition of rho and sigma).
    const dist = new Float64Array([0.5, 0.7, 0.8, 1.2, 2.0, 2.1, 3.5, 4.0]);
    const w = membership(dist, 8);
    expect(w[0]).toBe(1);
    expect(w.reduce((a, b) => a + b, 0)).toBeCloseTo(3, 4);
    for (let j = 1; j < 8; j++) expect(w[j]!).toBeLessThanOrEqual(w[j - 1]!);
  });

  it("map2d falls back to PCA with a warning when there are too few rows for UMAP", () => {
    const X: Matrix = { data: new Float64Array([0, 0, 1, 1, 2, 0, 3, 1]), rows: 4, cols: 2 };
    const m = map2d(X, { method: "umap" });
    expect(m.method).toBe("pca");
    expect(m.warnings[0]).toContain("UMAP needs more than nNeighbors=15 rows");
  });
});
