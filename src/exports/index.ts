/** Exports for scenario players: ASAM OpenSCENARIO (concrete and logical) and ASAM OpenDRIVE. */
export { concreteScenarioXml, OPENSCENARIO_REV, DEFAULT_THRESHOLDS } from "./concreteScenarioXml.js";
export type { ConcreteScenarioInput, ConcreteScenarioOptions, ConcreteScenarioResult, EvaluationThresholds } from "./concreteScenarioXml.js";
export { openDriveXml, openDriveLaneId, OPENDRIVE_REV } from "./openDriveXml.js";
export type { OpenDriveOptions } from "./openDriveXml.js";
export { centreOffset, centreToReference, referenceToCentre, REAR_AXLE_FROM_REAR } from "./referencePoint.js";
export { scenarioExportFiles, writeExportFiles, roadFileName, roadExtent } from "./writeScenarioExports.js";
export type { ScenarioExportFile } from "./writeScenarioExports.js";
export { logicalTemplateXml, parameterName, TEMPLATE_INPUTS, TEMPLATE_CAR, TEMPLATE_LEAD_S, ABSENT_GAP } from "./logicalTemplateXml.js";
export type { TemplateOptions, TemplateResult } from "./logicalTemplateXml.js";
export { variationsXml, marginalsXml } from "./parameterDistributionXml.js";
export type { LogicalScenarioLike, LogicalScenarioParameter, TestCaseLike } from "./logicalScenarioShape.js";
