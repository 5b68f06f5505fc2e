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
  /** Silhouette on all rows up to this many, else on a seeded sample of this size. Default 5000. */
  silhouetteSampleSize?: number;
  progress?: Progress;
}

export interface SweepKRow {
  k: number;
  inertia: number;
  /** Mean silhouette (exact or on the stated sample), higher is better. */
  silhouette: number;
  /** Calinski–Harabasz on all rows, higher is better. */
  calinskiHarabasz: number;
  /** Davies–Bouldin on all rows, lower is better. */
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
  warnings: string[];
}

/** The documented rule for `suggestedK`. */
export const SWEEP_RULE =
  "highest mean silhouette: going up from kMin, a k replaces the current pick only when its silhouette is higher by more than 0.01 (near-ties go to the smaller k)";

/**
 * Fit k-means for every k in [kMin, kMax] (same seed for each k) and score each clustering with
 * inertia, silhouette (Rousseeuw 1987), Calinski–Harabasz (1974) and Davies–Bouldin (1979). The
 * silhouette sample (if any) is drawn once and shared by every k so the scores are comparable.
 */
export function sweepK(X: Matrix, options: SweepKOptions = {}): SweepKResult {
  checkMatrix(X, "X");
  const kMin = checkInt("kRange[0]", options.kRange?.[0] ?? options.kMin ?? DEFAULTS.kRange[0], 2);
  const kMax = checkInt("kRange[1]", options.kRange?.[1] ?? options.kMax ?? Math.min(DEFAULTS.kRange[1], X.rows - 1), kMin);
  if (kMax > X.rows - 1) throw new InputError(`kMax=${kMax} should be <= n_samples - 1 = ${X.rows - 1}`);
  const sampleSize = checkInt("silhouetteSampleSize", options.silhouetteSampleSize ?? SILHOUETTE_SAMPLE_SIZE, 2);
  const rng = options.rng ?? new Rng(options.seed ?? DEFAULTS.seed);
  const { kMin: _a, kMax: _b, kRange: _r, silhouetteSampleSize: _c, progress, ...kmOptions } = options;
  const exact = X.rows <= sampleSize;
  const sample = exact ? null : rng.fork("silhouette").sampleIndices(X.rows, sampleSize);
  const m = sample ? sample.length : X.rows;
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
    const sil = used >= 2 ? meanIgnoringNaN(silhouetteFromCondensed(D, sub, m, k)) : NaN;
    if (used < 2) warnings.push(`k=${k}: the silhouette sample holds fewer than 2 clusters; silhouette is NaN`);
    rows.push({
      k,
      inertia: r.inertia,
      silhouette: sil,
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
  return { rows, suggestedK: best.k, rule: SWEEP_RULE, silhouetteSample: m, silhouetteExact: exact, warnings };
}
