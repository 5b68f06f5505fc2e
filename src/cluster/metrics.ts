import { DEFAULTS } from "../core/defaults.js";
import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import { checkInt, checkLabels, checkMatrix } from "./_validate.js";
import { condensedDistances, silhouetteFromCondensed } from "./_pairwise.js";

export interface SilhouetteOptions {
  /** Rows above which the score is computed on a seeded uniform sample. Default 5000. */
  sampleSize?: number;
  seed?: number;
  rng?: Rng;
}

export interface SilhouetteResult {
  /** Mean silhouette over the rows used (noise rows, label -1, excluded). */
  score: number;
  /** Rows the score was computed on (after sampling, before dropping noise). */
  sampleSize: number;
  /** True when every row took part (no sampling). */
  exact: boolean;
  /** Indices of the rows used (increasing) and their per-row silhouette values (NaN for noise). */
  rows: Int32Array;
  values: Float64Array;
}

/** Default row count for exact silhouettes; larger inputs are sampled. */
export const SILHOUETTE_SAMPLE_SIZE = 5000;

/**
 * Mean silhouette coefficient (Rousseeuw 1987), as scikit-learn's silhouette_score: a number, like
 * calinskiHarabasz and daviesBouldin. Exact when n <= sampleSize, otherwise on a seeded uniform
 * sample (see silhouetteDetail for the sample, the per-row values and whether it was exact).
 */
export function silhouette(X: Matrix, labels: Int32Array, options: SilhouetteOptions = {}): number {
  return silhouetteDetail(X, labels, options).score;
}

/**
 * The silhouette with its working: mean score, per-row values, the rows used. Exact when
 * n <= sampleSize, otherwise on a seeded uniform sample of sampleSize rows (distances only among the
 * sampled rows, as silhouette_score(sample_size=…) does).
 */
export function silhouetteDetail(X: Matrix, labels: Int32Array, options: SilhouetteOptions = {}): SilhouetteResult {
  checkMatrix(X, "X");
  const k = checkLabels(labels, X.rows);
  const sampleSize = checkInt("sampleSize", options.sampleSize ?? SILHOUETTE_SAMPLE_SIZE, 2);
  const rng = options.rng ?? new Rng(options.seed ?? DEFAULTS.seed);
  const exact = X.rows <= sampleSize;
  const rows = exact ? Int32Array.from({ length: X.rows }, (_, i) => i) : rng.fork("silhouette").sampleIndices(X.rows, sampleSize);
  const sub = Int32Array.from(rows, (r) => labels[r]!);
  const used = new Set<number>();
  for (const l of sub) if (l >= 0) used.add(l);
  const nonNoise = sub.reduce((a, l) => a + (l >= 0 ? 1 : 0), 0);
  if (used.size < 2 || used.size > nonNoise - 1)
    throw new InputError(
      `silhouette needs 2 <= n_labels <= n_samples - 1; got ${used.size} label(s) on ${nonNoise} non-noise row(s)${exact ? "" : " of the sample"}`,
    );
  const D = condensedDistances(X, exact ? null : rows);
  const values = silhouetteFromCondensed(D, sub, rows.length, k);
  return { score: meanIgnoringNaN(values), sampleSize: rows.length, exact, rows, values };
}

export function meanIgnoringNaN(v: Float64Array): number {
  let s = 0;
  let c = 0;
  for (const x of v)
    if (!Number.isNaN(x)) {
      s += x;
      c++;
    }
  return c > 0 ? s / c : NaN;
}

function centroidsOf(X: Matrix, labels: Int32Array, k: number): { C: Float64Array; counts: Float64Array; mean: Float64Array; n: number } {
  const d = X.cols;
  const C = new Float64Array(k * d);
  const counts = new Float64Array(k);
  const mean = new Float64Array(d);
  let n = 0;
  for (let i = 0; i < X.rows; i++) {
    const l = labels[i]!;
    if (l < 0) continue;
    n++;
    counts[l]!++;
    for (let t = 0; t < d; t++) {
      C[l * d + t]! += X.data[i * d + t]!;
      mean[t]! += X.data[i * d + t]!;
    }
  }
  for (let j = 0; j < k; j++) if (counts[j]! > 0) for (let t = 0; t < d; t++) C[j * d + t]! /= counts[j]!;
  for (let t = 0; t < d; t++) mean[t]! /= n;
  return { C, counts, mean, n };
}

function nonEmpty(counts: Float64Array): number {
  let c = 0;
  for (const v of counts) if (v > 0) c++;
  return c;
}

/**
 * Calinski–Harabasz index (Calinski & Harabasz, "A dendrite method for cluster analysis", Commun.
 * Stat. 3, 1974): [B / (k - 1)] / [W / (n - k)] with B the between-cluster and W the within-cluster
 * sum of squares. Higher is better. Noise rows (-1) are left out.
 */
export function calinskiHarabasz(X: Matrix, labels: Int32Array): number {
  checkMatrix(X, "X");
  const kk = checkLabels(labels, X.rows);
  const { C, counts, mean, n } = centroidsOf(X, labels, kk);
  const k = nonEmpty(counts);
  if (k < 2 || k > n - 1) throw new InputError(`calinskiHarabasz needs 2 <= n_labels <= n_samples - 1; got ${k} on ${n} row(s)`);
  const d = X.cols;
  let B = 0;
  let W = 0;
  for (let j = 0; j < kk; j++) {
    if (counts[j] === 0) continue;
    let s = 0;
    for (let t = 0; t < d; t++) s += (C[j * d + t]! - mean[t]!) ** 2;
    B += counts[j]! * s;
  }
  for (let i = 0; i < X.rows; i++) {
    const l = labels[i]!;
    if (l < 0) continue;
    for (let t = 0; t < d; t++) W += (X.data[i * d + t]! - C[l * d + t]!) ** 2;
  }
  return W === 0 ? 1 : (B * (n - k)) / (W * (k - 1));
}

/**
 * Davies–Bouldin index (Davies & Bouldin, "A cluster separation measure", IEEE TPAMI 1, 1979): mean
 * over clusters of max_j (s_i + s_j) / d(c_i, c_j), s = mean distance of a cluster's rows to its
 * centroid. Lower is better; 0 when all clusters are points (scikit-learn's convention). Noise rows
 * (-1) are left out.
 */
export function daviesBouldin(X: Matrix, labels: Int32Array): number {
  checkMatrix(X, "X");
  const kk = checkLabels(labels, X.rows);
  const { C, counts, n } = centroidsOf(X, labels, kk);
  const k = nonEmpty(counts);
  if (k < 2 || k > n - 1) throw new InputError(`daviesBouldin needs 2 <= n_labels <= n_samples - 1; got ${k} on ${n} row(s)`);
  const d = X.cols;
  const s = new Float64Array(kk);
  for (let i = 0; i < X.rows; i++) {
    const l = labels[i]!;
    if (l < 0) continue;
    let q = 0;
    for (let t = 0; t < d; t++) q += (X.data[i * d + t]! - C[l * d + t]!) ** 2;
    s[l]! += Math.sqrt(q);
  }
  const ids: number[] = [];
  for (let j = 0; j < kk; j++)
    if (counts[j]! > 0) {
      s[j]! /= counts[j]!;
      ids.push(j);
    }
  let allIntraZero = true;
  for (const j of ids) if (s[j]! > 1e-12) allIntraZero = false;
  let allCentresSame = true;
  let total = 0;
  for (const a of ids) {
    let worst = 0;
    for (const b of ids) {
      if (a === b) continue;
      let q = 0;
      for (let t = 0; t < d; t++) q += (C[a * d + t]! - C[b * d + t]!) ** 2;
      const dist = Math.sqrt(q);
      if (dist > 1e-12) allCentresSame = false;
      const r = dist === 0 ? 0 : (s[a]! + s[b]!) / dist;
      if (r > worst) worst = r;
    }
    total += worst;
  }
  if (allIntraZero || allCentresSame) return 0;
  return total / ids.length;
}
