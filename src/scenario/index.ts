/** Scenario windows tiling every ego drive, their summaries and the fixed-shape scenario tensor. */
export { buildScenarios } from "./buildScenarios.js";
export { cutWindows } from "./cutWindows.js";
export { resolveScenarioOptions, SCENARIO_DEFAULTS } from "./options.js";
export type { ScenarioOptions, ResolvedScenarioOptions, WindowSpec } from "./options.js";
export { TENSOR_ACTORS, TENSOR_CHANNELS, tensorOffset } from "./tensor.js";
export type { ChannelInfo } from "./tensor.js";
export type { Scenario, ScenarioSet, ScenarioStats, ScenarioEvent, ScenarioCriticality, TensorShape } from "./types.js";
