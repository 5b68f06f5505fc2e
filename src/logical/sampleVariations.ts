import type { Rng } from "../core/rng.js";
import type { FittedLogicalScenario } from "./fitLogicalScenarios.js";
import { cholesky, normalCdf } from "./stats.js";

export interface Variation {
  values: Record<string, number | null>;
  /** Likelihood ratio p/q of the draw (1 without importance sampling). */
  weight: number;
}

/**
 * Draw `count` concrete variations of a logical scenario from its fitted distribution: a Gaussian
 * copula (the rank correlation of the dependence block) with the exposure-weighted empirical
 * marginals (inverse of the weighted ECDF, so every value lies inside the recorded range and the
 * physical bounds); a parameter is null with its recorded not-measurable share.
 *
 * With shift > 0 the normal scores are drawn from N(μ, R) instead of N(0, R), μ_j = ∓shift on the
 * parameters whose dangerous side is low / high (importance sampling towards the critical region);
 * each draw then carries the likelihood ratio w = φ_R(z) / φ_R(z − μ) = exp(−aᵀε − ½aᵀa) with
 * a = L⁻¹μ, z = μ + Lε, R = LLᵀ, so that Σ w f / N is an unbiased estimate of the exposure-weighted mean.
 */
export function sampleVariations(ls: FittedLogicalScenario, count: number, rng: Rng, shift = 0): Variation[] {
  const dep = ls.dependence;
  const names = ls.marginals.map((m) => m.name);
  const block = dep ? dep.parameters : [];
  const inBlock = new Map(block.map((p, i) => [p, i]));
  const L = dep ? cholesky(dep.correlation) : [];
  const b = block.length;
  // Shift per coordinate: copula block first, then the independent parameters.
  const order = [...block, ...names.filter((p) => !inBlock.has(p))];
  const mu = order.map((p) => {
    const side = ls.marginals.find((m) => m.name === p)!.spec.critical;
    return shift > 0 && side ? (side === "low" ? -shift : shift) : 0;
  });
  // a = L⁻¹ μ on the block (forward substitution); identity on the rest.
  const a = new Array<number>(order.length).fill(0);
  for (let i = 0; i < b; i++) {
    let s = mu[i]!;
    for (let k = 0; k < i; k++) s -= L[i]![k]! * a[k]!;
    a[i] = s / L[i]![i]!;
  }
  for (let i = b; i < order.length; i++) a[i] = mu[i]!;
  const aa = a.reduce((s, x) => s + x * x, 0);
  const out: Variation[] = [];
  for (let v = 0; v < count; v++) {
    const eps = order.map(() => rng.normal());
    const z = new Array<number>(order.length);
    for (let i = 0; i < b; i++) {
      let s = mu[i]!;
      for (let k = 0; k <= i; k++) s += L[i]![k]! * eps[k]!;
      z[i] = s;
    }
    for (let i = b; i < order.length; i++) z[i] = mu[i]! + eps[i]!;
    let ae = 0;
    for (let i = 0; i < order.length; i++) ae += a[i]! * eps[i]!;
    const weight = shift > 0 ? Math.exp(-ae - aa / 2) : 1;
    const values: Record<string, number | null> = {};
    for (const m of ls.marginals) {
      const i = order.indexOf(m.name);
      // The null draw uses its own stream so that the value draws do not shift with it.
      const isNull = m.values.length === 0 || (m.nullShare > 0 && rng.float() < m.nullShare);
      values[m.name] = isNull ? null : inverseEcdf(m.values, m.weights, normalCdf(z[i]!));
    }
    out.push({ values, weight });
  }
  return out;
}

/** Smallest value whose cumulative weight reaches u·W (values ascending). */
export function inverseEcdf(values: number[], weights: number[], u: number): number {
  let total = 0;
  for (const w of weights) total += w;
  const target = u * total;
  let c = 0;
  for (let i = 0; i < values.length; i++) {
    c += weights[i]!;
    if (c >= target) return values[i]!;
  }
  return values[values.length - 1]!;
}
