/**
 * roadsieve public API.
 *
 * The top level is the notebook path, a handful of names:
 *   read     a recording (CSV or Parquet tracks + road.json) → Recording
 *   run      the whole chain on recordings → PipelineResult (its .plan is the test plan)
 *   extract  one recording → scenarios (the first half of run), then
 *   plan     all extracted recordings → PipelineResult (the second half of run; same bytes as run)
 *   show     anything in a notebook: a figure, a plan, a table, a result
 *   write    plan.json, plan.csv, report.html and the catalogue into a folder
 *   query    SQL on the catalogue database
 * Everything else lives in one namespace per stage, e.g. rs.cluster.kmeans, rs.coverage.chao1,
 * rs.report.criticalityFigure; DEVELOPERS.md lists them. The traffic generator has its own entry
 * point, "roadsieve/synth". The flat names of 0.1 still work for one version (deprecated, see
 * src/legacy.ts).
 */
export { readRecording as read } from "./recording/readRecording.js";
export { runPipeline as run } from "./pipeline/runPipeline.js";
export { extractRecording as extract } from "./pipeline/extractRecording.js";
export { planCatalogue as plan } from "./pipeline/planCatalogue.js";
export { show } from "./report/notebook.js";
export { writeOutputs as write } from "./pipeline/writeOutputs.js";
export { queryCatalogue as query } from "./catalogue/queryCatalogue.js";
export { writeReport } from "./report/writeReport.js";
export { DEFAULTS } from "./core/defaults.js";
export { Rng } from "./core/rng.js";
export { InputError } from "./core/errors.js";
export { VERSION } from "./core/version.js";
export type { Recording } from "./recording/types.js";
export type { ReadRecordingOptions } from "./recording/readRecording.js";
export type { PipelineOptions, ResolvedPipelineOptions } from "./pipeline/options.js";
export type { PipelineResult } from "./pipeline/planCatalogue.js";
export type { TestPlan, TestCase } from "./plan/types.js";
export type { Plan } from "./plan/logicalTypes.js";
export type { Figure } from "./report/figure.js";

// One namespace per stage, in pipeline order.
export * as core from "./core/index.js";
export * as recording from "./recording/index.js";
export * as kinematics from "./kinematics/index.js";
export * as maneuvers from "./maneuvers/index.js";
export * as scene from "./scene/index.js";
export * as scenario from "./scenario/index.js";
export * as embed from "./embed/index.js";
export * as cluster from "./cluster/index.js";
export * as exposure from "./exposure/index.js";
export * as coverage from "./coverage/index.js";
export * as logical from "./logical/index.js";
export * as testPlan from "./plan/index.js";
export * as exports from "./exports/index.js";
export * as resim from "./resim/index.js";
export * as pipeline from "./pipeline/index.js";
export * as shard from "./shard/index.js";
export * as extraction from "./extract/index.js";
export * as catalogue from "./catalogue/index.js";
export * as compare from "./compare/index.js";
export * as report from "./report/index.js";

/** @deprecated the flat names of 0.1, kept for one version; see src/legacy.ts. */
export * from "./legacy.js";
