import type { Matrix } from "../core/matrix.js";
import { pcaTransform } from "../embed/pca.js";
import { applyStandardization } from "../embed/scale.js";
import { assign } from "./assign.js";
import { checkModelFeatures, type ClusteringModel } from "./clusteringModel.js";

/** What assignScenarios needs of an embedding: the physical-unit features and their names. */
export interface EmbeddingFeatures {
  raw: Matrix;
  features: readonly { name: string }[];
}

export interface AssignScenariosResult {
  /** As the pipeline labels: the nearest k-means centre, or −1 where the DBSCAN model calls the row noise. */
  labels: Int32Array;
  /** The nearest k-means centre for every row (also for the −1 rows). */
  cluster: Int32Array;
  /** Distance to that centre, in the standardized space. */
  distance: Float64Array;
  /** Distance / the cluster's 95th-percentile training distance (> 1: farther out than 95 % of its own rows). */
  novelty: Float64Array;
  /** Distance to the nearest DBSCAN core row / eps (> 1: in no dense region); null without DBSCAN. */
  densityNovelty: Float64Array | null;
  /**
   * Flagged as a new kind of scenario: DBSCAN noise (label −1) when the model has DBSCAN — the rule
   * that made training rows rare — otherwise k-means novelty above 1.
   */
  novel: Uint8Array;
  warnings: string[];
}

/**
 * Put scenarios into the clusters of a fitted clustering stage: the model's standardization applied
 * to the physical-unit features (not the new scenarios' own), the nearest k-means centre, then — when
 * the model has DBSCAN — the PCA projection and the DBSCAN border rule (within eps of a core row,
 * Ester et al. 1996), noise → −1. The same arithmetic as fitting, so on the training scenarios the
 * labels are the fitted labels exactly. The model does not change.
 */
export function assignScenarios(model: ClusteringModel, embedding: EmbeddingFeatures): AssignScenariosResult {
  checkModelFeatures(model, embedding.features.map((f) => f.name));
  const X = applyStandardization(embedding.raw, model.standardization);
  const km = assign(model.kmeans, X);
  const n = X.rows;
  const labels = Int32Array.from(km.labels);
  const warnings = [...km.warnings];
  const novel = new Uint8Array(n);
  let densityNovelty: Float64Array | null = null;
  if (model.pca && model.dbscan) {
    const scores = pcaTransform(model.pca, X);
    const db = assign(model.dbscan, scores);
    warnings.push(...db.warnings);
    densityNovelty = db.novelty;
    for (let i = 0; i < n; i++)
      if (db.labels[i] === -1) {
        labels[i] = -1;
        novel[i] = 1;
      }
  } else for (let i = 0; i < n; i++) novel[i] = km.novelty[i]! > 1 ? 1 : 0;
  return { labels, cluster: km.labels, distance: km.distance, novelty: km.novelty, densityNovelty, novel, warnings };
}
