import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { addOuterProducts4, symmetricEigen } from "./_symEigen.js";

export interface PcaResult {
  /** n × nComponents: the rows projected on the components (centred first). */
  scores: Matrix;
  /** nComponents × d: unit principal axes, one per row, by decreasing variance. */
  components: Matrix;
  /** Variance along each component (eigenvalue of the sample covariance, denominator n - 1). */
  explainedVariance: Float64Array;
  /** explainedVariance / total variance (sum over all d directions). */
  explainedVarianceRatio: Float64Array;
  /** Per-feature mean that was subtracted. */
  mean: Float64Array;
  warnings: string[];
}

/**
 * Principal component analysis (Pearson 1901; Hotelling 1933), exact: eigen-decomposition of the
 * d × d sample covariance (Householder + QL, see _symEigen.ts), O(n·d² + d³). Signs follow
 * scikit-learn 1.2's `svd_flip` (u-based): in each score column the entry of largest magnitude is
 * positive, so results compare one-to-one with sklearn.decomposition.PCA.
 */
export function pca(X: Matrix, nComponents: number): PcaResult {
  if (!X || !(X.data instanceof Float64Array) || X.data.length !== X.rows * X.cols)
    throw new InputError("X should be a Matrix { data: Float64Array, rows, cols } with data.length = rows*cols");
  const n = X.rows;
  const d = X.cols;
  if (n < 2) throw new InputError(`n_samples=${n} should be >= 2 for PCA`);
  const maxC = Math.min(n, d);
  if (!Number.isInteger(nComponents) || nComponents < 1 || nComponents > maxC)
    throw new InputError(`nComponents=${nComponents} should be an integer in [1, min(n_samples, n_features)=${maxC}]`);
  const data = X.data;
  for (let i = 0; i < data.length; i++)
    if (!Number.isFinite(data[i]!))
      throw new InputError(`X: row ${Math.floor(i / d)}, column ${i % d} is ${data[i]}; expected a finite number`, {
        row: Math.floor(i / d),
        column: String(i % d),
        value: data[i],
      });
  const mean = new Float64Array(d);
  for (let i = 0; i < n; i++) for (let t = 0; t < d; t++) mean[t]! += data[i * d + t]!;
  for (let t = 0; t < d; t++) mean[t]! /= n;
  const cov = covariance(data, n, d, mean);
  const { values, vectors } = symmetricEigen(cov, d);
  let total = 0;
  for (let t = 0; t < d; t++) total += Math.max(0, values[t]!);
  const c = nComponents;
  const components: Matrix = { data: vectors.slice(0, c * d), rows: c, cols: d };
  const scores = project(X, mean, components);
  // svd_flip, u-based: the largest-magnitude score of each component is made positive.
  for (let j = 0; j < c; j++) {
    let best = 0;
    let arg = 0;
    for (let i = 0; i < n; i++) {
      const a = Math.abs(scores.data[i * c + j]!);
      if (a > best) {
        best = a;
        arg = i;
      }
    }
    if (scores.data[arg * c + j]! < 0) {
      for (let i = 0; i < n; i++) scores.data[i * c + j] = -scores.data[i * c + j]!;
      for (let t = 0; t < d; t++) components.data[j * d + t] = -components.data[j * d + t]!;
    }
  }
  const explainedVariance = Float64Array.from(values.subarray(0, c), (v) => Math.max(0, v));
  const explainedVarianceRatio = Float64Array.from(explainedVariance, (v) => (total > 0 ? v / total : 0));
  const warnings: string[] = [];
  if (total === 0) warnings.push("all rows are identical: zero variance, components are arbitrary");
  return { scores, components, explainedVariance, explainedVarianceRatio, mean, warnings };
}

/** Project rows (for example new scenarios) onto a fitted PCA: (X - mean) · componentsᵀ. */
export function pcaTransform(fit: Pick<PcaResult, "components" | "mean">, X: Matrix): Matrix {
  if (X.cols !== fit.mean.length) throw new InputError(`X has ${X.cols} columns; the PCA was fitted on ${fit.mean.length}`);
  return project(X, fit.mean, fit.components);
}

function project(X: Matrix, mean: Float64Array, comps: Matrix): Matrix {
  const n = X.rows;
  const d = X.cols;
  const c = comps.rows;
  const out = new Float64Array(n * c);
  const v = new Float64Array(d);
  for (let i = 0; i < n; i++) {
    for (let t = 0; t < d; t++) v[t] = X.data[i * d + t]! - mean[t]!;
    for (let j = 0; j < c; j++) {
      let s = 0;
      const co = j * d;
      for (let t = 0; t < d; t++) s += v[t]! * comps.data[co + t]!;
      out[i * c + j] = s;
    }
  }
  return { data: out, rows: n, cols: c };
}

/** Sample covariance (denominator n - 1), rows taken 4 at a time so each pass over it does 4 updates. */
function covariance(data: Float64Array, n: number, d: number, mean: Float64Array): Float64Array {
  const cov = new Float64Array(d * d);
  const U = new Float64Array(4 * d);
  for (let i0 = 0; i0 < n; i0 += 4) {
    const nb = Math.min(4, n - i0);
    U.fill(0);
    for (let q = 0; q < nb; q++) {
      const o = (i0 + q) * d;
      for (let t = 0; t < d; t++) U[q * d + t] = data[o + t]! - mean[t]!;
    }
    addOuterProducts4(cov, U, d);
  }
  for (let a = 0; a < d; a++)
    for (let b = a; b < d; b++) {
      const v = cov[a * d + b]! / (n - 1);
      cov[a * d + b] = v;
      cov[b * d + a] = v;
    }
  return cov;
}
