/** Our seeded highway traffic generator (IDM car-following, MOBIL lane changes) with ground truth. */
export { generateTraffic, generatedRoad, truthDefinitions } from "./generateTraffic.js";
export type { GeneratedTraffic, TrafficStats } from "./generateTraffic.js";
export { DEFAULT_TRAFFIC_OPTIONS, resolveTrafficOptions, VARIETY_KEYS, VARIETY_TRAFFIC_OPTIONS, varietyActive, recordedOptions } from "./options.js";
export type { TrafficOptions } from "./options.js";
export { writeGeneratedTraffic, trackColumns } from "./writeGeneratedTraffic.js";
export type { WriteTrafficOptions, TrafficFileFormat } from "./writeGeneratedTraffic.js";
export { readGroundTruth, truthToJson, truthFromJson, encodeRuns, decodeRuns } from "./truthFile.js";
export { SAMPLE_DATA_OPTIONS, writeSampleData } from "./sampleData.js";
export { idmAcceleration, idmFreeAcceleration, idmDesiredGap, idmEquilibriumGap } from "./idm.js";
export type { IdmParams } from "./idm.js";
export { mobilIncentive, mobilIsSafe } from "./mobil.js";
export type { MobilAccelerations, MobilParams, LaneChangeDirection } from "./mobil.js";
export { quinticShape, sampleLaneChangeDuration, shapeValue, shapeSlope, shapeInverse } from "./lateral.js";
export type { ShapeCode } from "./lateral.js";
export { labelLongitudinalIndependent, INDEPENDENT_LONGITUDINAL } from "./labelLongitudinalIndependent.js";
export { centredMeanAcceleration, labelLongitudinalTruth } from "./labelLongitudinalTruth.js";
export type { LongitudinalDefinition } from "./labelLongitudinalTruth.js";
export type { GroundTruth, TrackTruth, TruthLaneChange, TruthCutIn, PlantedEvent } from "./types.js";
