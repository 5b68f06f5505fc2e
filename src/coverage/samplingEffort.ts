import { InputError } from "../core/errors.js";
import { frequencyCounts } from "./abundance.js";
import { chao1F0, type Chao1Variant } from "./chao1.js";

export type EffortMethod = "chao2009" | "exact";

export interface EffortOptions {
  /** Estimated unseen kinds f0; default the Chao1 f0 of `variant`. */
  f0?: number;
  variant?: Chao1Variant;
  finiteSampleFactor?: boolean;
  /**
   * "chao2009" (default): m_g = (n f0 / f1) ln[f0 / ((1 − g) Ŝ)], Chao, Colwell, Lin & Gotelli (2009,
   * "Sufficient sampling for asymptotic minimum species richness estimators", Ecology 90, 1125–1133,
   * Eq. 12), which with f0 = f1²/(2 f2) is the published (n f1 / (2 f2)) ln[f0 / ((1 − g) Ŝ)].
   * "exact": the m* that solves the Shen–Chao–Lin extrapolation S(n + m*) = g Ŝ exactly; the
   * published formula is its large-n approximation (1 − f1/(n f0 + f1))^m ≈ exp(−m f1/(n f0)).
   */
  method?: EffortMethod;
}

/**
 * Additional observations needed, beyond the n in hand, to expect to have seen a share g of the
 * estimated number of kinds Ŝ = S_obs + f0. 0 when S_obs already reaches g Ŝ (or nothing is unseen);
 * Infinity for g = 1.
 */
export function additionalSamplesForShare(counts: ArrayLike<number>, g: number, options: EffortOptions = {}): number {
  if (!(g > 0 && g <= 1)) throw new InputError(`g=${g} should be a share in (0, 1]`);
  const fc = frequencyCounts(counts);
  const { n, sObs, f1 } = fc;
  const f0 = options.f0 ?? chao1F0(fc, options.variant, options.finiteSampleFactor);
  const sEst = sObs + f0;
  if (f0 === 0 || f1 === 0 || sObs >= g * sEst) return 0;
  if (g === 1) return Infinity;
  const ratio = f0 / ((1 - g) * sEst);
  const method = options.method ?? "chao2009";
  switch (method) {
    case "chao2009":
      return ((n * f0) / f1) * Math.log(ratio);
    case "exact":
      return -Math.log(ratio) / Math.log1p(-f1 / (n * f0 + f1));
    default: {
      const never: never = method;
      throw new InputError(`method "${String(never)}" should be "chao2009" or "exact"`);
    }
  }
}
