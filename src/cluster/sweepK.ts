import { DEFAULTS } from "../core/defaults.js";
import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import type { Progress } from "../core/progress.js";
import { checkInt, checkMatrix } from "./_validate.js";
import { kmeans, shareMatrix, MIN_ROWS_FOR_THREADS, type KMeansOptions } from "./kmeans.js";
import { calinskiHarabasz, daviesBouldin, meanIgnoringNaN, SILHOUETTE_SAMPLE_SIZE } from "./metrics.js";
import { condensedDistances, silhouetteFromCondensed } from "./_pairwise.js";

export interface SweepKOptions extends Omit<KMeansOptions, "init" | "progress"> {
  /** Range of k tried, [kMin, kMax] (kMin >= 2), the same option as the pipeline's. Default DEFAULTS.kRange = [2, 12], kMax capped at n - 1. */
  kRange?: readonly [number, number];
  /** @deprecated use kRange: [kMin, kMax] (accepted for one version). */
  kMin?: number;
  /** @deprecated use kRange: [kMin, kMax] (accepted for one version). */
  kMax?: number;
  /**
   * Silhouette on all rows up to this many, else on a seeded sample of this size. Default 5000, or
   * 2000 when the fits are sampled (n > fitSampleSize): the pairwise distances of the sample are the
   * sweep's largest fixed cost, and the standard error stays near 0.005 (stated per row).
   */
  silhouetteSampleSize?: number;
  /**
   * k-means fits of the sweep on all rows up to this many, else on a seeded uniform sample of this
   * size (with its weights); the silhouette sample is then drawn from the fit sample. The sweep only
   * ranks k; the final clustering with the chosen k runs on every row. Default 5,000.
   */
  fitSampleSize?: number;
  progress?: Progress;
}

export interface SweepKRow {
  k: number;
  inertia: number;
  /** Mean silhouette (exact or on the stated sample), higher is better. */
  silhouette: number;
  /**
   * Standard error of that mean as an estimate of the mean over all rows: grouped jackknife over the
   * sample (20 groups; Efron 1982, ch. 3), because each row's silhouette is itself measured against
   * the sample only, times the finite-population correction √(1 − m/N) (Cochran 1977 §2.5); 0 when
   * exact. Differences between two k are estimated more closely than this, because every k is scored
   * on the same sample.
   */
  silhouetteSe: number;
  /** Calinski–Harabasz on the fit rows (all rows unless fitSample < n), higher is better. */
  calinskiHarabasz: number;
  /** Davies–Bouldin on the fit rows, lower is better. */
  daviesBouldin: number;
  iterations: number;
  converged: boolean;
}

export interface SweepKResult {
  rows: SweepKRow[];
  suggestedK: number;
  /** The rule that picked suggestedK, in words. */
  rule: string;
  /** Rows the silhouette was computed on (= n when exact). */
  silhouetteSample: number;
  silhouetteExact: boolean;
  /** Rows the sweep's k-means fits ran on (= n when not sampled). */
  fitSample: number;
  warnings: string[];
}

/** Default of `fitSampleSize`. */
export const SWEEP_FIT_SAMPLE_SIZE = 5_000;
/** Default silhouette sample when the fits are sampled. */
export const SWEEP_SAMPLED_SILHOUETTE_SIZE = 2_000;

/** The documented rule for `suggestedK`. */
export const SWEEP_RULE =
  "highest mean silhouette: going up from kMin, a k replaces the current pick only when its silhouette is higher by more than 0.01 (near-ties go to the smaller k)";

/**
 * Fit k-means for every k in [kMin, kMax] (same seed for each k) and score each clustering with
 * inertia, silhouette (Rousseeuw 1987), Calinski–Harabasz (1974) and Davies–Bouldin (1979). The
 * silhouette sample (if any) is drawn once and shared by every k so the scores are comparable.
 * Beyond `fitSampleSize` rows the fits run on a seeded sample (stated in `fitSample`), and every
 * silhouette carries its standard error, so that choosing k stays a few seconds on any corpus.
 */
export function sweepK(X: Matrix, options: SweepKOptions = {}): SweepKResult {
  checkMatrix(X, "X");
  const kMin = checkInt("kRange[0]", options.kRange?.[0] ?? options.kMin ?? DEFAULTS.kRange[0], 2);
  const kMax = checkInt("kRange[1]", options.kRange?.[1] ?? options.kMax ?? Math.min(DEFAULTS.kRange[1], X.rows - 1), kMin);
  if (kMax > X.rows - 1) throw new InputError(`kMax=${kMax} should be <= n_samples - 1 = ${X.rows - 1}`);
  const fitSize = checkInt("fitSampleSize", options.fitSampleSize ?? SWEEP_FIT_SAMPLE_SIZE, Math.max(kMax + 1, 2));
  const sampleSize = checkInt("silhouetteSampleSize", options.silhouetteSampleSize ?? (X.rows > fitSize ? SWEEP_SAMPLED_SILHOUETTE_SIZE : SILHOUETTE_SAMPLE_SIZE), 2);
  const rng = options.rng ?? new Rng(options.seed ?? DEFAULTS.seed);
  const { kMin: _a, kMax: _b, kRange: _r, silhouetteSampleSize: _c, fitSampleSize: _d, progress, ...kmOptions } = options;
  const N = X.rows;
  // Large inputs: rank k on a seeded uniform sample of rows (the ranking needs far fewer rows than
  // the final fit), keeping each row's weight. Small inputs run exactly as before.
  if (N > fitSize) {
    const fitRows = rng.fork("fit sample").sampleIndices(N, fitSize);
    const Xf = takeRows(X, fitRows);
    if (kmOptions.weights) kmOptions.weights = Float64Array.from(fitRows, (i) => kmOptions.weights![i]!);
    X = Xf;
  }
  const exact = X.rows === N && N <= sampleSize;
  const sample = exact ? null : X.rows <= sampleSize ? null : rng.fork("silhouette").sampleIndices(X.rows, sampleSize);
  const m = sample ? sample.length : X.rows;
  // Finite-population correction: the sample is drawn without replacement from N rows.
  const fpc = exact ? 0 : Math.sqrt(Math.max(0, 1 - m / N));
  const D = condensedDistances(X, sample);
  const rows: SweepKRow[] = [];
  const warnings: string[] = [];
  const total = kMax - kMin + 1;
  // One shared copy for all fits instead of one per fit when k-means uses threads.
  const Xs = X.rows >= MIN_ROWS_FOR_THREADS && kmOptions.threads !== 1 ? shareMatrix(X) : X;
  for (let k = kMin; k <= kMax; k++) {
    progress?.({ stage: "sweepK", done: k - kMin, total, message: `k=${k}` });
    const r = kmeans(Xs, k, { ...kmOptions, rng: rng.fork(`k=${k}`) });
    for (const w of r.warnings) warnings.push(`k=${k}: ${w}`);
    const sub = sample ? Int32Array.from(sample, (i) => r.labels[i]!) : r.labels;
    let used = 0;
    const seen = new Uint8Array(k);
    for (const l of sub) if (!seen[l]) (seen[l] = 1), used++;
    const values = used >= 2 ? silhouetteFromCondensed(D, sub, m, k) : null;
    const sil = values ? meanIgnoringNaN(values) : NaN;
    const se = values && !exact ? jackknifeSe(D, sub, m, k) * fpc : values ? 0 : NaN;
    if (used < 2) warnings.push(`k=${k}: the silhouette sample holds fewer than 2 clusters; silhouette is NaN`);
    rows.push({
      k,
      inertia: r.inertia,
      silhouette: sil,
      silhouetteSe: se,
      calinskiHarabasz: calinskiHarabasz(X, r.labels),
      daviesBouldin: daviesBouldin(X, r.labels),
      iterations: r.iterations,
      converged: r.converged,
    });
  }
  progress?.({ stage: "sweepK", done: total, total });
  let best = rows[0]!;
  for (const row of rows) if (row.silhouette > best.silhouette + 0.01) best = row;
  if (rows.every((r) => Number.isNaN(r.silhouette))) warnings.push("no silhouette could be computed; suggestedK is kMin");
  return { rows, suggestedK: best.k, rule: SWEEP_RULE, silhouetteSample: m, silhouetteExact: exact, fitSample: X.rows, warnings };
}

const JACKKNIFE_GROUPS = 20;

/**
 * Grouped (delete-a-group) jackknife standard error of the mean silhouette of a sample: the rows
 * are split into G groups (row a in group a mod G); the mean silhouette is recomputed G times with
 * one group left out, both as rows scored and as rows the others are measured against, and
 * SE² = (G − 1)/G · Σ (θ₋g − θ̄)² (Efron 1982, "The Jackknife, the Bootstrap and Other Resampling
 * Plans", ch. 3). One pass over the pairs accumulates each row's distance sums per group and
 * cluster, so the G recomputations cost O(G·m·k), not G passes over the m² pairs.
 */
function jackknifeSe(D: Float64Array, labels: ArrayLike<number>, m: number, k: number): number {
  const G = Math.min(JACKKNIFE_GROUPS, m);
  if (G < 2) return NaN;
  const gk = G * k;
  const sums = new Float64Array(m * gk); // [row][group of the other row][cluster of the other row]
  const counts = new Float64Array(gk); // [group][cluster]
  for (let a = 0; a < m; a++) if (labels[a]! >= 0) counts[(a % G) * k + labels[a]!]!++;
  let p = 0;
  for (let a = 0; a < m; a++) {
    const la = labels[a]!;
    const ga = a % G;
    for (let b = a + 1; b < m; b++) {
      const v = D[p++]!;
      const lb = labels[b]!;
      if (la < 0 || lb < 0) continue;
      sums[a * gk + (b % G) * k + lb]! += v;
      sums[b * gk + ga * k + la]! += v;
    }
  }
  const totalCounts = new Float64Array(k);
  for (let g = 0; g < G; g++) for (let c = 0; c < k; c++) totalCounts[c]! += counts[g * k + c]!;
  const rowTotals = new Float64Array(m * k);
  for (let a = 0; a < m; a++) for (let g = 0; g < G; g++) for (let c = 0; c < k; c++) rowTotals[a * k + c]! += sums[a * gk + g * k + c]!;
  const theta = new Float64Array(G);
  const cnt = new Float64Array(k);
  for (let g = 0; g < G; g++) {
    for (let c = 0; c < k; c++) cnt[c] = totalCounts[c]! - counts[g * k + c]!;
    let total = 0;
    let used = 0;
    for (let a = 0; a < m; a++) {
      const la = labels[a]!;
      if (la < 0 || a % G === g) continue;
      used++;
      const own = cnt[la]!;
      if (own <= 1) continue; // s = 0 in a singleton cluster
      const ai = (rowTotals[a * k + la]! - sums[a * gk + g * k + la]!) / (own - 1);
      let bi = Infinity;
      for (let c = 0; c < k; c++) {
        if (c === la || cnt[c] === 0) continue;
        const v = (rowTotals[a * k + c]! - sums[a * gk + g * k + c]!) / cnt[c]!;
        if (v < bi) bi = v;
      }
      const den = Math.max(ai, bi);
      if (den > 0) total += (bi - ai) / den;
    }
    theta[g] = used > 0 ? total / used : NaN;
  }
  let mean = 0;
  for (const t of theta) mean += t;
  mean /= G;
  let ss = 0;
  for (const t of theta) ss += (t - mean) ** 2;
  return Math.sqrt(((G - 1) / G) * ss);
}

/** The given rows of X, as a new matrix. */
function takeRows(X: Matrix, rows: Int32Array): Matrix {
  const d = X.cols;
  const out = new Float64Array(rows.length * d);
  for (let j = 0; j < rows.length; j++) out.set(X.data.subarray(rows[j]! * d, rows[j]! * d + d), j * d);
  return { data: out, rows: rows.length, cols: d };
}
