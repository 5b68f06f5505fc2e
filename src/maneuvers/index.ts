/** Basic maneuvers per track: longitudinal and lateral labels and segments. */
export { LONGITUDINAL, LATERAL, LON_KEEP, LON_ACCELERATE, LON_DECELERATE, LAT_KEEP, LAT_LEFT, LAT_RIGHT } from "./labels.js";
export type { LongitudinalManeuver, LateralManeuver } from "./labels.js";
export { detectManeuvers } from "./detectManeuvers.js";
export { detectAllManeuvers } from "./detectAllManeuvers.js";
export { resolveManeuverOptions, MANEUVER_DEFAULTS } from "./options.js";
export type { ManeuverOptions, ResolvedManeuverOptions } from "./options.js";
export type { TrackManeuvers, ManeuverSegment, LaneChangeShape, LaneChangeBoundaryMethod, SmoothedMotion } from "./types.js";
export { LANE_CHANGE_PROFILES, minimumJerkShape, constantSpeedShape, sinusoidalShape, profileShape } from "./laneChangeShapes.js";
export type { LaneChangeProfile } from "./laneChangeShapes.js";
export { enforceLastingCrossings } from "./enforceLastingCrossings.js";
export type { LastingCrossingRule } from "./enforceLastingCrossings.js";
export { fitPolynomial } from "./fitPolynomial.js";
