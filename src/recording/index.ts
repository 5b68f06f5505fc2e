/** Recording: reading tracks files (CSV, Parquet) and road descriptions, validated, into the road frame. */
export type { Road, ObjectKind, Track, RejectedTrack, Recording } from "./types.js";
export { readRecording, defaultId } from "./readRecording.js";
export type { ReadRecordingOptions } from "./readRecording.js";
export type { OnBadTrack, LaneSource } from "./buildTracks.js";
export type { TracksFormat } from "./scanTable.js";
export { readRoad, validateRoad, writeRoad, roadToRoadFrame } from "./readRoad.js";
export { writeTracks, tracksCsv } from "./writeTracks.js";
export { TRACK_COLUMNS, resolveColumns } from "./columns.js";
export type { TrackColumn, ColumnMapping, ResolvedColumns } from "./columns.js";
export { unitFactors, toSI, LENGTH_TO_M, SPEED_TO_MS, ACCELERATION_TO_MS2, TIME_TO_S } from "./units.js";
export type { UnitMapping, UnitFactors, Ratio, LengthUnit, SpeedUnit, AccelerationUnit, TimeUnit } from "./units.js";
export { DEFAULT_SIZES, KIND_NAMES } from "./kinds.js";
export { PLAUSIBILITY_CHECKS, PLAUSIBILITY_DEFAULTS, resolvePlausibility } from "./plausibility.js";
export type { PlausibilityCheck, PlausibilityOptions } from "./plausibility.js";
export { validateConditions, conditionValue, CONDITION_FIELDS, CONDITION_VOCABULARY, NOT_GIVEN } from "./conditions.js";
export type { RecordingConditions, ConditionField, RoadType, TrafficDensity, TimeOfDay, Weather, Lighting, RecordingMethod } from "./conditions.js";
