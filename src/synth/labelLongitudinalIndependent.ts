import { LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "../maneuvers/labels.js";
import { centredMeanAcceleration } from "./labelLongitudinalTruth.js";

/**
 * The independent longitudinal ground truth (docs/synth.md, "Independent longitudinal labels"; issue
 * 11), fixed before the detector was measured against it: the sign and size of the clean
 * acceleration averaged over a 2 s centred window, against ±0.3 m/s². It shares no state machine,
 * hysteresis or minimum duration with the detector or with labelLongitudinalTruth.
 */
export const INDEPENDENT_LONGITUDINAL = Object.freeze({ windowS: 2, threshold: 0.3 });

/** Per-frame codes of LONGITUDINAL from a clean acceleration signal sampled at frameRate (Hz). */
export function labelLongitudinalIndependent(
  ax: ArrayLike<number>,
  frameRate: number,
  def: { windowS: number; threshold: number } = INDEPENDENT_LONGITUDINAL,
): Int8Array {
  const mean = centredMeanAcceleration(ax, frameRate, def.windowS);
  const out = new Int8Array(mean.length);
  for (let i = 0; i < mean.length; i++) {
    const a = mean[i]!;
    out[i] = a >= def.threshold ? LON_ACCELERATE : a <= -def.threshold ? LON_DECELERATE : LON_KEEP;
  }
  return out;
}
