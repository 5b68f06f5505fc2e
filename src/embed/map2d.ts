import { DEFAULTS } from "../core/defaults.js";
import { UMAP } from "umap-js";
import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { Rng } from "../core/rng.js";
import type { Progress } from "../core/progress.js";
import { KdTree } from "../cluster/_kdtree.js";
import { pca } from "./pca.js";

export type Map2dMethod = "pca" | "umap";

export interface Map2dOptions {
  /** "umap" (default, DEFAULTS.map: umap-js, seeded, as the pipeline) or "pca" (exact, fast). */
  method?: Map2dMethod;
  seed?: number;
  rng?: Rng;
  /** UMAP is fitted on a seeded sample of this many rows when n is larger. Default 2000. */
  sampleSize?: number;
  /** UMAP neighbours. Default 15 (umap-js's default). */
  nNeighbors?: number;
  /** UMAP minimum distance in the map. Default 0.1 (umap-js's default). */
  minDist?: number;
  /** UMAP optimisation epochs. Default 200 (what umap-js uses for large data; its default for ≤ 10k rows is 500). */
  nEpochs?: number;
  progress?: Progress;
}

export interface Map2dResult {
  /** n × 2 map coordinates, one row per input row. */
  coords: Matrix;
  method: Map2dMethod;
  /** Rows the map was fitted on (n for PCA; the sample size for UMAP on large data). */
  fittedOn: number;
  /** How rows outside the fitted sample were placed ("" when every row was fitted). */
  placement: string;
  warnings: string[];
}

export const UMAP_PLACEMENT =
  "rows outside the UMAP sample are placed at the membership-weighted mean of the map positions of their nNeighbors nearest sampled rows (exact neighbours in the full feature space; weights exp(-(d - rho)/sigma) with UMAP's smooth-kNN rho and sigma) — the starting placement of UMAP's own transform, without its refinement epochs";

/**
 * A 2-D map of the scenarios. PCA: the first two principal components (exact). UMAP (McInnes, Healy
 * & Melville, arXiv:1802.03426, 2018) through umap-js with the seeded generator and exact nearest
 * neighbours from a kd-tree; above `sampleSize` rows it is fitted on a seeded sample and the other
 * rows are placed as described in UMAP_PLACEMENT (umap-js's own `transform` costs about 2 ms per row,
 * too slow for 100k rows).
 */
export function map2d(X: Matrix, options: Map2dOptions = {}): Map2dResult {
  if (!X || !(X.data instanceof Float64Array) || X.data.length !== X.rows * X.cols)
    throw new InputError("X should be a Matrix { data: Float64Array, rows, cols } with data.length = rows*cols");
  const method = options.method ?? DEFAULTS.map;
  const warnings: string[] = [];
  const n = X.rows;
  const d = X.cols;
  switch (method) {
    case "pca": {
      if (n < 2) throw new InputError(`n_samples=${n} should be >= 2 for a map`);
      const nc = Math.min(2, d, n);
      const p = pca(X, nc);
      warnings.push(...p.warnings);
      const coords: Matrix = { data: new Float64Array(n * 2), rows: n, cols: 2 };
      for (let i = 0; i < n; i++) for (let j = 0; j < nc; j++) coords.data[i * 2 + j] = p.scores.data[i * nc + j]!;
      if (nc < 2) warnings.push("only one principal component exists; the second map coordinate is 0");
      return { coords, method, fittedOn: n, placement: "", warnings };
    }
    case "umap":
      return umapMap(X, n, d, options, warnings);
    default: {
      const never: never = method;
      throw new InputError(`method=${JSON.stringify(never)} should be "pca" or "umap"`);
    }
  }
}

function intOpt(name: string, v: number | undefined, def: number, min: number): number {
  const x = v ?? def;
  if (!Number.isInteger(x) || x < min) throw new InputError(`${name}=${JSON.stringify(x)} should be an integer >= ${min}`);
  return x;
}

function umapMap(X: Matrix, n: number, d: number, o: Map2dOptions, warnings: string[]): Map2dResult {
  const rng = o.rng ?? new Rng(o.seed ?? DEFAULTS.seed);
  const sampleSize = intOpt("sampleSize", o.sampleSize, 2000, 3);
  const k = intOpt("nNeighbors", o.nNeighbors, 15, 2);
  const nEpochs = intOpt("nEpochs", o.nEpochs, 200, 1);
  const minDist = o.minDist ?? 0.1;
  if (!(minDist >= 0) || !Number.isFinite(minDist)) throw new InputError(`minDist=${JSON.stringify(minDist)} should be a finite number >= 0`);
  const sample = n > sampleSize ? rng.fork("map2d/sample").sampleIndices(n, sampleSize) : null;
  const m = sample ? sample.length : n;
  if (m <= k) {
    warnings.push(`UMAP needs more than nNeighbors=${k} rows; got ${m}: fell back to PCA`);
    const p = map2d(X, { method: "pca" });
    return { ...p, warnings: [...warnings, ...p.warnings] };
  }
  const S: Matrix = sample ? takeRowsOf(X, sample) : X;
  // Exact k nearest neighbours inside the sample (the row itself first, as UMAP expects).
  const tree = new KdTree(S);
  const idx = new Int32Array(k);
  const d2 = new Float64Array(k);
  const knnI: number[][] = [];
  const knnD: number[][] = [];
  for (let i = 0; i < m; i++) {
    if ((i & 1023) === 0) o.progress?.({ stage: "map2d:neighbours", done: i, total: m });
    tree.knn(S.data, i * d, k, idx, d2);
    knnI.push(Array.from(idx));
    knnD.push(Array.from(d2, Math.sqrt));
  }
  const umap = new UMAP({ nComponents: 2, nNeighbors: k, minDist, nEpochs, random: rng.fork("map2d/umap").asFunction() });
  umap.setPrecomputedKNN(knnI, knnD);
  const rows: number[][] = [];
  for (let i = 0; i < m; i++) rows.push(Array.from(S.data.subarray(i * d, (i + 1) * d)));
  const epochs = umap.initializeFit(rows);
  for (let e = 0; e < epochs; e++) {
    if (e % 10 === 0) o.progress?.({ stage: "map2d:umap", done: e, total: epochs });
    umap.step();
  }
  const emb = umap.getEmbedding();
  const coords: Matrix = { data: new Float64Array(n * 2), rows: n, cols: 2 };
  if (!sample) {
    for (let i = 0; i < n; i++) {
      coords.data[i * 2] = emb[i]![0]!;
      coords.data[i * 2 + 1] = emb[i]![1]!;
    }
    return { coords, method: "umap", fittedOn: n, placement: "", warnings };
  }
  const inSample = new Int32Array(n).fill(-1);
  for (let s = 0; s < m; s++) inSample[sample[s]!] = s;
  const dist = new Float64Array(k);
  for (let i = 0; i < n; i++) {
    if ((i & 4095) === 0) o.progress?.({ stage: "map2d:place", done: i, total: n });
    const s = inSample[i]!;
    if (s >= 0) {
      coords.data[i * 2] = emb[s]![0]!;
      coords.data[i * 2 + 1] = emb[s]![1]!;
      continue;
    }
    tree.knn(X.data, i * d, k, idx, d2);
    for (let j = 0; j < k; j++) dist[j] = Math.sqrt(d2[j]!);
    const w = membership(dist, k);
    let sw = 0;
    let x = 0;
    let y = 0;
    for (let j = 0; j < k; j++) {
      const e = emb[idx[j]!]!;
      sw += w[j]!;
      x += w[j]! * e[0]!;
      y += w[j]! * e[1]!;
    }
    coords.data[i * 2] = x / sw;
    coords.data[i * 2 + 1] = y / sw;
  }
  o.progress?.({ stage: "map2d:place", done: n, total: n });
  return { coords, method: "umap", fittedOn: m, placement: UMAP_PLACEMENT, warnings };
}

function takeRowsOf(X: Matrix, rows: Int32Array): Matrix {
  const d = X.cols;
  const out = new Float64Array(rows.length * d);
  for (let r = 0; r < rows.length; r++) out.set(X.data.subarray(rows[r]! * d, rows[r]! * d + d), r * d);
  return { data: out, rows: rows.length, cols: d };
}

/**
 * UMAP's fuzzy membership of a row's k neighbours (smooth_knn_dist with local_connectivity = 1):
 * rho = distance to the nearest neighbour with a positive distance, sigma found by bisection so that
 * Σ exp(-max(0, d - rho) / sigma) = log2(k); weights exp(-max(0, d - rho) / sigma).
 */
export function membership(dist: Float64Array, k: number): Float64Array {
  let rho = 0;
  for (let j = 0; j < k; j++)
    if (dist[j]! > 0) {
      rho = dist[j]!;
      break;
    }
  const target = Math.log2(k);
  let lo = 0;
  let hi = Infinity;
  let sigma = 1;
  for (let it = 0; it < 64; it++) {
    let s = 0;
    for (let j = 0; j < k; j++) s += Math.exp(-Math.max(0, dist[j]! - rho) / sigma);
    if (Math.abs(s - target) < 1e-5) break;
    if (s > target) {
      hi = sigma;
      sigma = (lo + hi) / 2;
    } else {
      lo = sigma;
      sigma = hi === Infinity ? sigma * 2 : (lo + hi) / 2;
    }
  }
  const w = new Float64Array(k);
  for (let j = 0; j < k; j++) w[j] = Math.exp(-Math.max(0, dist[j]! - rho) / sigma);
  return w;
}
