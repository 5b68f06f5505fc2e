import { DEFAULTS } from "../core/defaults.js";
import { InputError } from "../core/errors.js";
import { CLUSTERING_DEFAULTS, resolveClusteringOptions, type ClusteringOptions, type ResolvedClusteringOptions } from "../cluster/fitClustering.js";
import type { EmbedOptions } from "../embed/features.js";
import type { ManeuverOptions } from "../maneuvers/options.js";
import type { TestPlanOptions } from "../plan/options.js";
import type { LogicalPlanOptions } from "../plan/buildPlan.js";
import type { MeasureOptions } from "../logical/options.js";
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
   * (enough for `variance` of the variance, default 0.9, at most `maxComponents`, default 8), with minPts = 2·d
   * (Schubert et al. 2017) and eps from the knee of the k-distance curve unless given. false turns
   * it off (no noise; rare scenarios then come from type keys seen once and criticality only).
   */
  dbscan?: ClusteringOptions["dbscan"];
  /** 2-D map for the report. Default "umap" (seeded, sampled beyond a few thousand scenarios). */
  map?: MapMethod;
  /** Scenario weights in clustering and shares: kilometres (default) or hours. */
  weightBy?: "km" | "hours";
  /** plan.budget counts concrete test cases (the logical plan); the other plan options shape the thresholds and the exploration view. */
  plan?: TestPlanOptions;
  /** Classification and parameter measurement (src/logical/). */
  measure?: MeasureOptions;
  /** Logical scenarios, critical events and the allocation of concrete test cases. */
  logical?: LogicalPlanOptions;
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
  dbscan: ResolvedClusteringOptions["dbscan"];
  map: MapMethod;
  weightBy: "km" | "hours";
  plan: TestPlanOptions;
  measure: MeasureOptions;
  logical: LogicalPlanOptions;
}

export const PIPELINE_DEFAULTS = {
  seed: DEFAULTS.seed,
  // The clustering stage's own defaults (which come from DEFAULTS): one table for the stage and the pipeline.
  kRange: CLUSTERING_DEFAULTS.kRange,
  nInit: CLUSTERING_DEFAULTS.nInit,
  dbscanVariance: CLUSTERING_DEFAULTS.dbscanVariance,
  dbscanMaxComponents: CLUSTERING_DEFAULTS.dbscanMaxComponents,
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
  const { k, kRange, nInit, dbscan } = resolveClusteringOptions(o);
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
    kRange,
    nInit,
    dbscan,
    map,
    weightBy,
    plan: { weightBy, ...(o.plan ?? {}) },
    measure: o.measure ?? {},
    logical: o.logical ?? {},
  };
}

/**
 * The options a plan's scenarios were cut, measured and embedded with, as its clustering model
 * records them (model.json "extraction"), so that new recordings are extracted exactly alike
 * (assign, add, resim). Null when the model records none: the defaults apply.
 */
export function extractionOptionsOf(extraction: Record<string, unknown> | null): { options: PipelineOptions; weightBy: "km" | "hours" } {
  const ex = extraction ?? {};
  return {
    options: {
      maneuvers: ex.maneuvers as PipelineOptions["maneuvers"],
      scene: ex.scene as PipelineOptions["scene"],
      scenario: ex.scenario as PipelineOptions["scenario"],
      embedding: ex.embedding as PipelineOptions["embedding"],
      measure: ex.measure as PipelineOptions["measure"],
    },
    weightBy: ex.weightBy === "hours" ? "hours" : "km",
  };
}
