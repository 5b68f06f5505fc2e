import { DEFAULTS } from "../core/defaults.js";
import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import type { Progress } from "../core/progress.js";
import { checkInt, checkMagnitude, checkMatrix, checkNumber, checkThreads, checkWeights, notFinite } from "./_validate.js";
import { KMEANS_KERNEL_SOURCE, OP_HAMERLY, OP_INERTIA, OP_INIT, OP_LLOYD } from "./_kmeansKernel.js";
import { Team, autoThreads, isShared, ref, sharedF64, sharedI32 } from "./_team.js";
import { seedKMeansPlusPlus } from "./kmeansPlusPlus.js";
import { symmetricEigen } from "../embed/_symEigen.js";

export type KMeansAlgorithm = "hamerly" | "lloyd";

export interface KMeansOptions {
  /** Seed for the k-means++ initialisation (ignored when `rng` is given). Default 0. */
  seed?: number;
  /** Seeded generator; restart r uses `rng.fork("kmeans++/" + r)`. */
  rng?: Rng;
  /** "k-means++" (default) or a k × d matrix of initial centres (then nInit is 1). */
  init?: "k-means++" | Matrix;
  /** Restarts from different k-means++ seeds; the lowest inertia wins. Default 3 (1 with a matrix init). */
  nInit?: number;
  /** Maximum Lloyd iterations per restart. Default 300. */
  maxIter?: number;
  /**
   * Relative tolerance: stop when the summed squared centre shift is <= tol * mean per-feature
   * variance of X (scikit-learn's rule). Default 1e-4.
   */
  tol?: number;
  /** Optional non-negative sample weights (e.g. kilometres per scenario). */
  weights?: Float64Array;
  /** "hamerly" (default, exact with triangle-inequality bounds) or "lloyd" (all distances). */
  algorithm?: KMeansAlgorithm;
  /** Worker threads: a number or "auto" (all cores). Runs on one thread below MIN_ROWS_FOR_THREADS (50,000) rows. */
  threads?: number | "auto";
  /**
   * k-means++ seeding runs on a seeded uniform sample of this many rows (all rows when n is smaller).
   * Default max(20000, 20k). Pass Infinity to seed on all rows.
   */
  initSampleSize?: number;
  progress?: Progress;
}

export interface KMeansResult {
  labels: Int32Array;
  centroids: Matrix;
  /** Weighted sum of squared distances to the assigned centroid, recomputed exactly at the end. */
  inertia: number;
  /** Iterations of the restart that won. */
  iterations: number;
  converged: boolean;
  /** Restarts actually run. */
  nInit: number;
  /** Sum of weights (row count when unweighted) per cluster. */
  clusterWeights: Float64Array;
  /** Absolute tolerance used: tol * mean(var(X, axis=0)). */
  tolAbsolute: number;
  /** Threads actually used. */
  threads: number;
  /** Distance evaluations over all restarts (how much the bounds saved: compare with n·k·iterations). */
  distanceEvaluations: number;
  warnings: string[];
}

/**
 * Below this many rows k-means runs on one thread. Measured on the 2-core development machine (d = 32,
 * k = 64, blobs, idle): 2 threads were 1.24× faster at 200k rows and 1.56× at 1M, about even at 100k;
 * below ~50k a whole fit takes under ~80 ms and the per-iteration hand-offs eat the gain. Worker
 * start-up (~60 ms) is paid once per process (the pool is kept).
 */
export const MIN_ROWS_FOR_THREADS = 50_000;

interface ResolvedKMeansOptions {
  rng: Rng;
  init: "k-means++" | Matrix;
  nInit: number;
  maxIter: number;
  tol: number;
  weights: Float64Array | null;
  algorithm: KMeansAlgorithm;
  threads: number;
  initSampleSize: number;
  progress: Progress | undefined;
}

function resolveOptions(X: Matrix, k: number, o: KMeansOptions): ResolvedKMeansOptions {
  checkMatrix(X, "X", 1, false); // values are checked in the one pass of scanRows

  checkInt("k", k, 1);
  if (X.rows < k) throw new InputError(`n_samples=${X.rows} should be >= n_clusters=${k}`);
  const init = o.init ?? "k-means++";
  if (init !== "k-means++") {
    if (typeof init === "string") throw new InputError(`init=${JSON.stringify(init)} should be "k-means++" or a k × d Matrix`);
    checkMatrix(init, "init");
    if (init.rows !== k || init.cols !== X.cols)
      throw new InputError(`init has shape ${init.rows}×${init.cols}; expected k×d = ${k}×${X.cols}`);
  }
  const algorithm = o.algorithm ?? "hamerly";
  if (algorithm !== "hamerly" && algorithm !== "lloyd")
    throw new InputError(`algorithm=${JSON.stringify(algorithm)} should be "hamerly" or "lloyd"`);
  const threadsOpt = checkThreads(o.threads ?? "auto");
  const wanted = threadsOpt === "auto" ? autoThreads() : threadsOpt;
  const threads = X.rows < MIN_ROWS_FOR_THREADS ? 1 : Math.max(1, Math.min(wanted, Math.floor(X.rows / 25_000)));
  const nInitDefault = init === "k-means++" ? DEFAULTS.nInit : 1;
  return {
    rng: o.rng ?? new Rng(o.seed ?? DEFAULTS.seed),
    init,
    nInit: checkInt("nInit", o.nInit ?? nInitDefault, 1),
    maxIter: checkInt("maxIter", o.maxIter ?? 300, 1),
    tol: checkNumber("tol", o.tol ?? 1e-4, 0),
    weights: checkWeights(o.weights, X.rows),
    algorithm,
    threads,
    initSampleSize:
      o.initSampleSize === Infinity ? Infinity : checkInt("initSampleSize", o.initSampleSize ?? Math.max(20_000, 20 * k), k),
    progress: o.progress,
  };
}

/** scikit-learn's `_tolerance`: tol times the mean of the per-feature (unweighted) variances. */
export function absoluteTolerance(X: Matrix, tol: number): number {
  const { rows: n, cols: d, data } = X;
  if (tol === 0 || n === 0) return 0;
  const mean = new Float64Array(d);
  for (let i = 0; i < n; i++) for (let t = 0; t < d; t++) mean[t]! += data[i * d + t]!;
  for (let t = 0; t < d; t++) mean[t]! /= n;
  const v = new Float64Array(d);
  for (let i = 0; i < n; i++)
    for (let t = 0; t < d; t++) {
      const a = data[i * d + t]! - mean[t]!;
      v[t]! += a * a;
    }
  let s = 0;
  for (let t = 0; t < d; t++) s += v[t]! / n;
  return (s / d) * tol;
}

/**
 * One pass over X: throws InputError at the first non-finite value (naming row and column) and
 * returns tol · mean per-feature variance. The variance comes from sums of x - (first row), which is
 * ample precision for a stopping threshold and saves a second pass over a large matrix.
 */
function scanRows(X: Matrix, tol: number): number {
  const { rows: n, cols: d, data } = X;
  const s1 = new Float64Array(d);
  const s2 = new Float64Array(d);
  let big = 0;
  let at = -1;
  for (let i = 0; i < n; i++) {
    const o = i * d;
    for (let t = 0; t < d; t++) {
      const v = data[o + t]!;
      if (v - v !== 0) throw notFinite("X", d, o + t, v);
      if (v > big || -v > big) {
        big = v < 0 ? -v : v;
        at = o + t;
      }
      const a = v - data[t]!;
      s1[t]! += a;
      s2[t]! += a * a;
    }
  }
  checkMagnitude("X", X, big, at);
  let s = 0;
  for (let t = 0; t < d; t++) {
    const m = s1[t]! / n;
    s += Math.max(0, s2[t]! / n - m * m);
  }
  return (s / d) * tol;
}

/**
 * k-means (Lloyd's algorithm) with k-means++ seeding (Arthur & Vassilvitskii, "k-means++: the
 * advantages of careful seeding", SODA 2007) and exact triangle-inequality acceleration (Hamerly
 * 2010). Iteration and convergence follow scikit-learn's KMeans: an iteration assigns every row to
 * its nearest centre and moves each centre to the weighted mean of its rows; it stops when no label
 * changed or when the summed squared centre shift is <= tol·mean(var(X)); a cluster that goes empty
 * is moved onto the row farthest from its centre (reported in warnings).
 *
 * With the same initial centres the labels equal plain Lloyd's and scikit-learn's (ties go to the
 * lowest centre index); the result is identical for any thread count.
 */
export function kmeans(X: Matrix, k: number, options: KMeansOptions = {}): KMeansResult {
  const o = resolveOptions(X, k, options);
  const warnings: string[] = [];
  const n = X.rows;
  const d = X.cols;
  let nInit = o.nInit;
  if (o.init !== "k-means++" && nInit > 1) {
    warnings.push(`nInit=${nInit} ignored: explicit initial centres give one run`);
    nInit = 1;
  }
  if (o.weights) {
    let tw = 0;
    for (let i = 0; i < n; i++) tw += o.weights[i]!;
    if (!(tw > 0)) throw new InputError("weights sum to 0; at least one row needs a positive weight");
  }
  const tolAbs = scanRows(X, o.tol);

  const shared = o.threads > 1;
  const chunk = Math.max(1024, Math.ceil(n / 256));
  const nChunks = Math.ceil(n / chunk);
  const Xd = shared && !isShared(X.data) ? copyShared(X.data) : X.data;
  const W = o.weights === null ? null : shared && !isShared(o.weights) ? copyShared(o.weights) : o.weights;
  const C = sharedF64(k * d, shared);
  const bufs = {
    X: Xd,
    W,
    C,
    CC: sharedF64(k * k, shared),
    half: sharedF64(k, shared),
    move: sharedF64(k + 3, shared),
    labels: sharedI32(n, shared),
    upper: sharedF64(n, shared),
    lower: sharedF64(n, shared),
    sums: sharedF64(nChunks * k * d, shared),
    wsum: sharedF64(nChunks * k, shared),
    stats: sharedF64(nChunks * 4, shared),
    proj: sharedF64(PROJ_DIMS * d, shared),
    cproj: sharedF64(k * PROJ_DIMS, shared),
  };
  const refs = Object.fromEntries(Object.entries(bufs).map(([name, a]) => [name, ref(a)]));
  const team = new Team(KMEANS_KERNEL_SOURCE, refs, { n, d, k, chunk, nChunks, p: Math.min(PROJ_DIMS, d) }, o.threads);
  if (team.startupProblem) warnings.push(team.startupProblem);

  let best: Omit<KMeansResult, "nInit" | "tolAbsolute" | "threads" | "distanceEvaluations" | "warnings"> | null = null;
  let bestWarnings: string[] = [];
  let distanceEvaluations = 0;
  try {
    for (let r = 0; r < nInit; r++) {
      const init =
        o.init === "k-means++"
          ? seedKMeansPlusPlus(X, k, { rng: o.rng.fork(`kmeans++/${r}`), weights: o.weights ?? undefined, sampleSize: o.initSampleSize })
          : o.init;
      const run = runOnce(team, bufs, { n, d, k, nChunks }, init.data, o, tolAbs, r, nInit);
      distanceEvaluations += run.distanceEvaluations;
      if (best === null || run.inertia < best.inertia) {
        best = {
          labels: bufs.labels.slice(),
          centroids: { data: C.slice(), rows: k, cols: d },
          inertia: run.inertia,
          iterations: run.iterations,
          converged: run.converged,
          clusterWeights: run.clusterWeights,
        };
        bestWarnings = run.warnings;
      }
    }
  } finally {
    team.close();
  }
  const res = best!;
  // Bounded inputs cannot overflow (checkMatrix); this catches what slips through (e.g. explicit
  // initial centres far outside the data) instead of returning NaN inertia and arbitrary labels.
  if (!Number.isFinite(res.inertia))
    throw new InputError(`k-means: the inertia is ${res.inertia} (squared distances overflowed); rescale the data and the initial centres`);
  if (nInit > 1) warnings.push(...bestWarnings.map((w) => `best restart: ${w}`));
  else warnings.push(...bestWarnings);
  return {
    ...res,
    labels: Int32Array.from(res.labels),
    nInit,
    tolAbsolute: tolAbs,
    threads: team.threads,
    distanceEvaluations,
    warnings,
  };
}

/**
 * A copy of X in a SharedArrayBuffer (X itself if it already is one). k-means hands such a matrix to
 * its worker threads without copying it on every call — worth doing once before many fits.
 */
export function shareMatrix(X: Matrix): Matrix {
  if (isShared(X.data)) return X;
  return { data: copyShared(X.data), rows: X.rows, cols: X.cols };
}

function copyShared(a: Float64Array): Float64Array {
  const s = new Float64Array(new SharedArrayBuffer(a.length * 8));
  s.set(a);
  return s;
}

interface Bufs {
  proj: Float64Array;
  cproj: Float64Array;
  X: Float64Array;
  W: Float64Array | null;
  C: Float64Array;
  CC: Float64Array;
  half: Float64Array;
  move: Float64Array;
  labels: Int32Array;
  sums: Float64Array;
  wsum: Float64Array;
  stats: Float64Array;
}

function runOnce(
  team: Team,
  b: Bufs,
  dims: { n: number; d: number; k: number; nChunks: number },
  init: Float64Array,
  o: ResolvedKMeansOptions,
  tolAbs: number,
  restart: number,
  nInit: number,
): { inertia: number; iterations: number; converged: boolean; clusterWeights: Float64Array; warnings: string[]; distanceEvaluations: number } {
  const { n, d, k, nChunks } = dims;
  const warnings: string[] = [];
  const C = b.C;
  C.set(init);
  const newC = new Float64Array(k * d);
  const totW = new Float64Array(k);
  const hamerly = o.algorithm === "hamerly";
  let nd = 0;
  let emptyEvents = 0;
  let strict = false;
  let converged = false;
  let iter = 0;

  const collectStats = (): number => {
    let changed = 0;
    for (let c = 0; c < nChunks; c++) {
      changed += b.stats[c * 4]!;
      nd += b.stats[c * 4 + 1]!;
    }
    return changed;
  };

  if (hamerly) {
    centreGeometry(b, k, d);
    projectionBasis(b, k, d);
  }
  if (!hamerly) b.labels.fill(-1);
  team.run(hamerly ? OP_INIT : OP_LLOYD, nChunks);
  let changed = collectStats();
  for (;;) {
    iter++;
    o.progress?.({ stage: "kmeans", done: iter, total: o.maxIter, message: nInit > 1 ? `restart ${restart + 1}/${nInit}` : undefined });
    // M-step: combine chunk sums in chunk order.
    newC.fill(0);
    totW.fill(0);
    for (let c = 0; c < nChunks; c++) {
      const so = c * k * d;
      for (let t = 0; t < k * d; t++) newC[t]! += b.sums[so + t]!;
      for (let j = 0; j < k; j++) totW[j]! += b.wsum[c * k + j]!;
    }
    const nEmpty = relocateEmpty(b, newC, totW, n, d, k);
    if (nEmpty > 0) {
      emptyEvents++;
      if (emptyEvents <= 3)
        warnings.push(`iteration ${iter}: ${nEmpty} empty cluster(s) moved onto the rows farthest from their centres`);
    }
    for (let j = 0; j < k; j++) {
      const w = totW[j]!;
      if (w > 0) for (let t = 0; t < d; t++) newC[j * d + t]! /= w;
      else for (let t = 0; t < d; t++) newC[j * d + t] = C[j * d + t]!;
    }
    let shift = 0;
    for (let j = 0; j < k; j++) {
      let s = 0;
      for (let t = 0; t < d; t++) {
        const a = newC[j * d + t]! - C[j * d + t]!;
        s += a * a;
      }
      shift += s;
      b.move[j] = Math.sqrt(s);
    }
    C.set(newC);
    if (iter > 1 && changed === 0) {
      strict = true;
      converged = true;
      break;
    }
    if (shift <= tolAbs) {
      converged = true;
      break;
    }
    if (iter >= o.maxIter) break;
    // E-step of the next iteration.
    if (hamerly) {
      movementSummary(b.move, k);
      centreGeometry(b, k, d);
      team.run(OP_HAMERLY, nChunks);
    } else {
      team.run(OP_LLOYD, nChunks);
    }
    changed = collectStats();
  }
  if (emptyEvents > 3) warnings.push(`empty clusters occurred in ${emptyEvents} iterations in all`);
  if (!strict) {
    // Labels must match the final centres (scikit-learn reruns the E-step too).
    if (hamerly) {
      movementSummary(b.move, k);
      centreGeometry(b, k, d);
      team.run(OP_HAMERLY, nChunks);
    } else team.run(OP_LLOYD, nChunks);
    collectStats();
  }
  if (!converged) warnings.push(`did not converge within maxIter=${o.maxIter} iterations`);
  team.run(OP_INERTIA, nChunks);
  let inertia = 0;
  for (let c = 0; c < nChunks; c++) inertia += b.stats[c * 4 + 2]!;
  const clusterWeights = new Float64Array(k);
  const labels = b.labels;
  for (let i = 0; i < n; i++) clusterWeights[labels[i]!]! += b.W === null ? 1 : b.W[i]!;
  for (let j = 0; j < k; j++) if (clusterWeights[j] === 0) warnings.push(`cluster ${j} is empty at the end`);
  return { inertia, iterations: iter, converged, clusterWeights, warnings, distanceEvaluations: nd };
}

/** Directions of the first-assignment projection bound (see _kmeansKernel.ts). */
const PROJ_DIMS = 4;

/**
 * proj = the top min(4, d) principal directions of the initial centres (orthonormal rows), cproj =
 * the centres projected on them. Any orthonormal directions give valid bounds; these spread the
 * centres most, so the bounds prune most.
 */
function projectionBasis(b: Bufs, k: number, d: number): void {
  const p = Math.min(PROJ_DIMS, d);
  const C = b.C;
  const mean = new Float64Array(d);
  for (let j = 0; j < k; j++) for (let t = 0; t < d; t++) mean[t]! += C[j * d + t]! / k;
  const cov = new Float64Array(d * d);
  for (let j = 0; j < k; j++)
    for (let a = 0; a < d; a++) {
      const u = C[j * d + a]! - mean[a]!;
      for (let c = a; c < d; c++) cov[a * d + c]! += u * (C[j * d + c]! - mean[c]!);
    }
  for (let a = 0; a < d; a++) for (let c = a + 1; c < d; c++) cov[c * d + a] = cov[a * d + c]!;
  const { vectors } = symmetricEigen(cov, d);
  b.proj.set(vectors.subarray(0, p * d));
  for (let j = 0; j < k; j++)
    for (let a = 0; a < p; a++) {
      let s = 0;
      for (let t = 0; t < d; t++) s += b.proj[a * d + t]! * C[j * d + t]!;
      b.cproj[j * p + a] = s;
    }
}

/** move[k..k+2] = largest move, second largest, index of the largest (Hamerly's bound update). */
function movementSummary(move: Float64Array, k: number): void {
  let m1 = 0;
  let m2 = 0;
  let am = -1;
  for (let j = 0; j < k; j++) {
    const m = move[j]!;
    if (m > m1) {
      m2 = m1;
      m1 = m;
      am = j;
    } else if (m > m2) m2 = m;
  }
  move[k] = m1;
  move[k + 1] = m2;
  move[k + 2] = am;
}

/** Centre-to-centre distances and half the distance to each centre's nearest other centre. */
function centreGeometry(b: Bufs, k: number, d: number): void {
  const C = b.C;
  for (let a = 0; a < k; a++) {
    b.CC[a * k + a] = 0;
    for (let j = a + 1; j < k; j++) {
      let s = 0;
      for (let t = 0; t < d; t++) {
        const x = C[a * d + t]! - C[j * d + t]!;
        s += x * x;
      }
      const v = Math.sqrt(s);
      b.CC[a * k + j] = v;
      b.CC[j * k + a] = v;
    }
  }
  for (let a = 0; a < k; a++) {
    let m = Infinity;
    for (let j = 0; j < k; j++) if (j !== a && b.CC[a * k + j]! < m) m = b.CC[a * k + j]!;
    b.half[a] = m / 2;
  }
}

/**
 * scikit-learn's `_relocate_empty_clusters_dense`: each empty cluster takes the row farthest from its
 * current centre (largest first); that row's weight moves out of its old cluster's sum. The labels
 * stay; the next assignment settles them. Returns the number of empty clusters.
 */
function relocateEmpty(b: Bufs, sums: Float64Array, totW: Float64Array, n: number, d: number, k: number): number {
  const empty: number[] = [];
  for (let j = 0; j < k; j++) if (totW[j] === 0) empty.push(j);
  if (empty.length === 0) return 0;
  const X = b.X;
  const dist = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const c = b.labels[i]!;
    let s = 0;
    for (let t = 0; t < d; t++) {
      const a = X[i * d + t]! - b.C[c * d + t]!;
      s += a * a;
    }
    dist[i] = s;
  }
  const order = Int32Array.from({ length: n }, (_, i) => i).sort((p, q) => dist[q]! - dist[p]! || p - q);
  for (let e = 0; e < empty.length && e < n; e++) {
    const j = empty[e]!;
    const far = order[e]!;
    const w = b.W === null ? 1 : b.W[far]!;
    const old = b.labels[far]!;
    for (let t = 0; t < d; t++) {
      sums[old * d + t]! -= X[far * d + t]! * w;
      sums[j * d + t] = X[far * d + t]! * w;
    }
    totW[j] = w;
    totW[old]! -= w;
  }
  return empty.length;
}
