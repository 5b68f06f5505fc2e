import { DEFAULTS } from "../core/defaults.js";
import type { Matrix } from "../core/matrix.js";
import { zeros } from "../core/matrix.js";
import { Rng } from "../core/rng.js";
import { InputError } from "../core/errors.js";
import { checkInt, checkMatrix, checkWeights } from "./_validate.js";

export interface KMeansPlusPlusOptions {
  seed?: number;
  rng?: Rng;
  weights?: Float64Array;
  /** Candidates tried per centre (greedy k-means++). Default 2 + floor(ln k), as scikit-learn. */
  localTrials?: number;
  /** Seed on a seeded uniform sample of this many rows when n is larger. Default: all rows. */
  sampleSize?: number;
}

/**
 * Greedy k-means++ seeding (Arthur & Vassilvitskii, SODA 2007, §2.2 D² weighting; the greedy variant
 * that keeps the best of several D²-sampled candidates is described in their §6 and is what
 * scikit-learn runs). The first centre is drawn with probability proportional to the weight, each
 * next one among `localTrials` candidates drawn with probability ∝ weight·D(x)², keeping the
 * candidate that lowers the weighted potential most. Returns centres that are real rows of X.
 */
export function kmeansPlusPlus(X: Matrix, k: number, options: KMeansPlusPlusOptions = {}): Matrix {
  checkMatrix(X, "X", 1);
  checkInt("k", k, 1);
  if (X.rows < k) throw new InputError(`n_samples=${X.rows} should be >= n_clusters=${k}`);
  return seedKMeansPlusPlus(X, k, options);
}

/** kmeansPlusPlus without the boundary checks, for callers that already validated X (kmeans). */
export function seedKMeansPlusPlus(X: Matrix, k: number, options: KMeansPlusPlusOptions): Matrix {
  const rng = options.rng ?? new Rng(options.seed ?? DEFAULTS.seed);
  const trials = checkInt("localTrials", options.localTrials ?? 2 + Math.floor(Math.log(k)), 1);
  const wAll = checkWeights(options.weights, X.rows);
  const sampleSize = options.sampleSize ?? Infinity;
  let rows: Int32Array | null = null;
  if (sampleSize < X.rows) rows = rng.fork("sample").sampleIndices(X.rows, Math.max(k, Math.floor(sampleSize)));
  const n = rows ? rows.length : X.rows;
  const d = X.cols;
  // The (sampled) rows, contiguous.
  const P = rows ? new Float64Array(n * d) : X.data;
  if (rows) for (let i = 0; i < n; i++) P.set(X.data.subarray(rows[i]! * d, rows[i]! * d + d), i * d);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) w[i] = wAll ? wAll[rows ? rows[i]! : i]! : 1;

  const centres = zeros(k, d);
  const closest = new Float64Array(n);
  const candDist = new Float64Array(trials * n);
  const cum = new Float64Array(n);
  const ids = new Int32Array(trials);
  const pots = new Float64Array(trials);
  // Cumulative sampling mass: weight · D² (or weight alone while every D² is 0).
  const prepare = (useD2: boolean): number => {
    let acc = 0;
    for (let i = 0; i < n; i++) cum[i] = acc += useD2 ? w[i]! * closest[i]! : w[i]!;
    return acc;
  };
  // Inverse-CDF lookup: first index whose cumulative mass reaches a uniform draw in [0, total).
  const draw = (total: number): number => {
    const u = rng.float() * total;
    let lo = 0;
    let hi = n - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (cum[mid]! <= u) lo = mid + 1;
      else hi = mid;
    }
    return lo;
  };

  const first = draw(prepare(false));
  centres.data.set(P.subarray(first * d, first * d + d), 0);
  let pot = 0;
  for (let i = 0; i < n; i++) {
    closest[i] = dist2(P, i * d, P, first * d, d);
    pot += w[i]! * closest[i]!;
  }
  for (let c = 1; c < k; c++) {
    const total = prepare(pot > 0);
    for (let t = 0; t < trials; t++) ids[t] = draw(total);
    pots.fill(0);
    // One pass over the rows for all candidates.
    for (let i = 0; i < n; i++) {
      const io = i * d;
      const ci = closest[i]!;
      const wi = w[i]!;
      for (let t = 0; t < trials; t++) {
        const s = dist2(P, io, P, ids[t]! * d, d);
        const m = s < ci ? s : ci;
        candDist[t * n + i] = m;
        pots[t]! += wi * m;
      }
    }
    let bt = 0;
    for (let t = 1; t < trials; t++) if (pots[t]! < pots[bt]!) bt = t;
    closest.set(candDist.subarray(bt * n, bt * n + n));
    pot = pots[bt]!;
    centres.data.set(P.subarray(ids[bt]! * d, ids[bt]! * d + d), c * d);
  }
  return centres;
}

function dist2(A: Float64Array, ao: number, B: Float64Array, bo: number, d: number): number {
  let s0 = 0;
  let s1 = 0;
  let s2 = 0;
  let s3 = 0;
  let t = 0;
  for (; t + 3 < d; t += 4) {
    const a0 = A[ao + t]! - B[bo + t]!;
    const a1 = A[ao + t + 1]! - B[bo + t + 1]!;
    const a2 = A[ao + t + 2]! - B[bo + t + 2]!;
    const a3 = A[ao + t + 3]! - B[bo + t + 3]!;
    s0 += a0 * a0;
    s1 += a1 * a1;
    s2 += a2 * a2;
    s3 += a3 * a3;
  }
  for (; t < d; t++) {
    const a = A[ao + t]! - B[bo + t]!;
    s0 += a * a;
  }
  return s0 + s1 + (s2 + s3);
}
