import { InputError } from "../core/errors.js";
/**
 * Zero-failure demonstration: with no event in d units of exposure, a Poisson rate below r is shown at
 * confidence C when e^{−r d} ≤ 1 − C, i.e. d = −ln(1 − C) / r. Kalra & Paddock (2016, "Driving to
 * safety", Transportation Research Part A 94, 182–193): 1.09 fatalities per 100 million miles at
 * 95 % needs about 275 million failure-free miles.
 */
export function zeroFailureDistance(rate: number, confidence = 0.95): number {
  if (!(rate > 0) || !Number.isFinite(rate)) throw new InputError(`rate=${rate} should be a finite number > 0 (events per unit of exposure)`);
  if (!(confidence > 0 && confidence < 1)) throw new InputError(`confidence=${confidence} should be strictly between 0 and 1`);
  return -Math.log1p(-confidence) / rate;
}

/** The rate bound d units of failure-free exposure demonstrate at confidence C: −ln(1 − C) / d. */
export function zeroFailureRateBound(distance: number, confidence = 0.95): number {
  if (!(distance > 0) || !Number.isFinite(distance)) throw new InputError(`distance=${distance} should be a finite number > 0`);
  if (!(confidence > 0 && confidence < 1)) throw new InputError(`confidence=${confidence} should be strictly between 0 and 1`);
  return -Math.log1p(-confidence) / distance;
}

/** Kilometres in one statute mile (exact by definition, 1959 international yard and pound). */
export const KM_PER_MILE = 1.609344;
