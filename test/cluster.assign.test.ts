import { describe, expect, it } from "vitest";
import { assign, dbscan, dbscanModel, kmeans, kmeansModel, modelFromJSON, modelToJSON } from "../src/cluster/index.js";
import { InputError } from "../src/core/errors.js";
import type { Matrix } from "../src/core/matrix.js";
import { fromRows } from "../src/core/matrix.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping scikit-learn comparisons: ${missing}`);
const iris = loadIris().X;

describe("assign to a k-means model", () => {
  const fit = kmeans(iris, 3, { seed: 4 });
  const model = kmeansModel(iris, fit);

  it("assigning the training rows gives back the fitted labels (nearest centroid)", () => {
    const a = assign(model, iris);
    expect(Array.from(a.labels)).toEqual(Array.from(fit.labels));
    // Novelty > 1 for about 5 % of rows: the scale is each cluster's 95th-percentile distance.
    const far = a.novelty.filter((v) => v > 1).length;
    expect(far).toBeGreaterThanOrEqual(3);
    expect(far).toBeLessThanOrEqual(10);
  });

  it.skipIf(missing !== null)("assign equals scikit-learn KMeans.predict and transform distances", () => {
    const { X: fresh } = makeBlobs(300, 4, 3, { seed: 9, std: 1.5, box: 4 });
    const ws = new PyWorkspace();
    try {
      ws.writeF64("X.bin", iris.data);
      ws.writeF64("C.bin", model.centroids.data);
      ws.writeF64("N.bin", fresh.data);
      const sk = ws.run<{ labels: number[]; dist: number[] }>(`
from sklearn.cluster import KMeans
X = np.fromfile(DIR + '/X.bin').reshape(150, 4)
C = np.fromfile(DIR + '/C.bin').reshape(3, 4)
N = np.fromfile(DIR + '/N.bin').reshape(-1, 4)
km = KMeans(n_clusters=3, init=C, n_init=1, max_iter=1).fit(X)
km.cluster_centers_ = C  # the exact fitted centres
print(json.dumps({'labels': km.predict(N).tolist(), 'dist': km.transform(N).min(axis=1).tolist()}))
`);
      const a = assign(model, fresh);
      expect(Array.from(a.labels)).toEqual(sk.labels);
      for (let i = 0; i < fresh.rows; i++) expect(a.distance[i]).toBeCloseTo(sk.dist[i]!, 10);
    } finally {
      ws.dispose();
    }
  });

  it("a scenario far from every centroid gets a high novelty score", () => {
    const a = assign(model, fromRows([[5.0, 3.4, 1.5, 0.2], [30, 30, 30, 30]]));
    expect(a.novelty[0]).toBeLessThan(1);
    expect(a.novelty[1]).toBeGreaterThan(10);
  });
});

describe("assign to a DBSCAN model", () => {
  it("assigning the training rows reproduces dbscan's labels, noise included (Iris eps 0.5)", () => {
    const fit = dbscan(iris, { eps: 0.5, minPts: 5 });
    const model = dbscanModel(iris, fit);
    const a = assign(model, iris);
    expect(Array.from(a.labels)).toEqual(Array.from(fit.labels));
    for (let i = 0; i < iris.rows; i++) {
      if (fit.core[i]) expect(a.distance[i]).toBe(0);
      if (fit.labels[i]! < 0) expect(a.novelty[i]).toBeGreaterThan(1);
    }
  });

  it("a new row within eps of a core row joins its cluster, one beyond is noise", () => {
    const X = fromRows([[0, 0], [0.1, 0], [0.2, 0], [0.3, 0], [5, 5]]);
    const model = dbscanModel(X, dbscan(X, { eps: 0.5, minPts: 3 }));
    const a = assign(model, fromRows([[0.8, 0], [0.81, 0], [5, 5]]));
    expect(Array.from(a.labels)).toEqual([0, -1, -1]);
    expect(a.novelty[0]).toBeCloseTo(1, 12);
  });
});

describe("model JSON", () => {
  it("modelToJSON/modelFromJSON round-trip both kinds exactly", () => {
    const km = kmeansModel(iris, kmeans(iris, 3, { seed: 1 }));
    const db = dbscanModel(iris, dbscan(iris, { eps: 0.5, minPts: 5 }));
    for (const m of [km, db]) {
      const back = modelFromJSON(modelToJSON(m));
      expect(back).toEqual(m);
      expect(Array.from(assign(back, iris).labels)).toEqual(Array.from(assign(m, iris).labels));
    }
  });

  it("modelFromJSON names the bad field", () => {
    const text = modelToJSON(kmeansModel(iris, kmeans(iris, 3, { seed: 1 })));
    const o = JSON.parse(text);
    o.scale = [1, 2];
    expect(() => modelFromJSON(JSON.stringify(o), "model.json")).toThrow(InputError);
    expect(() => modelFromJSON(JSON.stringify(o), "model.json")).toThrow('model.json, column "scale"');
    expect(() => modelFromJSON("{", "m.json")).toThrow("not valid JSON");
    const wrong: Matrix = { data: new Float64Array(3), rows: 1, cols: 3 };
    expect(() => assign(kmeansModel(iris, kmeans(iris, 3, { seed: 1 })), wrong)).toThrow("X has 3 columns; the model was fitted on 4");
  });
});
