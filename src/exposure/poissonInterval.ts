import { InputError } from "../core/errors.js";
import { inverseRegularizedGamma } from "./gamma.js";

/** A two-sided confidence interval. */
export interface Interval {
  lower: number;
  upper: number;
  /** Confidence level, e.g. 0.95. */
  level: number;
}

/** Validate a confidence level once at the boundary. */
export function checkLevel(level: number, name = "level"): void {
  if (!(level > 0 && level < 1)) throw new InputError(`${name}=${level} should be a confidence level strictly between 0 and 1`);
}

/**
 * Exact (Garwood 1936) two-sided confidence interval for the mean of a Poisson count:
 * lower = ½ χ²(α/2; 2k), upper = ½ χ²(1 − α/2; 2k + 2) with α = 1 − level, written here as gamma
 * quantiles P⁻¹(k, α/2) and Q⁻¹(k + 1, α/2). For k = 0 the lower limit is 0.
 * Garwood, F. (1936) "Fiducial limits for the Poisson distribution", Biometrika 28, 437–442.
 */
export function poissonInterval(count: number, level = 0.95): Interval {
  if (!(Number.isInteger(count) && count >= 0)) throw new InputError(`count=${count} should be an integer >= 0`);
  checkLevel(level);
  const alpha = 1 - level;
  const lower = count === 0 ? 0 : inverseRegularizedGamma(count, alpha / 2);
  const upper = inverseRegularizedGamma(count + 1, alpha / 2, true);
  return { lower, upper, level };
}

/** A rate with its exact interval, per `per` units of exposure (e.g. per 1000 km). */
export interface RateEstimate {
  count: number;
  /** Exposure the count was observed over (e.g. km). */
  exposure: number;
  /** The unit multiplier of the rate (e.g. 1000 for "per 1000 km"). */
  per: number;
  rate: number;
  lower: number;
  upper: number;
  level: number;
}

/**
 * Rate of a Poisson count over an exposure, with the exact interval of the count scaled by the same
 * factor (the exposure is treated as known without error). Exposure 0 gives NaN rate and limits.
 */
export function poissonRate(count: number, exposure: number, per = 1, level = 0.95): RateEstimate {
  if (!(exposure >= 0) || !Number.isFinite(exposure)) throw new InputError(`exposure=${exposure} should be a finite number >= 0`);
  if (!(per > 0)) throw new InputError(`per=${per} should be > 0`);
  const ci = poissonInterval(count, level);
  const f = exposure > 0 ? per / exposure : NaN;
  return { count, exposure, per, rate: count * f, lower: ci.lower * f, upper: ci.upper * f, level };
}
