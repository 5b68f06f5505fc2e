import { Rng } from "../../src/core/rng.js";
import type { Matrix } from "../../src/core/matrix.js";

/**
 * Seeded isotropic Gaussian blobs, the same recipe as scikit-learn's make_blobs: centres uniform in
 * [-box, box]^d, each row = its centre + N(0, std²) per feature, rows shuffled. Deterministic for a
 * seed. Rows can be allocated in a SharedArrayBuffer so that k-means hands them to workers uncopied.
 */
export function makeBlobs(
  n: number,
  d: number,
  centres: number,
  opts: { seed?: number; std?: number; box?: number; shared?: boolean } = {},
): { X: Matrix; truth: Int32Array; centres: Matrix } {
  const rng = new Rng(opts.seed ?? 0);
  const std = opts.std ?? 1;
  const box = opts.box ?? 10;
  const C = new Float64Array(centres * d);
  for (let i = 0; i < C.length; i++) C[i] = rng.uniform(-box, box);
  const data = opts.shared ? new Float64Array(new SharedArrayBuffer(n * d * 8)) : new Float64Array(n * d);
  const truth = new Int32Array(n);
  for (let i = 0; i < n; i++) truth[i] = i % centres;
  rng.shuffle(truth);
  for (let i = 0; i < n; i++) {
    const c = truth[i]!;
    for (let t = 0; t < d; t++) data[i * d + t] = C[c * d + t]! + std * rng.normal();
  }
  return { X: { data, rows: n, cols: d }, truth, centres: { data: C, rows: centres, cols: d } };
}
