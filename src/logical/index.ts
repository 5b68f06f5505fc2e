/** Logical scenarios: classes in plain words, parameters per class, per-class clustering, distributions, critical events counted once. */
export { SCENARIO_CLASSES, SCENARIO_CLASS_IDS, scenarioClass, isScenarioClassId } from "./classes.js";
export type { ScenarioClassId, ScenarioClass, ParameterSpec, CriticalSide } from "./classes.js";
export { measureScenarioParameters } from "./measureScenarioParameters.js";
export { resolveMeasureOptions, MEASURE_DEFAULTS } from "./options.js";
export type { MeasureOptions, ResolvedMeasureOptions } from "./options.js";
export { findCriticalEvents, resolveCriticalEventOptions, CRITICAL_EVENT_DEFAULTS } from "./criticalEvents.js";
export type { CriticalEvent, CriticalEventOptions, CriticalEventsResult, RejectedCritical } from "./criticalEvents.js";
export { fitLogicalScenarios, resolveLogicalFitOptions } from "./fitLogicalScenarios.js";
export type { LogicalFit, LogicalFitOptions, ClassFit, FittedLogicalScenario, LogicalParameter, Marginal, LogicalModel, LogicalModelClass } from "./fitLogicalScenarios.js";
export { sampleVariations, inverseEcdf } from "./sampleVariations.js";
export type { Variation } from "./sampleVariations.js";
export { weightedQuantile, normalCdf } from "./stats.js";
export { assignLogicalScenarios, logicalModelToJSON, logicalModelFromJSON } from "./assignLogicalScenarios.js";
export type { LogicalAssignment } from "./assignLogicalScenarios.js";
