import { DEFAULTS } from "../core/defaults.js";
import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import type { Progress } from "../core/progress.js";
import { checkInt, checkMatrix } from "./_validate.js";
import { KdTree } from "./_kdtree.js";

export interface SuggestEpsOptions {
  /**
   * minPts the eps is meant for (the row itself counts, as in dbscan). Default 2·d, the heuristic of
   * Schubert, Sander, Ester, Kriegel & Xu, "DBSCAN revisited, revisited", ACM TODS 42(3), 2017.
   */
  minPts?: number;
  /** k-distances are computed for a seeded sample of this many rows when n is larger. Default 20000. */
  sampleSize?: number;
  seed?: number;
  rng?: Rng;
  progress?: Progress;
}

export interface SuggestEpsResult {
  /** The k-distance at the knee: with it, rows left of the knee are core. */
  eps: number;
  /** Sorted ascending k-distances (k = minPts - 1 other rows) of the rows queried. */
  kDistances: Float64Array;
  /** Index of the knee in kDistances. */
  kneeIndex: number;
  /** Rows whose k-distance was computed (= n unless sampled). */
  sampleSize: number;
  minPts: number;
  k: number;
  method: string;
  warnings: string[];
}

export const SUGGEST_EPS_METHOD =
  "knee of the sorted k-distance curve (Ester et al. 1996, §4.2), k = minPts - 1 other rows; the knee is the point farthest below the chord joining the curve's ends (the Kneedle criterion, Satopää et al. 2011)";

/**
 * Suggest DBSCAN's eps from the sorted k-distance graph (Ester et al. 1996): each row's distance to
 * its (minPts - 1)-th nearest other row is exactly the smallest eps that makes it core, so the knee of
 * the sorted curve separates dense rows from noise.
 */
export function suggestEps(X: Matrix, options: SuggestEpsOptions = {}): SuggestEpsResult {
  checkMatrix(X, "X");
  const minPts = checkInt("minPts", options.minPts ?? 2 * X.cols, 2);
  const k = minPts - 1;
  if (X.rows < minPts) throw new InputError(`n_samples=${X.rows} should be >= minPts=${minPts}`);
  const sampleSize = checkInt("sampleSize", options.sampleSize ?? 20_000, 3);
  const rng = options.rng ?? new Rng(options.seed ?? DEFAULTS.seed);
  const rows = X.rows <= sampleSize ? null : rng.fork("suggestEps").sampleIndices(X.rows, sampleSize);
  const m = rows ? rows.length : X.rows;
  const tree = new KdTree(X);
  const idx = new Int32Array(k);
  const d2 = new Float64Array(k);
  const kd = new Float64Array(m);
  for (let a = 0; a < m; a++) {
    if ((a & 1023) === 0) options.progress?.({ stage: "suggestEps", done: a, total: m });
    const i = rows ? rows[a]! : a;
    tree.knn(X.data, i * X.cols, k, idx, d2, i);
    kd[a] = Math.sqrt(d2[k - 1]!);
  }
  kd.sort();
  const knee = kneeOfIncreasing(kd);
  const warnings: string[] = [];
  if (kd[m - 1] === kd[0]) warnings.push("all k-distances are equal: the curve has no knee; eps is that distance");
  if (minPts < X.cols + 1) warnings.push(`minPts=${minPts} is below d + 1 = ${X.cols + 1}; Schubert et al. 2017 suggest about 2·d`);
  return { eps: kd[knee]!, kDistances: kd, kneeIndex: knee, sampleSize: m, minPts, k, method: SUGGEST_EPS_METHOD, warnings };
}

/** Index of the point of an ascending curve farthest below the chord joining its ends (both axes scaled to [0, 1]). */
export function kneeOfIncreasing(y: Float64Array): number {
  const m = y.length;
  if (m < 3) return m - 1;
  const y0 = y[0]!;
  const span = y[m - 1]! - y0;
  if (!(span > 0)) return m - 1;
  let best = m - 1;
  let bestGap = 0;
  for (let i = 0; i < m; i++) {
    const x = i / (m - 1);
    const gap = x - (y[i]! - y0) / span;
    if (gap > bestGap) {
      bestGap = gap;
      best = i;
    }
  }
  return best;
}
