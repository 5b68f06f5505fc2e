import { InputError } from "../core/errors.js";
import { logGamma } from "../exposure/gamma.js";
import { chao1F0, type Chao1Variant } from "./chao1.js";
import { frequencyCounts, type FrequencyCounts } from "./abundance.js";

/**
 * ln [C(n − x, m) / C(n, m)]: the log-probability that a kind seen x times in n draws is missed by a
 * random subsample of m draws. A product of (1 − m/(n − j)) for small x (exact and precise), log-gamma
 * differences otherwise.
 */
function logMissProbability(n: number, x: number, m: number): number {
  if (n - x < m) return -Infinity;
  if (x <= 64) {
    let s = 0;
    for (let j = 0; j < x; j++) s += Math.log1p(-m / (n - j));
    return s;
  }
  return logGamma(n - x + 1) - logGamma(n - x - m + 1) - logGamma(n + 1) + logGamma(n - m + 1);
}

function checkSize(m: number, name: string): void {
  if (!(Number.isInteger(m) && m >= 0)) throw new InputError(`${name}=${m} should be an integer >= 0`);
}

/**
 * Expected number of distinct kinds in a random subsample of m of the n observations, without
 * replacement: E[S_m] = Σ_i [1 − C(n − X_i, m) / C(n, m)] (Hurlbert 1971, "The nonconcept of species
 * diversity", Ecology 52, 577–586). Evaluated per distinct count, so the cost grows with the number of
 * distinct counts rather than the number of kinds.
 */
export function rarefiedRichness(counts: ArrayLike<number>, m: number, fc: FrequencyCounts = frequencyCounts(counts)): number {
  checkSize(m, "m");
  const { n, f } = fc;
  if (m > n) throw new InputError(`m=${m} should be <= n=${n} for rarefaction; use extrapolatedRichness beyond n`);
  if (m === 0) return 0;
  let s = 0;
  for (let x = 1; x < f.length; x++) {
    const fx = f[x]!;
    if (fx === 0) continue;
    s += fx * -Math.expm1(logMissProbability(n, x, m));
  }
  return s;
}

export interface ExtrapolationOptions {
  /** Estimated number of unseen kinds; default the Chao1 f0 of `variant`. */
  f0?: number;
  variant?: Chao1Variant;
  finiteSampleFactor?: boolean;
}

/**
 * Expected number of distinct kinds after n + m* observations, m* ≥ 0 beyond the sample:
 * S_obs + f0 [1 − (1 − f1 / (n f0 + f1))^m*] (Shen, Chao & Lin 2003, "Predicting the number of new
 * species in further taxonomic sampling", Ecology 84, 798–804; Chao et al. 2014, Ecological
 * Monographs 84, 45–67, Eq. 9). It tends to S_obs + f0, the Chao1 estimate, as m* grows. The size
 * may be fractional (the formula is smooth in m*).
 */
export function extrapolatedRichness(counts: ArrayLike<number>, size: number, options: ExtrapolationOptions = {}, fc: FrequencyCounts = frequencyCounts(counts)): number {
  // Real sizes are allowed here: the formula is smooth in m*, which the effort calculation uses.
  if (!(size >= 0) || !Number.isFinite(size)) throw new InputError(`size=${size} should be a finite number >= 0`);
  const { n, sObs, f1 } = fc;
  if (size < n) throw new InputError(`size=${size} should be >= n=${n} for extrapolation; use rarefiedRichness below n`);
  const f0 = options.f0 ?? chao1F0(fc, options.variant, options.finiteSampleFactor);
  if (!(f0 >= 0)) throw new InputError(`f0=${f0} should be >= 0`);
  if (f1 === 0 || f0 === 0) return sObs;
  const mStar = size - n;
  // (1 − f1/(n f0 + f1))^m* via log1p/expm1 so that large n keeps its precision.
  return sObs + f0 * -Math.expm1(mStar * Math.log1p(-f1 / (n * f0 + f1)));
}

/** Expected kinds at any sample size: rarefaction up to n, extrapolation beyond. */
export function expectedRichness(counts: ArrayLike<number>, size: number, options: ExtrapolationOptions = {}): number {
  const fc = frequencyCounts(counts);
  return size <= fc.n ? rarefiedRichness(counts, size, fc) : extrapolatedRichness(counts, size, options, fc);
}
