import { erfc, normalQuantile } from "../exposure/gamma.js";

/** Standard normal CDF. */
export const normalCdf = (x: number): number => 0.5 * erfc(-x / Math.SQRT2);
export { normalQuantile };

/**
 * Weighted quantile by the inverted empirical CDF: the smallest value whose cumulative weight
 * reaches q·W (numpy.quantile(..., weights=w, method="inverted_cdf")). `order` sorts `values`.
 */
export function weightedQuantile(values: ArrayLike<number>, weights: ArrayLike<number>, q: number, order?: number[]): number {
  const idx = order ?? sortedOrder(values);
  let total = 0;
  for (const i of idx) total += weights[i]!;
  const target = q * total;
  let c = 0;
  for (const i of idx) {
    c += weights[i]!;
    // Relative slack against rounding in the running sum.
    if (c >= target * (1 - 1e-12)) return values[i]!;
  }
  return values[idx[idx.length - 1]!]!;
}

export function sortedOrder(values: ArrayLike<number>): number[] {
  return Array.from({ length: values.length }, (_, i) => i).sort((a, b) => values[a]! - values[b]! || a - b);
}

/** Lower Cholesky factor of a symmetric positive (semi-)definite matrix, with a small ridge when needed. */
export function cholesky(a: number[][]): number[][] {
  const n = a.length;
  for (let ridge = 0; ridge <= 1e-2; ridge = ridge === 0 ? 1e-10 : ridge * 10) {
    const L = Array.from({ length: n }, () => new Array<number>(n).fill(0));
    let ok = true;
    for (let i = 0; i < n && ok; i++)
      for (let j = 0; j <= i; j++) {
        let s = a[i]![j]! + (i === j ? ridge : 0);
        for (let k = 0; k < j; k++) s -= L[i]![k]! * L[j]![k]!;
        if (i === j) {
          if (!(s > 0)) {
            ok = false;
            break;
          }
          L[i]![i] = Math.sqrt(s);
        } else L[i]![j] = s / L[j]![j]!;
      }
    if (ok) return L;
  }
  return Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => (i === j ? 1 : 0)));
}
