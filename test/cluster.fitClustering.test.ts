import { mkdtempSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { assignScenarios } from "../src/cluster/assignScenarios.js";
import { clusteringModelFromJson, clusteringModelToJson, loadClusteringModel, saveClusteringModel } from "../src/cluster/clusteringModel.js";
import { fitClustering } from "../src/cluster/fitClustering.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { embedScenarios, type Embedding } from "../src/embed/features.js";
import { applyStandardization } from "../src/embed/scale.js";
import { scenarioWeights } from "../src/exposure/sampleWeights.js";
import { extractRecording } from "../src/pipeline/extractRecording.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";

// Training traffic and a held-out recording of the same fictional motorway (other generator seed).
const train = generateTraffic({ vehicleKm: 30, hardBrakingRate: 0.12, tightCutInRate: 0.12, positionNoiseSd: 0.1, recordingId: "fit" }, new Rng(21)).recording;
const held = generateTraffic({ vehicleKm: 12, hardBrakingRate: 0.12, tightCutInRate: 0.12, positionNoiseSd: 0.1, recordingId: "held" }, new Rng(22)).recording;
const xTrain = extractRecording(train, {});
const embedding = embedScenarios(xTrain.set);
const weights = scenarioWeights(xTrain.set.scenarios, "km");
const fit = fitClustering(embedding, { weights, seed: 3 });
const heldEmbedding = embedScenarios(extractRecording(held, {}).set);
const dir = mkdtempSync(join(tmpdir(), "roadsieve-model-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("fitClustering → assignScenarios on the training scenarios", () => {
  it("ran the whole policy: k chosen by the sweep, DBSCAN noise as −1, a medoid per cluster", () => {
    expect(fit.sweep).not.toBeNull();
    expect(fit.k).toBe(fit.sweep!.suggestedK);
    expect(fit.dbscan).not.toBeNull();
    const noise = Array.from(fit.labels).filter((l) => l === -1).length;
    expect(noise).toBe(Array.from(fit.dbscan!.labels).filter((l) => l === -1).length);
    expect(fit.model.pca!.components.rows).toBe(fit.dbscan!.components);
    // Training shares per final label: the km of each label over all km (computed here directly).
    const total = weights.reduce((a, v) => a + v, 0);
    for (let c = -1; c < fit.k; c++) {
      let w = 0;
      for (let i = 0; i < weights.length; i++) if (fit.labels[i] === c) w += weights[i]!;
      expect(c < 0 ? fit.model.training.noiseShare : fit.model.training.clusterShare[c]).toBeCloseTo(w / total, 12);
    }
  });

  it("reproduces the fitted labels exactly, k-means labels and DBSCAN noise included", () => {
    // The fit's labels are the reference: k-means labels match their final centres (Lloyd's rule,
    // as scikit-learn's KMeans.predict) and DBSCAN's border rule (Ester et al. 1996, Def. 2–5).
    const a = assignScenarios(fit.model, embedding);
    expect(Array.from(a.cluster)).toEqual(Array.from(fit.kmeans.labels));
    expect(Array.from(a.labels)).toEqual(Array.from(fit.labels));
    // Novel on the training rows = the rows the fit called rare (noise).
    for (let i = 0; i < a.labels.length; i++) expect(a.novel[i]).toBe(fit.labels[i] === -1 ? 1 : 0);
  });

  it("survives JSON: same bytes after a round trip, same labels from the loaded model", async () => {
    const text = clusteringModelToJson(fit.model);
    const back = clusteringModelFromJson(text);
    expect(clusteringModelToJson(back)).toBe(text);
    expect(Array.from(assignScenarios(back, embedding).labels)).toEqual(Array.from(fit.labels));
    const path = join(dir, "model.json");
    await saveClusteringModel({ ...fit.model, logical: { note: "kept as written" } }, path);
    const loaded = await loadClusteringModel(path);
    expect(loaded.logical).toEqual({ note: "kept as written" });
    expect(Array.from(assignScenarios(loaded, embedding).labels)).toEqual(Array.from(fit.labels));
  });

  it("uses the model's standardization, not the new scenarios' own", () => {
    // Same raw features, another standardization in the embedding object: the labels must not move.
    const other: Embedding = { ...embedding, mean: new Float64Array(embedding.mean.length), matrix: embedding.raw };
    expect(Array.from(assignScenarios(fit.model, other).labels)).toEqual(Array.from(fit.labels));
  });
});

describe("fitClustering without DBSCAN, k given", () => {
  it("labels are the k-means labels, the model has no PCA, and novelty > 1 flags the novel rows", () => {
    const f = fitClustering(embedding, { k: 4, dbscan: false, weights, seed: 3 });
    expect(f.sweep).toBeNull();
    expect(f.model.pca).toBeNull();
    expect(Array.from(f.labels)).toEqual(Array.from(f.kmeans.labels));
    const a = assignScenarios(clusteringModelFromJson(clusteringModelToJson(f.model)), embedding);
    expect(Array.from(a.labels)).toEqual(Array.from(f.labels));
    expect(a.densityNovelty).toBeNull();
    // The novelty scale is each cluster's 95th-percentile training distance (numpy "linear" quantile),
    // so about 5 % of the training rows lie beyond it (ties and small clusters make it inexact).
    const share = Array.from(a.novel).filter((v) => v === 1).length / a.novel.length;
    expect(share).toBeGreaterThan(0.01);
    expect(share).toBeLessThan(0.1);
  });
});

describe("assignScenarios on new scenarios", () => {
  it("equals a brute-force application of the definitions on a held-out recording", () => {
    const a = assignScenarios(fit.model, heldEmbedding);
    const X = applyStandardization(heldEmbedding.raw, fit.model.standardization);
    const { centroids } = fit.model.kmeans;
    const pcaM = fit.model.pca!;
    const db = fit.model.dbscan!;
    const d = X.cols;
    const c = pcaM.components.rows;
    for (let i = 0; i < X.rows; i++) {
      // Nearest centre (lowest index on ties).
      let best = 0;
      let bd = Infinity;
      for (let j = 0; j < centroids.rows; j++) {
        let s = 0;
        for (let t = 0; t < d; t++) s += (X.data[i * d + t]! - centroids.data[j * d + t]!) ** 2;
        if (s < bd) [bd, best] = [s, j];
      }
      expect(a.cluster[i]).toBe(best);
      // PCA scores (x − mean)·Vᵀ, then noise iff no core row within eps (Ester et al. 1996).
      const z = new Float64Array(c);
      for (let j = 0; j < c; j++) for (let t = 0; t < d; t++) z[j]! += (X.data[i * d + t]! - pcaM.mean[t]!) * pcaM.components.data[j * d + t]!;
      let nearest = Infinity;
      for (let r = 0; r < db.core.rows; r++) {
        let s = 0;
        for (let j = 0; j < c; j++) s += (z[j]! - db.core.data[r * c + j]!) ** 2;
        nearest = Math.min(nearest, Math.sqrt(s));
      }
      // Exact ties at eps are not expected with measured data; a margin keeps rounding out of it.
      if (Math.abs(nearest - db.eps) > 1e-9 * db.eps) expect(a.labels[i]).toBe(nearest > db.eps ? -1 : best);
      expect(a.densityNovelty![i]).toBeCloseTo(nearest / db.eps, 9);
    }
    // Traffic of the same kind is mostly not new: within a factor 3 of the training noise share
    // (loose on purpose: the held-out recording is small).
    const shareNovel = Array.from(a.novel).filter((v) => v === 1).length / a.novel.length;
    const shareNoise = Array.from(fit.labels).filter((l) => l === -1).length / fit.labels.length;
    expect(shareNovel).toBeLessThan(Math.max(0.05, 3 * shareNoise));
  });

  it("flags a scenario unlike any training scenario as novel", () => {
    // Ten times every physical feature of a real scenario (400 km/h, ten times the gaps): no dense region.
    const raw = { data: heldEmbedding.raw.data.slice(0, heldEmbedding.raw.cols).map((v) => v * 10 + 50), rows: 1, cols: heldEmbedding.raw.cols };
    const a = assignScenarios(fit.model, { raw, features: heldEmbedding.features });
    expect(a.novel[0]).toBe(1);
    expect(a.labels[0]).toBe(-1);
    expect(a.novelty[0]).toBeGreaterThan(3);
  });
});

describe("a model that does not fit the scenarios", () => {
  it("rejects scenarios embedded with another tensor length, naming the counts and the features that differ", async () => {
    const other = embedScenarios(extractRecording(held, { scenario: { steps: 5 } }).set);
    let err: unknown;
    try {
      assignScenarios(fit.model, other);
    } catch (e) {
      err = e;
    }
    expect(err).toBeInstanceOf(InputError);
    const msg = (err as Error).message;
    expect(msg).toContain(`fitted on ${embedding.features.length} features, the scenarios have ${other.features.length}`);
    const missing = embedding.features.map((f) => f.name).find((f) => !other.features.some((g) => g.name === f))!;
    expect(msg).toContain(`"${missing}"`);
    // The same check on load, when the caller says which features it will pass; the file is named.
    const path = join(dir, "model-for-10-steps.json");
    await saveClusteringModel(fit.model, path);
    await expect(loadClusteringModel(path, other.features.map((f) => f.name))).rejects.toThrow(`${path}: the clustering model does not match`);
    await expect(loadClusteringModel(path, embedding.features.map((f) => f.name))).resolves.toBeTruthy();
  });

  it("rejects a damaged or foreign model file, naming the field", () => {
    const o = JSON.parse(clusteringModelToJson(fit.model)) as Record<string, unknown>;
    const cases: [Record<string, unknown>, string][] = [
      [{ ...o, formatVersion: 2 }, `"formatVersion"`],
      [{ ...o, format: "something-else" }, `"format"`],
      [{ ...o, features: (o.features as string[]).slice(1) }, `"standardization.mean"`],
      [{ ...o, k: (o.k as number) + 1 }, `"training.clusterShare"`],
      [{ ...o, training: { ...(o.training as object), clusterShare: [] }, k: 0 }, `"k"`],
      [{ ...o, dbscan: null }, `"dbscan"`],
    ];
    for (const [bad, field] of cases) expect(() => clusteringModelFromJson(JSON.stringify(bad), "plan/model.json")).toThrow(new RegExp(`^plan/model\\.json, column ${field.replace(/[.]/g, "\\.")}`));
    expect(() => clusteringModelFromJson("{", "m.json")).toThrow(/m\.json: not valid JSON/);
  });

  it("model.json bytes are fixed by the input and seed", () => {
    const again = fitClustering(embedding, { weights, seed: 3 });
    expect(clusteringModelToJson(again.model)).toBe(clusteringModelToJson(fit.model));
  });
});
