import { DEFAULTS } from "../core/defaults.js";
import { InputError } from "../core/errors.js";
import type { EmbedOptions } from "../embed/features.js";
import type { ManeuverOptions } from "../maneuvers/options.js";
import type { TestPlanOptions } from "../plan/options.js";
import type { ScenarioOptions } from "../scenario/options.js";
import type { SceneOptions } from "../scene/options.js";

export type MapMethod = "pca" | "umap";

/** Everything that shapes a pipeline run. Stage options pass through unchanged. */
export interface PipelineOptions {
  /** Seed of the one generator everything random derives from. Default 1. */
  seed?: number;
  maneuvers?: ManeuverOptions;
  scene?: SceneOptions;
  scenario?: ScenarioOptions;
  embedding?: EmbedOptions;
  /** Number of k-means clusters; null (default) chooses k by silhouette over kRange. */
  k?: number | null;
  /** Range of k tried when k is null. Default [2, 12]. */
  kRange?: [number, number];
  /** k-means restarts. Default 4. */
  nInit?: number;
  /**
   * DBSCAN finds the rare scenarios: rows it calls noise leave their k-means cluster and become
   * candidates for rare test cases. It runs on the first principal components of the embedding
   * (enough for `dbscanVariance` of the variance, at most `dbscanMaxComponents`), with minPts = 2·d
   * (Schubert et al. 2017) and eps from the knee of the k-distance curve unless given. false turns
   * it off (no noise; rare scenarios then come from type keys seen once and criticality only).
   */
  dbscan?: false | { eps?: number; minPts?: number; variance?: number; maxComponents?: number };
  /** 2-D map for the report. Default "umap" (seeded, sampled beyond a few thousand scenarios). */
  map?: MapMethod;
  /** Scenario weights in clustering and shares: kilometres (default) or hours. */
  weightBy?: "km" | "hours";
  plan?: TestPlanOptions;
}

export interface ResolvedPipelineOptions {
  seed: number;
  maneuvers: ManeuverOptions;
  scene: SceneOptions;
  scenario: ScenarioOptions;
  embedding: EmbedOptions;
  k: number | null;
  kRange: [number, number];
  nInit: number;
  dbscan: false | { eps: number | null; minPts: number | null; variance: number; maxComponents: number };
  map: MapMethod;
  weightBy: "km" | "hours";
  plan: TestPlanOptions;
}

export const PIPELINE_DEFAULTS = {
  seed: DEFAULTS.seed,
  kRange: [DEFAULTS.kRange[0], DEFAULTS.kRange[1]] as [number, number],
  nInit: DEFAULTS.nInit,
  dbscanVariance: 0.9,
  dbscanMaxComponents: 8,
  map: DEFAULTS.map as MapMethod,
  weightBy: "km" as const,
};

function bad(name: string, value: unknown, expected: string): never {
  throw new InputError(`${name}=${JSON.stringify(value)} should be ${expected}`);
}

/** Resolve defaults and check the pipeline's own options once (stages check theirs). */
export function resolvePipelineOptions(o: PipelineOptions = {}): ResolvedPipelineOptions {
  const seed = o.seed ?? PIPELINE_DEFAULTS.seed;
  if (!(Number.isInteger(seed) && seed >= 0)) bad("seed", seed, "an integer >= 0");
  const k = o.k ?? null;
  if (k !== null && !(Number.isInteger(k) && k >= 1)) bad("k", k, "an integer >= 1");
  const kRange = o.kRange ?? PIPELINE_DEFAULTS.kRange;
  if (!(Array.isArray(kRange) && kRange.length === 2 && Number.isInteger(kRange[0]) && Number.isInteger(kRange[1]) && kRange[0] >= 2 && kRange[1] >= kRange[0]))
    bad("kRange", kRange, "[kMin, kMax] with 2 <= kMin <= kMax");
  const nInit = o.nInit ?? PIPELINE_DEFAULTS.nInit;
  if (!(Number.isInteger(nInit) && nInit >= 1)) bad("nInit", nInit, "an integer >= 1");
  let dbscan: ResolvedPipelineOptions["dbscan"] = false;
  if (o.dbscan !== false) {
    const d = o.dbscan ?? {};
    const eps = d.eps ?? null;
    if (eps !== null && !(eps > 0 && Number.isFinite(eps))) bad("dbscan.eps", eps, "a distance > 0");
    const minPts = d.minPts ?? null;
    if (minPts !== null && !(Number.isInteger(minPts) && minPts >= 2)) bad("dbscan.minPts", minPts, "an integer >= 2");
    const variance = d.variance ?? PIPELINE_DEFAULTS.dbscanVariance;
    if (!(variance > 0 && variance <= 1)) bad("dbscan.variance", variance, "a share in (0, 1]");
    const maxComponents = d.maxComponents ?? PIPELINE_DEFAULTS.dbscanMaxComponents;
    if (!(Number.isInteger(maxComponents) && maxComponents >= 1)) bad("dbscan.maxComponents", maxComponents, "an integer >= 1");
    dbscan = { eps, minPts, variance, maxComponents };
  }
  const map = o.map ?? PIPELINE_DEFAULTS.map;
  if (map !== "pca" && map !== "umap") bad("map", map, `"pca" or "umap"`);
  const weightBy = o.weightBy ?? PIPELINE_DEFAULTS.weightBy;
  if (weightBy !== "km" && weightBy !== "hours") bad("weightBy", weightBy, `"km" or "hours"`);
  return {
    seed,
    maneuvers: o.maneuvers ?? {},
    scene: o.scene ?? {},
    scenario: o.scenario ?? {},
    embedding: o.embedding ?? {},
    k,
    kRange: [kRange[0], kRange[1]],
    nInit,
    dbscan,
    map,
    weightBy,
    plan: { weightBy, ...(o.plan ?? {}) },
  };
}
