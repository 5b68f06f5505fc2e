import { DEFAULTS } from "../core/defaults.js";
import { InputError } from "../core/errors.js";
import { zeros, type Matrix } from "../core/matrix.js";
import type { Progress } from "../core/progress.js";
import { Rng } from "../core/rng.js";
import type { Embedding } from "../embed/features.js";
import { pca } from "../embed/pca.js";
import type { ClusteringModel } from "./clusteringModel.js";
import { dbscan, type DbscanResult } from "./dbscan.js";
import { kmeans, type KMeansResult } from "./kmeans.js";
import { medoids as exactMedoids, type MedoidsResult } from "./medoids.js";
import { dbscanModel, kmeansModel } from "./model.js";
import { suggestEps, type SuggestEpsResult } from "./suggestEps.js";
import { sweepK, type SweepKResult } from "./sweepK.js";

/** The clustering policy's options (the pipeline passes its own `k`, `kRange`, `nInit`, `dbscan`). */
export interface ClusteringOptions {
  /** Number of k-means clusters; null (default) chooses k by silhouette over kRange. */
  k?: number | null;
  /** Range of k tried when k is null. Default [2, 12]. */
  kRange?: [number, number];
  /** k-means restarts. Default 4. */
  nInit?: number;
  /**
   * DBSCAN finds the rare scenarios: rows it calls noise leave their k-means cluster (label −1). It
   * runs on the first principal components of the embedding (enough for `variance` of the variance,
   * at most `maxComponents`), with minPts = 2·d (Schubert et al. 2017) and eps from the knee of the
   * k-distance curve unless given. false turns it off.
   */
  dbscan?: false | { eps?: number | null; minPts?: number | null; variance?: number; maxComponents?: number };
}

export interface ResolvedClusteringOptions {
  k: number | null;
  kRange: [number, number];
  nInit: number;
  dbscan: false | { eps: number | null; minPts: number | null; variance: number; maxComponents: number };
}

/** Defaults of the clustering policy; the pipeline uses the same table. */
export const CLUSTERING_DEFAULTS = {
  kRange: [DEFAULTS.kRange[0], DEFAULTS.kRange[1]] as [number, number],
  nInit: DEFAULTS.nInit,
  dbscanVariance: 0.9,
  dbscanMaxComponents: 8,
};

function bad(name: string, value: unknown, expected: string): never {
  throw new InputError(`${name}=${JSON.stringify(value)} should be ${expected}`);
}

/** Resolve defaults and check the clustering options once. Idempotent. */
export function resolveClusteringOptions(o: ClusteringOptions = {}): ResolvedClusteringOptions {
  const k = o.k ?? null;
  if (k !== null && !(Number.isInteger(k) && k >= 1)) bad("k", k, "an integer >= 1");
  const kRange = o.kRange ?? CLUSTERING_DEFAULTS.kRange;
  if (!(Array.isArray(kRange) && kRange.length === 2 && Number.isInteger(kRange[0]) && Number.isInteger(kRange[1]) && kRange[0] >= 2 && kRange[1] >= kRange[0]))
    bad("kRange", kRange, "[kMin, kMax] with 2 <= kMin <= kMax");
  const nInit = o.nInit ?? CLUSTERING_DEFAULTS.nInit;
  if (!(Number.isInteger(nInit) && nInit >= 1)) bad("nInit", nInit, "an integer >= 1");
  let db: ResolvedClusteringOptions["dbscan"] = false;
  if (o.dbscan !== false) {
    const d = o.dbscan ?? {};
    const eps = d.eps ?? null;
    if (eps !== null && !(eps > 0 && Number.isFinite(eps))) bad("dbscan.eps", eps, "a distance > 0");
    const minPts = d.minPts ?? null;
    if (minPts !== null && !(Number.isInteger(minPts) && minPts >= 2)) bad("dbscan.minPts", minPts, "an integer >= 2");
    const variance = d.variance ?? CLUSTERING_DEFAULTS.dbscanVariance;
    if (!(variance > 0 && variance <= 1)) bad("dbscan.variance", variance, "a share in (0, 1]");
    const maxComponents = d.maxComponents ?? CLUSTERING_DEFAULTS.dbscanMaxComponents;
    if (!(Number.isInteger(maxComponents) && maxComponents >= 1)) bad("dbscan.maxComponents", maxComponents, "an integer >= 1");
    db = { eps, minPts, variance, maxComponents };
  }
  return { k, kRange: [kRange[0], kRange[1]], nInit, dbscan: db };
}

/** What fitClustering needs besides the policy: sample weights, the generator, progress. */
export interface FitClusteringOptions extends ClusteringOptions {
  /** Weight per row (km or hours per scenario); unweighted when missing. */
  weights?: Float64Array;
  /**
   * Generator the stage forks its streams from ("sweep", "kmeans", "eps"); default `new Rng(seed)`.
   * The pipeline passes `new Rng(options.seed)`, so passing the same seed reproduces its clusters.
   */
  rng?: Rng;
  /** Used when `rng` is missing. Default 1 (the pipeline's default seed). */
  seed?: number;
  progress?: Progress;
}

/** DBSCAN as the clustering stage ran it: on the leading principal components. */
export type ClusteringDbscan = DbscanResult & { components: number; explainedVariance: number; epsSuggestion: SuggestEpsResult | null };

export interface FitClusteringResult {
  /** Final labels: the k-means cluster, or −1 where DBSCAN called the scenario noise (rare). */
  labels: Int32Array;
  k: number;
  /** The silhouette sweep when k was chosen (null when given). */
  sweep: SweepKResult | null;
  kmeans: KMeansResult;
  dbscan: ClusteringDbscan | null;
  /** Exact medoid per cluster of `labels` (a real scenario). */
  medoids: MedoidsResult;
  /** Everything needed to put new scenarios into these clusters (see assignScenarios). */
  model: ClusteringModel;
  /** The options after defaults. */
  options: ResolvedClusteringOptions;
  /** Seconds per step ("choose k", "k-means", "DBSCAN", "medoids"). */
  timings: Record<string, number>;
  warnings: string[];
}

/**
 * The clustering stage: k chosen by silhouette over kRange (or given) → weighted k-means → DBSCAN on
 * the leading principal components of a full PCA (components up to the variance target), minPts =
 * 2·d, eps at the knee of the sorted k-distance curve → DBSCAN noise leaves its k-means cluster
 * (label −1) → exact medoids. Returns the result and a fitted model (the embedding's standardization,
 * k-means centres with novelty scale, PCA mean and components, DBSCAN core rows) that
 * `assignScenarios` applies to new scenarios; on the training rows it reproduces `labels` exactly.
 */
export function fitClustering(embedding: Embedding, options: FitClusteringOptions = {}): FitClusteringResult {
  const o = resolveClusteringOptions(options);
  const rng = options.rng ?? new Rng(options.seed ?? 1);
  const { weights, progress } = options;
  const X = embedding.matrix;
  const n = X.rows;
  if (n < 3) throw new InputError(`the recordings gave ${n} scenario(s); clustering needs at least 3`);
  if (weights !== undefined && weights.length !== n) throw new InputError(`weights has ${weights.length} entries; the embedding has ${n} rows`);
  const timings: Record<string, number> = {};
  const warnings: string[] = [];
  const timed = <T>(name: string, f: () => T): T => {
    const t0 = performance.now();
    const r = f();
    timings[name] = (timings[name] ?? 0) + (performance.now() - t0) / 1000;
    return r;
  };

  let sweep: SweepKResult | null = null;
  let k = o.k ?? 0;
  if (o.k === null) {
    const kMax = Math.min(o.kRange[1], n - 1);
    const kMin = Math.min(o.kRange[0], kMax);
    sweep = timed("choose k", () => sweepK(X, { kRange: [kMin, kMax], rng: rng.fork("sweep"), weights, nInit: o.nInit, progress }));
    k = sweep.suggestedK;
    warnings.push(...sweep.warnings);
  }
  if (k > n) throw new InputError(`k=${k} should be <= the number of scenarios (${n})`);
  const km = timed("k-means", () => kmeans(X, k, { rng: rng.fork("kmeans"), nInit: o.nInit, weights, progress }));
  warnings.push(...km.warnings);

  const labels = Int32Array.from(km.labels);
  let db: ClusteringDbscan | null = null;
  let pcaModel: ClusteringModel["pca"] = null;
  let dbModel: ClusteringModel["dbscan"] = null;
  if (o.dbscan !== false) {
    const cfg = o.dbscan;
    db = timed("DBSCAN", () => {
      const full = pca(X, Math.min(X.cols, X.rows));
      let comps = 0;
      let cum = 0;
      while (comps < Math.min(cfg.maxComponents, full.explainedVarianceRatio.length) && cum < cfg.variance) cum += full.explainedVarianceRatio[comps++]!;
      comps = Math.max(1, comps);
      // The leading `comps` columns of the full decomposition's scores are the comps-component scores.
      const scores = takeColumns(full.scores, comps);
      const minPts = cfg.minPts ?? 2 * comps;
      const sugg = cfg.eps === null ? suggestEps(scores, { minPts, rng: rng.fork("eps") }) : null;
      const eps = cfg.eps ?? sugg!.eps;
      const r = dbscan(scores, { eps, minPts, progress });
      pcaModel = { mean: full.mean.slice(), components: { data: full.components.data.slice(0, comps * X.cols), rows: comps, cols: X.cols }, explainedVariance: cum };
      dbModel = dbscanModel(scores, r);
      return { ...r, components: comps, explainedVariance: cum, epsSuggestion: sugg };
    });
    warnings.push(...db.warnings);
    for (let i = 0; i < n; i++) if (db.labels[i] === -1) labels[i] = -1;
  }
  const med = timed("medoids", () => exactMedoids(X, labels, { progress }));
  warnings.push(...med.warnings);
  // Weight share per final label, for comparing new recordings with the training ones.
  const clusterShare = new Float64Array(k);
  let noiseShare = 0;
  let total = 0;
  for (let i = 0; i < n; i++) total += weights ? weights[i]! : 1;
  for (let i = 0; i < n; i++) {
    const w = (weights ? weights[i]! : 1) / total;
    if (labels[i]! < 0) noiseShare += w;
    else clusterShare[labels[i]!]! += w;
  }
  const model: ClusteringModel = {
    features: embedding.features.map((f) => f.name),
    standardization: { mean: embedding.mean.slice(), scale: embedding.scale.slice(), weight: embedding.weight.slice() },
    k,
    kChosenBy: sweep ? "silhouette" : "given",
    training: { rows: n, clusterShare, noiseShare },
    kmeans: kmeansModel(X, km),
    pca: pcaModel,
    dbscan: dbModel,
    extraction: null,
  };
  return { labels, k, sweep, kmeans: km, dbscan: db, medoids: med, model, options: o, timings, warnings };
}

/** The first `c` columns of a matrix, as a new matrix. */
function takeColumns(m: Matrix, c: number): Matrix {
  const out = zeros(m.rows, c);
  for (let i = 0; i < m.rows; i++) out.data.set(m.data.subarray(i * m.cols, i * m.cols + c), i * c);
  return out;
}
