/** The whole chain in one call, its two halves, and writing its outputs. */
export { runPipeline } from "./runPipeline.js";
export { extractRecording } from "./extractRecording.js";
export type { ExtractedRecording, RecordingSummary } from "./extractRecording.js";
export { planCatalogue, planFromClustering } from "./planCatalogue.js";
export type { PipelineResult, ClusteredCatalogue } from "./planCatalogue.js";
export { resolvePipelineOptions, PIPELINE_DEFAULTS } from "./options.js";
export type { PipelineOptions, ResolvedPipelineOptions, MapMethod } from "./options.js";
export { mergeScenarioSets } from "./mergeScenarioSets.js";
export { writeOutputs, writeOutputFolder } from "./writeOutputs.js";
export type { WriteOutputsOptions } from "./writeOutputs.js";
