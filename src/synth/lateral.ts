import type { Rng } from "../core/rng.js";

/**
 * Lateral motion of a lane change: the minimum-jerk (quintic) profile between two rest states,
 * s(τ) = 10τ³ − 15τ⁴ + 6τ⁵ (Flash & Hogan, "The coordination of arm movements", J. Neurosci. 5, 1985;
 * the same profile is common practice for lane-change trajectories), with zero lateral speed and
 * acceleration at both ends.
 */
export function quinticShape(tau: number): number {
  if (tau <= 0) return 0;
  if (tau >= 1) return 1;
  const t3 = tau * tau * tau;
  return t3 * (10 + tau * (-15 + 6 * tau));
}

/** ds/dτ. */
export function quinticSlope(tau: number): number {
  if (tau <= 0 || tau >= 1) return 0;
  const u = tau * (1 - tau);
  return 30 * u * u;
}

/** d²s/dτ². */
export function quinticCurvature(tau: number): number {
  if (tau <= 0 || tau >= 1) return 0;
  return 60 * tau - 180 * tau * tau + 120 * tau * tau * tau;
}

/** The τ in [0, 1] where the profile reaches fraction f of its travel (bisection; the shape is monotone). */
export function quinticInverse(f: number): number {
  if (f <= 0) return 0;
  if (f >= 1) return 1;
  let lo = 0;
  let hi = 1;
  for (let i = 0; i < 60; i++) {
    const mid = 0.5 * (lo + hi);
    if (quinticShape(mid) < f) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** Parameters of the log-normal lane-change duration distribution for a given mean and sd. */
export function logNormalParams(mean: number, sd: number): { mu: number; sigma: number } {
  const sigma2 = Math.log(1 + (sd * sd) / (mean * mean));
  return { mu: Math.log(mean) - sigma2 / 2, sigma: Math.sqrt(sigma2) };
}

/**
 * Draw a lane-change duration (s): log-normal with the given mean and sd (right-skewed like the
 * naturalistic figures: mean about 5–6 s, most between 2 and 10 s), redrawn outside [min, max], and
 * rounded to whole 2 ms so that the start, crossing and end times fall on the millisecond grid.
 */
export function sampleLaneChangeDuration(rng: Rng, mean: number, sd: number, min: number, max: number): number {
  const { mu, sigma } = logNormalParams(mean, sd);
  for (let i = 0; i < 1000; i++) {
    const d = Math.exp(rng.normal(mu, sigma));
    if (d >= min && d <= max) return Math.round(d * 500) / 500;
  }
  return Math.round(Math.min(max, Math.max(min, mean)) * 500) / 500;
}

/**
 * Lateral profiles of issue 11 beside the minimum-jerk one: 0 minimum-jerk, 1 constant lateral speed
 * (s = τ; the speed jumps at both ends, as in the continuous lane-change models of microscopic
 * traffic simulators), 2 half-cosine (1 − cos πτ)/2 (zero speed at both ends, a jump of the lateral
 * acceleration; common practice in path planning). Value, slope and curvature per shape code.
 */
export type ShapeCode = 0 | 1 | 2;

export function shapeValue(code: ShapeCode, tau: number): number {
  if (code === 0) return quinticShape(tau);
  if (tau <= 0) return 0;
  if (tau >= 1) return 1;
  return code === 1 ? tau : 0.5 * (1 - Math.cos(Math.PI * tau));
}

export function shapeSlope(code: ShapeCode, tau: number): number {
  if (code === 0) return quinticSlope(tau);
  if (tau < 0 || tau >= 1) return 0;
  return code === 1 ? 1 : 0.5 * Math.PI * Math.sin(Math.PI * tau);
}

export function shapeCurvature(code: ShapeCode, tau: number): number {
  if (code === 0) return quinticCurvature(tau);
  if (tau < 0 || tau >= 1 || code === 1) return 0;
  return 0.5 * Math.PI * Math.PI * Math.cos(Math.PI * tau);
}

/** The τ where the shape reaches fraction f of its travel. */
export function shapeInverse(code: ShapeCode, f: number): number {
  if (f <= 0) return 0;
  if (f >= 1) return 1;
  if (code === 0) return quinticInverse(f);
  return code === 1 ? f : Math.acos(1 - 2 * f) / Math.PI;
}
