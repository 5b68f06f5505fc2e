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
  const rng = options.rng ?? new Rng(options.seed ?? 0);
  const trials = checkInt("localTrials", options.localTrials ?? 2 + Math.floor(Math.log(k)), 1);
  const wAll = checkWeights(options.weights, X.rows);
  const sampleSize = options.sampleSize ?? Infinity;
  let rows: Int32Array | null = null;
  if (sampleSize < X.rows) rows = rng.fork("sample").sampleIndices(X.rows, Math.max(k, Math.floor(sampleSize)));
  const n = rows ? rows.length : X.rows;
  const d = X.cols;
  const src = X.data;
  const at = (i: number): number => (rows ? rows[i]! : i) * d;
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) w[i] = wAll ? wAll[rows ? rows[i]! : i]! : 1;

  const centres = zeros(k, d);
  const closest = new Float64Array(n);
  const cand = new Float64Array(n);
  const bestCand = new Float64Array(n);
  const cum = new Float64Array(n);
  const draw = (total: number): number => {
    // Inverse-CDF lookup: first index whose cumulative mass reaches the drawn value.
    let acc = 0;
    for (let i = 0; i < n; i++) cum[i] = acc += total === 0 ? w[i]! : w[i]! * closest[i]!;
    const u = rng.float() * acc;
    let lo = 0;
    let hi = n - 1;
    while (lo < hi) {
      const mid = (lo + hi) >>> 1;
      if (cum[mid]! < u) lo = mid + 1;
      else hi = mid;
    }
    // Skip zero-mass rows that share the cumulative value.
    while (lo < n - 1 && (total === 0 ? w[lo]! : w[lo]! * closest[lo]!) === 0) lo++;
    return lo;
  };
  const distTo = (ci: number, out: Float64Array): number => {
    const co = at(ci);
    let pot = 0;
    for (let i = 0; i < n; i++) {
      const xo = at(i);
      let s = 0;
      for (let t = 0; t < d; t++) {
        const a = src[xo + t]! - src[co + t]!;
        s += a * a;
      }
      out[i] = s;
      pot += w[i]! * s;
    }
    return pot;
  };

  let first = draw(0);
  let pot = distTo(first, closest);
  centres.data.set(src.subarray(at(first), at(first) + d), 0);
  for (let c = 1; c < k; c++) {
    let bestPot = Infinity;
    let bestId = -1;
    const drawnFromZero = pot === 0;
    for (let t = 0; t < trials; t++) {
      const id = drawnFromZero ? draw(0) : draw(pot);
      const co = at(id);
      let p = 0;
      for (let i = 0; i < n; i++) {
        const xo = at(i);
        let s = 0;
        for (let tt = 0; tt < d; tt++) {
          const a = src[xo + tt]! - src[co + tt]!;
          s += a * a;
        }
        const m = s < closest[i]! ? s : closest[i]!;
        cand[i] = m;
        p += w[i]! * m;
      }
      if (p < bestPot) {
        bestPot = p;
        bestId = id;
        bestCand.set(cand);
      }
    }
    closest.set(bestCand);
    pot = bestPot;
    centres.data.set(src.subarray(at(bestId), at(bestId) + d), c * d);
    first = bestId;
  }
  return centres;
}
