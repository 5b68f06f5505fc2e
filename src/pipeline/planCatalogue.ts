import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import { zeros, type Matrix } from "../core/matrix.js";
import type { Progress } from "../core/progress.js";
import { VERSION } from "../core/version.js";
import { dbscan, type DbscanResult } from "../cluster/dbscan.js";
import { kmeans, type KMeansResult } from "../cluster/kmeans.js";
import { medoids as exactMedoids, type MedoidsResult } from "../cluster/medoids.js";
import { suggestEps, type SuggestEpsResult } from "../cluster/suggestEps.js";
import { sweepK, type SweepKResult } from "../cluster/sweepK.js";
import { embedScenarios, type Embedding } from "../embed/features.js";
import { map2d } from "../embed/map2d.js";
import { pca } from "../embed/pca.js";
import { scenarioWeights } from "../exposure/sampleWeights.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import { buildTestPlan } from "../plan/buildTestPlan.js";
import type { TestPlan } from "../plan/types.js";
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
  dbscan: (DbscanResult & { components: number; explainedVariance: number; epsSuggestion: SuggestEpsResult | null }) | null;
  /** Final labels: the k-means cluster, or -1 where DBSCAN called the scenario noise (rare). */
  labels: Int32Array;
  medoids: MedoidsResult;
  typeKeys: string[];
  map: { coords: Matrix; method: string; fittedOn: number; warnings: string[] };
  plan: TestPlan;
  /** Seconds per stage. */
  timings: Record<string, number>;
  warnings: string[];
}

/**
 * The half of the pipeline after extraction, for all recordings together: merge the scenario sets →
 * embedding → k-means (k by silhouette unless given) with DBSCAN noise as the rare scenarios → exact
 * medoids → type keys → 2-D map → test plan. `sets`, `summaries` and `maneuvers` are the
 * `extractRecording` results of each recording, in the same order (the order fixes scenario order,
 * hence the plan's bytes). Pure: no files are read or written here.
 */
export function planCatalogue(
  sets: readonly ScenarioSet[],
  summaries: readonly RecordingSummary[],
  maneuvers: readonly TrackManeuvers[][],
  options: PipelineOptions | ResolvedPipelineOptions = {},
  progress?: Progress,
): PipelineResult {
  const o = resolvePipelineOptions(options as PipelineOptions);
  const rng = new Rng(o.seed);
  const timings: Record<string, number> = {};
  const warnings: string[] = [];
  const timed = <T>(name: string, f: () => T): T => {
    const t0 = performance.now();
    const r = f();
    timings[name] = (timings[name] ?? 0) + (performance.now() - t0) / 1000;
    return r;
  };
  if (sets.length === 0) throw new InputError("planning needs at least one recording's scenarios");
  if (sets.length !== summaries.length || sets.length !== maneuvers.length)
    throw new InputError(`planCatalogue got ${sets.length} scenario sets, ${summaries.length} summaries and ${maneuvers.length} maneuver lists; pass one of each per recording, in the same order`);
  checkDistinctIds(summaries);
  const scenarios = mergeScenarioSets([...sets]);
  const n = scenarios.scenarios.length;
  if (n < 3) throw new InputError(`the recordings gave ${n} scenario(s); clustering needs at least 3`);

  const embedding = timed("embedding", () => embedScenarios(scenarios, o.embedding));
  const X = embedding.matrix;
  const weights = scenarioWeights(scenarios.scenarios, o.weightBy);

  let sweep: SweepKResult | null = null;
  let k = o.k ?? 0;
  if (o.k === null) {
    const kMax = Math.min(o.kRange[1], n - 1);
    const kMin = Math.min(o.kRange[0], kMax);
    sweep = timed("choose k", () => sweepK(X, { kMin, kMax, rng: rng.fork("sweep"), weights, nInit: o.nInit, progress }));
    k = sweep.suggestedK;
    warnings.push(...sweep.warnings);
  }
  if (k > n) throw new InputError(`k=${k} should be <= the number of scenarios (${n})`);
  const km = timed("k-means", () => kmeans(X, k, { rng: rng.fork("kmeans"), nInit: o.nInit, weights, progress }));
  warnings.push(...km.warnings);

  const labels = Int32Array.from(km.labels);
  let db: PipelineResult["dbscan"] = null;
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
      return { ...r, components: comps, explainedVariance: cum, epsSuggestion: sugg };
    });
    warnings.push(...db.warnings);
    for (let i = 0; i < n; i++) if (db.labels[i] === -1) labels[i] = -1;
  }
  const med = timed("medoids", () => exactMedoids(X, labels, { progress }));
  warnings.push(...med.warnings);
  const typeKeys = timed("type keys", () => scenarioTypeKeys(scenarios.scenarios, o.plan.typeKey));
  const map = timed("2-D map", () => map2d(X, { method: o.map, rng: rng.fork("map"), progress }));

  const inputChecksums: Record<string, string> = {};
  for (const r of summaries) inputChecksums[r.source] = r.checksum;
  // Conditions go into the provenance only when some recording states them, so that plans of
  // recordings without conditions keep their bytes.
  const recordingConditions: Record<string, RecordingConditions> = {};
  for (const r of summaries) if (r.conditions && Object.keys(r.conditions).length > 0) recordingConditions[r.id] = r.conditions;
  const plan = timed("test plan", () =>
    buildTestPlan(
      {
        scenarios: scenarios.scenarios,
        labels,
        medoids: med.indices,
        embedding: X,
        typeKeys,
        clusterMethod: `k-means (k = ${k}${sweep ? ", chosen by silhouette" : ""})${db ? ` with DBSCAN noise (eps ${db.eps.toPrecision(4)}, minPts ${db.minPts}, ${db.components} principal components) as rare scenarios` : ""}`,
        provenance: {
          seed: o.seed,
          inputChecksums,
          createdAt: null,
          upstream: {
            tool: `roadsieve ${VERSION}`,
            maneuvers: o.maneuvers,
            scene: o.scene,
            scenario: scenarios.options ?? o.scenario,
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
      o.plan,
    ),
  );
  warnings.push(...plan.warnings);
  return {
    options: o,
    recordings: [...summaries],
    maneuvers: [...maneuvers],
    scenarios,
    embedding,
    weights,
    sweep,
    k,
    kmeans: km,
    dbscan: db,
    labels,
    medoids: med,
    typeKeys,
    map,
    plan,
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

/** The first `c` columns of a matrix, as a new matrix. */
function takeColumns(m: Matrix, c: number): Matrix {
  const out = zeros(m.rows, c);
  for (let i = 0; i < m.rows; i++) out.data.set(m.data.subarray(i * m.cols, i * m.cols + c), i * c);
  return out;
}
