import { InputError } from "../core/errors.js";
import { renameDeprecated } from "../core/aliases.js";
import { DEFAULTS } from "../core/defaults.js";
import { checkLevel } from "../exposure/poissonInterval.js";
import { normalQuantile } from "../exposure/gamma.js";
import { frequencyCounts, type FrequencyCounts } from "./abundance.js";

export type Chao1Variant = "bias-corrected" | "classic";

export interface Chao1Options {
  /**
   * "bias-corrected" (default): S_obs + f1 (f1 − 1) / (2 (f2 + 1)) (Chao 1987; finite for f2 = 0);
   * "classic": S_obs + f1² / (2 f2) (Chao 1984), which falls back to the bias-corrected form when f2 = 0.
   */
  variant?: Chao1Variant;
  /** Multiply the unseen term by (n − 1) / n, as in Chao (2005) and the iNEXT/SpadeR software (default false). */
  finiteSampleFactor?: boolean;
  /** Confidence level of the interval (default DEFAULTS.confidence = 0.95). */
  confidence?: number;
  /** @deprecated use confidence (accepted for one version). */
  level?: number;
}

export interface Chao1Result {
  n: number;
  sObs: number;
  f1: number;
  f2: number;
  /** Estimated number of kinds not seen yet. */
  f0: number;
  /** Estimated total number of kinds, S_obs + f0. */
  estimate: number;
  variance: number;
  se: number;
  lower: number;
  upper: number;
  level: number;
  variant: Chao1Variant;
  finiteSampleFactor: boolean;
}

/** f0 (the unseen-kind term) for the chosen variant. */
export function chao1F0(fc: Pick<FrequencyCounts, "n" | "f1" | "f2">, variant: Chao1Variant = "bias-corrected", finiteSampleFactor = false): number {
  const { n, f1, f2 } = fc;
  const k = finiteSampleFactor ? (n - 1) / n : 1;
  if (variant === "classic" && f2 > 0) return (k * f1 * f1) / (2 * f2);
  return (k * f1 * (f1 - 1)) / (2 * (f2 + 1));
}

/**
 * Chao1 estimate of the number of kinds with its log-normal confidence interval (Chao 1987,
 * "Estimating the population size for capture–recapture data with unequal catchability",
 * Biometrics 43, 783–791): with T = Ŝ − S_obs and K = exp(z √ln(1 + var/T²)), the interval is
 * [S_obs + T/K, S_obs + T·K], so it never falls below S_obs.
 * Variances: classic (Chao 1987) f2 [½(f1/f2)² + (f1/f2)³ + ¼(f1/f2)⁴]; bias-corrected (Chao 2005,
 * "Species estimation and applications", Encyclopedia of Statistical Sciences)
 * f1(f1−1)/(2(f2+1)) + f1(2f1−1)²/(4(f2+1)²) + f1²f2(f1−1)²/(4(f2+1)⁴); for f2 = 0 both use
 * f1(f1−1)/2 + f1(2f1−1)²/4 − f1⁴/(4Ŝ); with the (n−1)/n factor where chosen. When T = 0 (no
 * unseen term) the interval follows Chao's SPADE rule: P = Σ f_k e^{−k}/S_obs and
 * [max(S_obs, S_obs/(1−P) − z√v/(1−P)), S_obs/(1−P) + z√v/(1−P)] with
 * v = Σ f_k (e^{−k} − e^{−2k}) − (Σ k e^{−k} f_k)²/n.
 */
export function chao1(counts: ArrayLike<number>, options: Chao1Options = {}): Chao1Result {
  const variant = options.variant ?? "bias-corrected";
  if (variant !== "bias-corrected" && variant !== "classic") throw new InputError(`variant="${String(variant)}" should be "bias-corrected" or "classic"`);
  const factor = options.finiteSampleFactor ?? false;
  const level = renameDeprecated(options, { level: "confidence" }, "chao1 options").confidence ?? DEFAULTS.confidence;
  checkLevel(level);
  const z = normalQuantile(1 - (1 - level) / 2);
  const fc = frequencyCounts(counts);
  const { n, sObs, f1, f2, f } = fc;
  const k = factor ? (n - 1) / n : 1;
  const f0 = chao1F0(fc, variant, factor);
  const estimate = sObs + f0;
  let variance: number;
  if (f2 > 0 && variant === "classic") {
    const r = f1 / f2;
    variance = f2 * ((k * r * r) / 2 + k * k * r * r * r + (k * k * r * r * r * r) / 4);
  } else if (f2 > 0) {
    const d = f2 + 1;
    variance = (k * f1 * (f1 - 1)) / (2 * d) + (k * k * f1 * (2 * f1 - 1) ** 2) / (4 * d * d) + (k * k * f1 * f1 * f2 * (f1 - 1) ** 2) / (4 * d ** 4);
  } else {
    variance = (k * f1 * (f1 - 1)) / 2 + (k * k * f1 * (2 * f1 - 1) ** 2) / 4 - (k * k * f1 ** 4) / (4 * estimate);
  }
  let lower: number;
  let upper: number;
  if (f0 > 0) {
    const K = Math.exp(z * Math.sqrt(Math.log(1 + Math.max(variance, 0) / (f0 * f0))));
    lower = sObs + f0 / K;
    upper = sObs + f0 * K;
  } else {
    let p = 0;
    let a = 0;
    let b = 0;
    for (let x = 1; x < f.length; x++) {
      const fx = f[x]!;
      if (fx === 0) continue;
      const e = Math.exp(-x);
      p += fx * e;
      a += fx * (e - e * e);
      b += x * e * fx;
    }
    p /= sObs;
    variance = Math.max(0, a - (b * b) / n);
    const half = (z * Math.sqrt(variance)) / (1 - p);
    lower = Math.max(sObs, sObs / (1 - p) - half);
    upper = sObs / (1 - p) + half;
  }
  return { n, sObs, f1, f2, f0, estimate, variance, se: Math.sqrt(variance), lower, upper, level, variant, finiteSampleFactor: factor };
}
