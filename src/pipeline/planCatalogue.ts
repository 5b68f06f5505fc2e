import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import type { Matrix } from "../core/matrix.js";
import type { Progress } from "../core/progress.js";
import { VERSION } from "../core/version.js";
import type { ClusteringModel } from "../cluster/clusteringModel.js";
import { fitClustering, type ClusteringDbscan, type FitClusteringResult } from "../cluster/fitClustering.js";
import type { KMeansResult } from "../cluster/kmeans.js";
import type { MedoidsResult } from "../cluster/medoids.js";
import type { SweepKResult } from "../cluster/sweepK.js";
import { embedScenarios, type Embedding } from "../embed/features.js";
import { map2d } from "../embed/map2d.js";
import { scenarioWeights } from "../exposure/sampleWeights.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import { buildTestPlan } from "../plan/buildTestPlan.js";
import { buildPlanDetailed } from "../plan/buildPlan.js";
import type { Plan } from "../plan/logicalTypes.js";
import type { LogicalModel } from "../logical/fitLogicalScenarios.js";
import { logicalModelToJSON } from "../logical/assignLogicalScenarios.js";
import { scenarioTypeKeys } from "../coverage/typeKey.js";
import type { ScenarioSet } from "../scenario/types.js";
import type { RecordingConditions } from "../recording/conditions.js";
import type { RecordingSummary } from "./extractRecording.js";
import { mergeScenarioSets } from "./mergeScenarioSets.js";
import { resolvePipelineOptions, type PipelineOptions, type ResolvedPipelineOptions } from "./options.js";

/** Everything a pipeline run produced: each stage's result, kept for reports, notebooks and the catalogue. */
export interface PipelineResult {
  options: ResolvedPipelineOptions;
  recordings: RecordingSummary[];
  /** Maneuvers per recording (same order as `recordings`), per track. */
  maneuvers: TrackManeuvers[][];
  scenarios: ScenarioSet;
  embedding: Embedding;
  /** Sample weights used in clustering (km or hours per scenario). */
  weights: Float64Array;
  sweep: SweepKResult | null;
  k: number;
  kmeans: KMeansResult;
  /** DBSCAN on the leading principal components, when it ran. */
  dbscan: ClusteringDbscan | null;
  /** Final labels: the k-means cluster, or -1 where DBSCAN called the scenario noise (rare). */
  labels: Int32Array;
  medoids: MedoidsResult;
  /** The fitted clustering stage (written as model.json beside the plan; see assignScenarios). */
  model: ClusteringModel;
  typeKeys: string[];
  map: { coords: Matrix; method: string; fittedOn: number; warnings: string[] };
  /** The plan of logical scenarios (schema 2.0.0); plan.exploration holds the global cluster view. */
  plan: Plan;
  /** Logical scenario id per scenario, and the fitted per-class model (standardization, representatives). */
  logicalScenarioOf: string[];
  logicalModel: LogicalModel;
  /** Seconds per stage. */
  timings: Record<string, number>;
  warnings: string[];
}

/** The merged, embedded catalogue with its clustering: the input of {@link planFromClustering}. */
export interface ClusteredCatalogue {
  /** The `extractRecording` summaries and maneuvers, one per recording, in the order of the merge. */
  summaries: readonly RecordingSummary[];
  maneuvers: readonly TrackManeuvers[][];
  /** `mergeScenarioSets` of the recordings' sets, in the same order. */
  scenarios: ScenarioSet;
  /** `embedScenarios(scenarios, options.embedding)`. */
  embedding: Embedding;
  /** `scenarioWeights(scenarios.scenarios, options.weightBy)`. */
  weights: Float64Array;
  /** `fitClustering(embedding, { ...options, weights, seed: options.seed })`. */
  clustering: FitClusteringResult;
}

/**
 * The half of the pipeline after extraction, for all recordings together, as wiring of stage
 * functions: `mergeScenarioSets` → `embedScenarios` → `scenarioWeights` → `fitClustering` →
 * `planFromClustering`. `sets`, `summaries` and `maneuvers` are the `extractRecording` results of
 * each recording, in the same order (the order fixes scenario order, hence the plan's bytes). A
 * notebook calling these functions in this order gets the same plan. Pure: no files are touched.
 */
export function planCatalogue(
  sets: readonly ScenarioSet[],
  summaries: readonly RecordingSummary[],
  maneuvers: readonly TrackManeuvers[][],
  options: PipelineOptions | ResolvedPipelineOptions = {},
  progress?: Progress,
): PipelineResult {
  const o = resolvePipelineOptions(options);
  if (sets.length === 0) throw new InputError("planning needs at least one recording's scenarios");
  if (sets.length !== summaries.length || sets.length !== maneuvers.length)
    throw new InputError(`planCatalogue got ${sets.length} scenario sets, ${summaries.length} summaries and ${maneuvers.length} maneuver lists; pass one of each per recording, in the same order`);
  checkDistinctIds(summaries);
  const scenarios = mergeScenarioSets([...sets]);
  const n = scenarios.scenarios.length;
  if (n < 3) throw new InputError(`the recordings gave ${n} scenario(s); clustering needs at least 3`);
  const t0 = performance.now();
  const embedding = embedScenarios(scenarios, o.embedding);
  const tEmbed = (performance.now() - t0) / 1000;
  const weights = scenarioWeights(scenarios.scenarios, o.weightBy);
  const clustering = fitClustering(embedding, { ...o, weights, seed: o.seed, progress });
  const r = planFromClustering({ summaries, maneuvers, scenarios, embedding, weights, clustering }, o, progress);
  r.timings = { embedding: tEmbed, ...r.timings };
  return r;
}

/**
 * The last step of the pipeline, once the catalogue is clustered: type keys → 2-D map → test plan,
 * and the result of the whole run (the clustering model gets the extraction options it needs to
 * treat new recordings alike). Pure.
 */
export function planFromClustering(c: ClusteredCatalogue, options: PipelineOptions | ResolvedPipelineOptions = {}, progress?: Progress): PipelineResult {
  const o = resolvePipelineOptions(options);
  const { scenarios, embedding, weights, clustering: cl } = c;
  const n = scenarios.scenarios.length;
  if (embedding.matrix.rows !== n || cl.labels.length !== n || weights.length !== n)
    throw new InputError(`planFromClustering: ${n} scenarios, ${embedding.matrix.rows} embedded rows, ${cl.labels.length} labels and ${weights.length} weights; all should be the same catalogue`);
  const rng = new Rng(o.seed);
  const X = embedding.matrix;
  const timings: Record<string, number> = { ...cl.timings };
  const warnings: string[] = [...cl.warnings];
  const timed = <T>(name: string, f: () => T): T => {
    const t0 = performance.now();
    const r = f();
    timings[name] = (timings[name] ?? 0) + (performance.now() - t0) / 1000;
    return r;
  };
  const { k, sweep, dbscan: db, labels, medoids: med } = cl;
  const typeKeys = timed("type keys", () => scenarioTypeKeys(scenarios.scenarios, o.plan.typeKey));
  const map = timed("2-D map", () => map2d(X, { method: o.map, rng: rng.fork("map"), progress }));

  const inputChecksums: Record<string, string> = {};
  for (const r of c.summaries) inputChecksums[r.source] = r.checksum;
  // Conditions go into the provenance only when some recording states them, so that plans of
  // recordings without conditions keep their bytes.
  const recordingConditions: Record<string, RecordingConditions> = {};
  for (const r of c.summaries) if (r.conditions && Object.keys(r.conditions).length > 0) recordingConditions[r.id] = r.conditions;
  const extraction = {
    maneuvers: o.maneuvers,
    scene: o.scene,
    scenario: scenarios.options ?? o.scenario,
    embedding: o.embedding,
    measure: o.measure,
    weightBy: o.weightBy,
  };
  const exploration = timed("test plan", () =>
    buildTestPlan(
      {
        scenarios: scenarios.scenarios,
        labels,
        medoids: med.indices,
        embedding: X,
        typeKeys,
        clusterMethod: `k-means (k = ${k}${sweep ? `, chosen by silhouette${sampledSweepNote(sweep, k, n)}` : ""})${db ? ` with DBSCAN noise (eps ${db.eps.toPrecision(4)}, minPts ${db.minPts}, ${db.components} principal components) as rare scenarios` : ""}`,
        provenance: {
          seed: o.seed,
          inputChecksums,
          createdAt: null,
          upstream: {
            tool: `roadsieve ${VERSION}`,
            maneuvers: o.maneuvers,
            scene: o.scene,
            scenario: extraction.scenario,
            embedding: o.embedding,
            k,
            kRange: o.kRange,
            nInit: o.nInit,
            dbscan: db ? { eps: db.eps, minPts: db.minPts, components: db.components } : false,
            map: o.map,
            weightBy: o.weightBy,
            ...(Object.keys(recordingConditions).length > 0 ? { recordingConditions } : {}),
          },
        },
        progress,
      },
      { ...o.plan, budget: undefined },
    ),
  );
  // plan.budget counts concrete test cases; the exploration view keeps every cluster's medoid.
  const detailed = timed("logical scenarios", () =>
    buildPlanDetailed({ scenarios: scenarios.scenarios, exploration, rng: rng.fork("plan") }, o.plan, { ...o.logical, budget: o.logical.budget ?? o.plan.budget }),
  );
  const plan = detailed.plan;
  // Every warning of the run goes into plan.json, so that it and the report list the same: the
  // recordings', the stages' (clustering, 2-D map), then the plan's own.
  plan.warnings = [...c.summaries.flatMap((s) => s.warnings.map((w) => `${s.id}: ${w}`)), ...warnings, ...map.warnings.map((w) => `2-D map: ${w}`), ...plan.warnings];
  warnings.length = 0;
  warnings.push(...plan.warnings);
  return {
    options: o,
    recordings: [...c.summaries],
    maneuvers: [...c.maneuvers],
    scenarios,
    embedding,
    weights,
    sweep,
    k,
    kmeans: cl.kmeans,
    dbscan: db,
    labels,
    medoids: med,
    // The per-class model of the logical scenarios rides in model.json under its `logical` key.
    model: { ...cl.model, extraction: JSON.parse(JSON.stringify(extraction)) as Record<string, unknown>, logical: JSON.parse(logicalModelToJSON(detailed.model)) as unknown },
    typeKeys,
    map,
    plan,
    logicalScenarioOf: detailed.logicalScenarioOf,
    logicalModel: detailed.model,
    timings,
    warnings,
  };
}

/** Two recordings with one id would give colliding scenario ids. */
export function checkDistinctIds(recordings: readonly { id: string; source: string }[]): void {
  const seen = new Map<string, string>();
  for (const rec of recordings) {
    const other = seen.get(rec.id);
    if (other !== undefined)
      throw new InputError(`two recordings have the id "${rec.id}" (${other} and ${rec.source}); scenario ids would collide — give each its own id (readRecording option id)`);
    seen.set(rec.id, rec.source);
  }
}

/**
 * How a sampled k choice was measured, for the plan's method line: the silhouette sample, its
 * standard error at the chosen k, and the sweep's fit sample. Empty when the sweep was exact, so
 * small catalogues keep the plain line.
 */
function sampledSweepNote(sweep: SweepKResult, k: number, n: number): string {
  if (sweep.silhouetteExact) return "";
  const se = sweep.rows.find((r) => r.k === k)?.silhouetteSe ?? NaN;
  const fits = sweep.fitSample < n ? `; sweep fits on a seeded sample of ${sweep.fitSample}` : "";
  return ` on a seeded sample of ${sweep.silhouetteSample} of ${n} scenarios, standard error ${se.toFixed(3)}${fits}`;
}
