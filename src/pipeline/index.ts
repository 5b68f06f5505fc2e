/** The whole chain in one call, and writing its outputs. */
export { runPipeline } from "./runPipeline.js";
export type { PipelineResult, RecordingSummary } from "./runPipeline.js";
export { resolvePipelineOptions, PIPELINE_DEFAULTS } from "./options.js";
export type { PipelineOptions, ResolvedPipelineOptions, MapMethod } from "./options.js";
export { mergeScenarioSets } from "./mergeScenarioSets.js";
export { writeOutputs, writeOutputFolder } from "./writeOutputs.js";
export type { WriteOutputsOptions } from "./writeOutputs.js";
