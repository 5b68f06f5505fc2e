import { InputError } from "../core/errors.js";
/**
 * Neumaier's improved Kahan summation (Neumaier 1974, "Rundungsfehleranalyse einiger Verfahren zur
 * Summation endlicher Summen", ZAMM 54). The error bound does not grow with the number of terms,
 * which is what lets kilometre shares over many scenarios add up to 1 within 1e-12.
 */
export function compensatedSum(values: ArrayLike<number>, indices?: ArrayLike<number>): number {
  let sum = 0;
  let c = 0;
  const n = indices ? indices.length : values.length;
  for (let k = 0; k < n; k++) {
    const v = indices ? values[indices[k]!]! : values[k]!;
    const t = sum + v;
    if (Math.abs(sum) >= Math.abs(v)) c += sum - t + v;
    else c += v - t + sum;
    sum = t;
  }
  return sum + c;
}

/**
 * Normalize non-negative weights to shares that add up to 1 (the total is a compensated sum; each
 * share is one division, so the float sum of the shares differs from 1 by a few ulps at most).
 */
export function toShares(weights: ArrayLike<number>): Float64Array {
  const total = compensatedSum(weights);
  if (!(total > 0) || !Number.isFinite(total)) throw new InputError(`weights add up to ${total}; expected a finite total > 0`);
  const out = new Float64Array(weights.length);
  for (let i = 0; i < weights.length; i++) {
    const w = weights[i]!;
    if (!(w >= 0) || !Number.isFinite(w)) throw new InputError(`weight ${i} is ${w}; expected a finite number >= 0`);
    out[i] = w / total;
  }
  return out;
}
