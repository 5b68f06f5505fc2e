import { InputError } from "../core/errors.js";

/** Options of {@link savitzkyGolay}. */
export interface SavitzkyGolayOptions {
  /** Window length in samples: odd, greater than `order`, at most `values.length`. */
  window: number;
  /** Degree of the fitted polynomial, 0 <= order < window. */
  order: number;
  /** Which derivative to return: 0 = smoothed values (default), 1 = first, 2 = second derivative. */
  derivative?: 0 | 1 | 2;
  /** Sample spacing; derivatives are divided by dt^derivative. Default 1 (per sample). */
  dt?: number;
}

/**
 * Savitzky–Golay smoothing and differentiation (A. Savitzky & M. J. E. Golay, "Smoothing and
 * differentiation of data by simplified least squares procedures", Anal. Chem. 36(8), 1964): at each
 * sample a polynomial of degree `order` is fitted by least squares to the `window` samples centred on
 * it, and its value or derivative at the centre is returned. For the first and last (window-1)/2
 * samples the polynomial fitted to the first / last full window is evaluated at the edge sample
 * itself, so no padding value is invented. Samples are assumed equally spaced by `dt`.
 *
 * Cost O(n · window) after the coefficient tables are built (cached per window/order/derivative).
 */
export function savitzkyGolay(values: Float64Array, options: SavitzkyGolayOptions): Float64Array {
  const { window, order } = options;
  const derivative = options.derivative ?? 0;
  const dt = options.dt ?? 1;
  const n = values.length;
  if (!Number.isInteger(window) || window < 1 || window % 2 !== 1)
    throw new InputError(`window=${window} should be an odd integer >= 1`);
  if (!Number.isInteger(order) || order < 0 || order >= window)
    throw new InputError(`order=${order} should be an integer with 0 <= order < window=${window}`);
  if (derivative !== 0 && derivative !== 1 && derivative !== 2)
    throw new InputError(`derivative=${String(derivative)} should be 0, 1 or 2`);
  if (!(dt > 0) || !Number.isFinite(dt)) throw new InputError(`dt=${dt} should be a finite number > 0`);
  if (window > n)
    throw new InputError(`window=${window} should be <= values.length=${n}`);

  const out = new Float64Array(n);
  if (n === 0) return out;
  const table = coefficientTable(window, order, derivative);
  const m = (window - 1) >> 1;
  const scale = 1 / Math.pow(dt, derivative);
  const centre = table[m]!;
  // Interior: a convolution with the centre coefficients, which are symmetric (even derivative) or
  // antisymmetric (odd derivative) about the centre; folding the window halves the multiplications.
  const half = centre.subarray(m);
  if (derivative === 1) {
    for (let i = m; i < n - m; i++) {
      let s = 0;
      for (let k = 1; k <= m; k++) s += half[k]! * (values[i + k]! - values[i - k]!);
      out[i] = s * scale;
    }
  } else {
    for (let i = m; i < n - m; i++) {
      let s = half[0]! * values[i]!;
      for (let k = 1; k <= m; k++) s += half[k]! * (values[i + k]! + values[i - k]!);
      out[i] = s * scale;
    }
  }
  // Edges: the first window's polynomial evaluated at samples 0..m-1, the last window's at n-m..n-1.
  for (let i = 0; i < m; i++) {
    const h = table[i]!;
    let s = 0;
    for (let k = 0; k < window; k++) s += h[k]! * values[k]!;
    out[i] = s * scale;
  }
  const last = n - window;
  for (let i = n - m; i < n; i++) {
    const h = table[i - last]!;
    let s = 0;
    for (let k = 0; k < window; k++) s += h[k]! * values[last + k]!;
    out[i] = s * scale;
  }
  return out;
}

const cache = new Map<string, Float64Array[]>();

/**
 * Coefficients h[s][k] such that sum_k h[s][k] * v[k] is the `derivative`-th derivative (per sample) at
 * position s (0..window-1) of the least-squares polynomial of degree `order` through v[0..window-1].
 * Cached; the returned arrays must not be modified.
 */
export function savitzkyGolayCoefficients(window: number, order: number, derivative: 0 | 1 | 2): Float64Array[] {
  if (!Number.isInteger(window) || window < 1 || window % 2 !== 1)
    throw new InputError(`window=${window} should be an odd integer >= 1`);
  if (!Number.isInteger(order) || order < 0 || order >= window)
    throw new InputError(`order=${order} should be an integer with 0 <= order < window=${window}`);
  return coefficientTable(window, order, derivative).map((h) => h.slice());
}

function coefficientTable(window: number, order: number, derivative: number): Float64Array[] {
  const key = `${window}/${order}/${derivative}`;
  const hit = cache.get(key);
  if (hit) return hit;
  const m = (window - 1) >> 1;
  const p = order + 1;
  // The abscissa is scaled to z = (k - m) / m in [-1, 1] so that the normal equations stay well
  // conditioned for long windows; derivatives pick up a factor 1/m per order.
  const zs = m > 0 ? 1 / m : 1;
  const A = new Float64Array(window * p);
  for (let k = 0; k < window; k++) {
    const z = (k - m) * zs;
    let pw = 1;
    for (let j = 0; j < p; j++) {
      A[k * p + j] = pw;
      pw *= z;
    }
  }
  // Gram matrix G = AᵀA, factorised once (Cholesky).
  const G = new Float64Array(p * p);
  for (let a = 0; a < p; a++)
    for (let b = 0; b < p; b++) {
      let s = 0;
      for (let k = 0; k < window; k++) s += A[k * p + a]! * A[k * p + b]!;
      G[a * p + b] = s;
    }
  const L = cholesky(G, p);
  const table: Float64Array[] = [];
  const v = new Float64Array(p);
  for (let pos = 0; pos < window; pos++) {
    // v_j = d^derivative/dz^derivative of z^j at this position.
    const z = (pos - m) * zs;
    for (let j = 0; j < p; j++) {
      if (j < derivative) {
        v[j] = 0;
        continue;
      }
      let c = 1;
      for (let q = 0; q < derivative; q++) c *= j - q;
      v[j] = c * Math.pow(z, j - derivative);
    }
    const y = choleskySolve(L, p, v);
    const h = new Float64Array(window);
    const dscale = Math.pow(zs, derivative);
    for (let k = 0; k < window; k++) {
      let s = 0;
      for (let j = 0; j < p; j++) s += A[k * p + j]! * y[j]!;
      h[k] = s * dscale;
    }
    table.push(h);
  }
  cache.set(key, table);
  return table;
}

function cholesky(G: Float64Array, p: number): Float64Array {
  const L = new Float64Array(p * p);
  for (let i = 0; i < p; i++)
    for (let j = 0; j <= i; j++) {
      let s = G[i * p + j]!;
      for (let k = 0; k < j; k++) s -= L[i * p + k]! * L[j * p + k]!;
      if (i === j) L[i * p + i] = Math.sqrt(s);
      else L[i * p + j] = s / L[j * p + j]!;
    }
  return L;
}

function choleskySolve(L: Float64Array, p: number, b: Float64Array): Float64Array {
  const y = new Float64Array(p);
  for (let i = 0; i < p; i++) {
    let s = b[i]!;
    for (let k = 0; k < i; k++) s -= L[i * p + k]! * y[k]!;
    y[i] = s / L[i * p + i]!;
  }
  for (let i = p - 1; i >= 0; i--) {
    let s = y[i]!;
    for (let k = i + 1; k < p; k++) s -= L[k * p + i]! * y[k]!;
    y[i] = s / L[i * p + i]!;
  }
  return y;
}
