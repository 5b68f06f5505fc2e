import { readFile } from "node:fs/promises";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import type { Matrix } from "../core/matrix.js";
import { VERSION } from "../core/version.js";
import type { Standardization } from "../embed/scale.js";
import type { DbscanModel, KMeansModel } from "./model.js";

/**
 * The fitted clustering stage: everything `assignScenarios` needs to put new scenarios into the
 * clusters of a finished run, without the training data.
 */
export interface ClusteringModel {
  /** Embedding column names, in order: new scenarios must be embedded with exactly these. */
  features: string[];
  /** Per column x' = (x − mean) / scale · weight, fitted on the training scenarios (embed/scale.ts). */
  standardization: Standardization;
  k: number;
  kChosenBy: "silhouette" | "given";
  /**
   * What the training scenarios looked like, to compare new recordings with: their number, and the
   * share of their weight (km or hours, see extraction.weightBy; rows when unweighted) per final
   * label — per k-means cluster after DBSCAN noise left it, and the noise (label −1).
   */
  training: { rows: number; clusterShare: Float64Array; noiseShare: number };
  /** k-means centres in the standardized space, with the novelty scale per cluster. */
  kmeans: KMeansModel;
  /** PCA that DBSCAN ran on: mean and the leading components (null when DBSCAN was off). */
  pca: { mean: Float64Array; components: Matrix; explainedVariance: number } | null;
  /** DBSCAN core rows in PCA scores, with eps and minPts (null when DBSCAN was off). */
  dbscan: DbscanModel | null;
  /**
   * How the training scenarios were cut and embedded (maneuver, scene, scenario, embedding options
   * and the weighting), so that new recordings are treated the same way. Set by the pipeline; null
   * when the model was fitted outside it. Kept as plain JSON.
   */
  extraction: Record<string, unknown> | null;
  /**
   * Reserved for the per-class models of the logical scenarios (src/logical/, per-class
   * standardization and centres). This module writes it back unchanged and does not validate it:
   * its owner's loader does. Absent when no logical model was fitted.
   */
  logical?: unknown;
}

export const CLUSTERING_MODEL_FORMAT = "roadsieve/clustering-model";
export const CLUSTERING_MODEL_VERSION = 1;

const mat = (x: Matrix) => ({ rows: x.rows, cols: x.cols, data: Array.from(x.data) });

/**
 * The model as JSON text: fixed key order, numbers as JavaScript's shortest round-trip form, so the
 * same model gives the same bytes and reading it back gives the same doubles.
 */
export function clusteringModelToJson(model: ClusteringModel): string {
  const o: Record<string, unknown> = {
    format: CLUSTERING_MODEL_FORMAT,
    formatVersion: CLUSTERING_MODEL_VERSION,
    writtenBy: `roadsieve ${VERSION}`,
    features: model.features,
    standardization: {
      mean: Array.from(model.standardization.mean),
      scale: Array.from(model.standardization.scale),
      weight: Array.from(model.standardization.weight),
    },
    k: model.k,
    kChosenBy: model.kChosenBy,
    training: { rows: model.training.rows, clusterShare: Array.from(model.training.clusterShare), noiseShare: model.training.noiseShare },
    kmeans: { centroids: mat(model.kmeans.centroids), scale: Array.from(model.kmeans.scale), inertia: model.kmeans.inertia },
    pca: model.pca ? { mean: Array.from(model.pca.mean), components: mat(model.pca.components), explainedVariance: model.pca.explainedVariance } : null,
    dbscan: model.dbscan
      ? { eps: model.dbscan.eps, minPts: model.dbscan.minPts, nClusters: model.dbscan.nClusters, core: mat(model.dbscan.core), coreLabels: Array.from(model.dbscan.coreLabels) }
      : null,
    extraction: model.extraction,
  };
  if (model.logical !== undefined) o.logical = model.logical;
  return JSON.stringify(o) + "\n";
}

/**
 * Read a model written by clusteringModelToJson; every field is checked and a bad one is named.
 * With `expectFeatures` (the embedding's column names) a model fitted on other features is an
 * InputError saying which names differ.
 */
export function clusteringModelFromJson(text: string, file?: string, expectFeatures?: readonly string[]): ClusteringModel {
  let root: unknown;
  try {
    root = JSON.parse(text);
  } catch (e) {
    throw new InputError(`not valid JSON: ${(e as Error).message}`, { file });
  }
  const fail = (field: string, expected: string, value?: unknown): never => {
    throw new InputError(`field "${field}" should be ${expected}`, { file, column: field, value: value === undefined ? undefined : JSON.stringify(value)?.slice(0, 80) });
  };
  const obj = (v: unknown, field: string): Record<string, unknown> => {
    if (!v || typeof v !== "object" || Array.isArray(v)) fail(field, "an object", v);
    return v as Record<string, unknown>;
  };
  const o = obj(root, "(top level)");
  if (o.format !== CLUSTERING_MODEL_FORMAT) fail("format", JSON.stringify(CLUSTERING_MODEL_FORMAT) + " (is this a roadsieve model.json?)", o.format);
  if (o.formatVersion !== CLUSTERING_MODEL_VERSION)
    fail("formatVersion", `${CLUSTERING_MODEL_VERSION}; this roadsieve reads version ${CLUSTERING_MODEL_VERSION} only (rerun the plan to write a new model)`, o.formatVersion);
  const num = (v: unknown, field: string, min: number): number => {
    if (typeof v !== "number" || !Number.isFinite(v) || v < min) fail(field, `a finite number >= ${min}`, v);
    return v as number;
  };
  const int = (v: unknown, field: string, min: number): number => {
    if (!Number.isInteger(v) || (v as number) < min) fail(field, `an integer >= ${min}`, v);
    return v as number;
  };
  const nums = (v: unknown, field: string, length: number): Float64Array => {
    if (!Array.isArray(v) || v.length !== length || !v.every((x) => typeof x === "number" && Number.isFinite(x)))
      fail(field, `an array of ${length} finite numbers`, Array.isArray(v) ? `array of ${v.length}` : v);
    return Float64Array.from(v as number[]);
  };
  const matrix = (v: unknown, field: string, cols: number): Matrix => {
    const m = obj(v, field);
    const rows = int(m.rows, `${field}.rows`, 0);
    if (m.cols !== cols) fail(`${field}.cols`, `${cols} (the model's dimension)`, m.cols);
    return { rows, cols, data: nums(m.data, `${field}.data`, rows * cols) };
  };

  if (!Array.isArray(o.features) || o.features.length === 0 || !o.features.every((f) => typeof f === "string"))
    fail("features", "a non-empty array of feature names", o.features);
  const features = o.features as string[];
  const d = features.length;
  const st = obj(o.standardization, "standardization");
  const standardization: Standardization = {
    mean: nums(st.mean, "standardization.mean", d),
    scale: nums(st.scale, "standardization.scale", d),
    weight: nums(st.weight, "standardization.weight", d),
  };
  for (const s of standardization.scale) if (!(s > 0)) fail("standardization.scale", "positive numbers", s);
  const k = int(o.k, "k", 1);
  if (o.kChosenBy !== "silhouette" && o.kChosenBy !== "given") fail("kChosenBy", `"silhouette" or "given"`, o.kChosenBy);
  const tr = obj(o.training, "training");
  const training = { rows: int(tr.rows, "training.rows", 1), clusterShare: nums(tr.clusterShare, "training.clusterShare", k), noiseShare: num(tr.noiseShare, "training.noiseShare", 0) };
  const kmo = obj(o.kmeans, "kmeans");
  const centroids = matrix(kmo.centroids, "kmeans.centroids", d);
  if (centroids.rows !== k) fail("kmeans.centroids.rows", `k = ${k}`, centroids.rows);
  const kmeansPart: KMeansModel = { kind: "kmeans", centroids, scale: nums(kmo.scale, "kmeans.scale", k), inertia: num(kmo.inertia, "kmeans.inertia", 0) };
  for (const s of kmeansPart.scale) if (s < 0) fail("kmeans.scale", "numbers >= 0", s);

  let pcaPart: ClusteringModel["pca"] = null;
  let dbPart: DbscanModel | null = null;
  // DBSCAN runs on the PCA scores: both are there or neither. Name the one that is missing.
  if (o.pca === null && o.dbscan !== null) fail("pca", "the PCA that dbscan runs on (an object), since dbscan is set", null);
  if (o.pca !== null && o.dbscan === null) fail("dbscan", "an object, since pca is set (DBSCAN runs on its scores)", null);
  if (o.pca !== null) {
    const p = obj(o.pca, "pca");
    const components = matrix(p.components, "pca.components", d);
    if (components.rows < 1) fail("pca.components.rows", "at least 1", components.rows);
    pcaPart = { mean: nums(p.mean, "pca.mean", d), components, explainedVariance: num(p.explainedVariance, "pca.explainedVariance", 0) };
    const q = obj(o.dbscan, "dbscan");
    const core = matrix(q.core, "dbscan.core", components.rows);
    const nClusters = int(q.nClusters, "dbscan.nClusters", 0);
    if (!Array.isArray(q.coreLabels) || q.coreLabels.length !== core.rows || !q.coreLabels.every((l) => Number.isInteger(l) && l >= 0 && l < nClusters))
      fail("dbscan.coreLabels", `${core.rows} integers in [0, nClusters = ${nClusters})`, Array.isArray(q.coreLabels) ? `array of ${q.coreLabels.length}` : q.coreLabels);
    dbPart = {
      kind: "dbscan",
      eps: num(q.eps, "dbscan.eps", Number.MIN_VALUE),
      minPts: int(q.minPts, "dbscan.minPts", 1),
      nClusters,
      core,
      coreLabels: Int32Array.from(q.coreLabels as number[]),
    };
  }
  if (o.extraction !== null && (typeof o.extraction !== "object" || Array.isArray(o.extraction))) fail("extraction", "an object or null", o.extraction);
  const model: ClusteringModel = {
    features,
    standardization,
    k,
    kChosenBy: o.kChosenBy as ClusteringModel["kChosenBy"],
    training,
    kmeans: kmeansPart,
    pca: pcaPart,
    dbscan: dbPart,
    extraction: (o.extraction ?? null) as Record<string, unknown> | null,
  };
  if (o.logical !== undefined) model.logical = o.logical;
  if (expectFeatures) checkModelFeatures(model, expectFeatures, file);
  return model;
}

/** Throw an InputError naming how the embedding's features differ from the model's. */
export function checkModelFeatures(model: Pick<ClusteringModel, "features">, names: readonly string[], where?: string): void {
  const a = model.features;
  const prefix = where ? `${where}: ` : "";
  if (a.length === names.length && a.every((f, j) => f === names[j])) return;
  const inModel = new Set(a);
  const inEmb = new Set(names);
  const missing = a.filter((f) => !inEmb.has(f));
  const extra = names.filter((f) => !inModel.has(f));
  const parts: string[] = [`the model was fitted on ${a.length} features, the scenarios have ${names.length}`];
  if (missing.length > 0) parts.push(`missing from the scenarios: ${list(missing)}`);
  if (extra.length > 0) parts.push(`not in the model: ${list(extra)}`);
  if (missing.length === 0 && extra.length === 0) {
    const j = a.findIndex((f, i) => f !== names[i]);
    parts.push(`same names in another order (column ${j}: "${names[j]}" here, "${a[j]}" in the model)`);
  }
  throw new InputError(
    `${prefix}the clustering model does not match these scenarios — ${parts.join("; ")}. The scenarios must be cut and embedded with the options the model was fitted with (its "extraction" field: the same scenario window and tensor length) by the same feature set; a model from another roadsieve version or other options needs a new plan run`,
  );
}

function list(names: string[]): string {
  return names.slice(0, 5).map((n) => `"${n}"`).join(", ") + (names.length > 5 ? ` and ${names.length - 5} more` : "");
}

/** Write the model as JSON (atomically). */
export async function saveClusteringModel(model: ClusteringModel, path: string): Promise<void> {
  await writeFileAtomic(path, clusteringModelToJson(model));
}

/**
 * Read and check a model file (InputError naming the file and the field on any problem; with
 * `expectFeatures`, also when the model's features differ from these names).
 */
export async function loadClusteringModel(path: string, expectFeatures?: readonly string[]): Promise<ClusteringModel> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the clustering model: ${(e as NodeJS.ErrnoException).code === "ENOENT" ? "no such file" : (e as Error).message}`, { file: path });
  }
  return clusteringModelFromJson(text, path, expectFeatures);
}
