import { DEFAULT_TRAFFIC_OPTIONS } from "../synth/options.js";
import type { IdmParams } from "../synth/idm.js";
import type { MobilParams } from "../synth/mobil.js";

/**
 * The closed-loop ego: the generator's reference driver, IDM car-following (Treiber, Hennecke &
 * Helbing 2000) and MOBIL lane changes (Kesting, Treiber & Helbing 2007), with the generator's default
 * car parameters (src/synth/options.ts). Only the desired speed is per test case (see resolveDriver).
 */
export interface ReferenceDriver {
  idm: IdmParams;
  mobil: MobilParams;
  /** Physical braking limit (m/s², positive). */
  maxDecel: number;
  /** How often a lane change is considered (s) and how long one takes (s, minimum-jerk profile). */
  laneChangeCheckInterval: number;
  laneChangeDuration: number;
  /** Ego integration substeps per recording frame (ballistic update). */
  substeps: number;
  /** false = car-following only. */
  laneChanges: boolean;
}

export interface ReferenceDriverOptions {
  /**
   * Desired speed v0 (m/s). Default: the highest speed of the ego's recorded trajectory in the file
   * (so that the reference driver keeps the recorded pace), else max(initial speed, road speed limit).
   */
  desiredSpeed?: number;
  timeGap?: number;
  minGap?: number;
  maxAccel?: number;
  comfortDecel?: number;
  exponent?: number;
  maxDecel?: number;
  substeps?: number;
  laneChanges?: boolean;
}

export function resolveDriver(o: ReferenceDriverOptions, initialSpeed: number, speedLimit: number | undefined, recordedTopSpeed: number | null = null): ReferenceDriver {
  const d = DEFAULT_TRAFFIC_OPTIONS;
  return {
    idm: {
      desiredSpeed: o.desiredSpeed ?? (recordedTopSpeed !== null && recordedTopSpeed > 1 ? recordedTopSpeed : Math.max(initialSpeed, speedLimit ?? initialSpeed, 1)),
      timeGap: o.timeGap ?? d.carTimeGapMean,
      minGap: o.minGap ?? d.minGap,
      maxAccel: o.maxAccel ?? d.carMaxAccel,
      comfortDecel: o.comfortDecel ?? d.carComfortDecel,
      exponent: o.exponent ?? d.accelExponent,
    },
    mobil: { politeness: d.politeness, threshold: d.changeThreshold, safeDecel: d.safeDecel, keepRight: d.keepRight, bias: d.keepRightBias },
    maxDecel: o.maxDecel ?? d.maxDecel,
    laneChangeCheckInterval: d.laneChangeCheckInterval,
    laneChangeDuration: d.laneChangeDurationMean,
    substeps: o.substeps ?? 10,
    laneChanges: o.laneChanges ?? true,
  };
}
