/** Kinematics: smoothing and differentiation of tracks, gap splitting, lane assignment. */
export { savitzkyGolay, savitzkyGolayCoefficients } from "./savitzkyGolay.js";
export type { SavitzkyGolayOptions } from "./savitzkyGolay.js";
export { splitAtGaps } from "./splitAtGaps.js";
export { deriveMotion, windowSamples, medianStep, DERIVE_MOTION_DEFAULTS } from "./deriveMotion.js";
export type { DeriveMotionOptions, Motion, TrackPositions } from "./deriveMotion.js";
export { assignLanes, validateMarkings } from "./assignLanes.js";
