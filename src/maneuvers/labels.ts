/**
 * Basic maneuver vocabularies and their per-frame codes. Codes are the array index; per-frame label
 * arrays are Int8Array holding these codes.
 */
export const LONGITUDINAL = ["keep", "accelerate", "decelerate"] as const;
export type LongitudinalManeuver = (typeof LONGITUDINAL)[number];
export const LON_KEEP = 0;
export const LON_ACCELERATE = 1;
export const LON_DECELERATE = 2;

export const LATERAL = ["lane-keep", "lane-change-left", "lane-change-right"] as const;
export type LateralManeuver = (typeof LATERAL)[number];
export const LAT_KEEP = 0;
export const LAT_LEFT = 1;
export const LAT_RIGHT = 2;
