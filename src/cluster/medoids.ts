import type { Matrix } from "../core/matrix.js";
import type { Progress } from "../core/progress.js";
import { checkLabels, checkMatrix } from "./_validate.js";
import { addOuterProducts4, symmetricEigen } from "../embed/_symEigen.js";
import { kmeans } from "./kmeans.js";

export interface MedoidsOptions {
  progress?: Progress;
}

export interface MedoidsResult {
  /** Per cluster 0..k-1: the row (a real scenario) with the smallest sum of Euclidean distances to its cluster; -1 if empty. */
  indices: Int32Array;
  /** That smallest sum of distances, per cluster (NaN if empty). */
  distanceSums: Float64Array;
  /** Cluster sizes. */
  sizes: Int32Array;
  /** Rows whose full distance sum was evaluated, per cluster (the rest were ruled out by bounds). */
  evaluated: Int32Array;
  warnings: string[];
}

/** Relative margin on every bound so that rounding can only cost an extra exact evaluation. */
const MARGIN = 1e-9;

/**
 * Exact medoid of every cluster (noise rows, label -1, are left out): the member minimising the sum
 * of Euclidean distances to all members; ties go to the lowest row index.
 *
 * A full sum costs O(m·d), so evaluating all m members is O(m²·d). Instead every member gets a
 * proven lower bound on its sum, members are evaluated in increasing order of that bound, and the
 * search stops as soon as the next bound exceeds the best sum found — the answer is exact.
 *
 * Bounds for a member x with v = x - mean, over members y_j with u_j = y_j - mean:
 *  - moment bound: with a_j = |x - y_j|², A = mean a_j = |v|² + mean|u|², V = var a_j
 *    = var|u|² - 4 v·E[|u|² u] + 4 vᵀ Cov v (all from per-cluster moments, O(d²) per member), the
 *    inequality √a >= √A + (a - A)/(2√A) - (a - A)²/(2 A^{3/2}) (for a >= 0; equal to
 *    (s-1)² s(s+2)/2 >= 0 with s = √(a/A)) summed over j gives S(x) >= m(√A - V/(2 A^{3/2}));
 *  - centroid bound: S(x) >= |Σ_j (x - y_j)| = m |v| (triangle inequality);
 *  - trimed bound (Newling & Fleuret, "A sub-quadratic exact medoid algorithm", AISTATS 2017): after
 *    evaluating S(i) with all distances d(i, j), S(j) >= |S(i) - m·d(i, j)|.
 * The moment bound is what prunes in high dimension where distances concentrate; the trimed bound is
 * what prunes in low dimension. When a cluster has several modes (two blobs merged, say) the
 * whole-cluster moments are loose; after a few exact evaluations the cluster is split into up to 8
 * groups by a small seeded k-means and each member's bound becomes the sum of its per-group bounds
 * (S(x) = Σ_groups S_g(x), each bounded as above), which is tight again.
 */
export function medoids(X: Matrix, labels: Int32Array, options: MedoidsOptions = {}): MedoidsResult {
  checkMatrix(X, "X");
  const k = checkLabels(labels, X.rows);
  const n = X.rows;
  const d = X.cols;
  const sizes = new Int32Array(k);
  for (let i = 0; i < n; i++) if (labels[i]! >= 0) sizes[labels[i]!]!++;
  // Members of each cluster, in increasing row order (CSR).
  const offs = new Int32Array(k + 1);
  for (let j = 0; j < k; j++) offs[j + 1] = offs[j]! + sizes[j]!;
  const members = new Int32Array(offs[k]!);
  const fill = offs.slice(0, k);
  for (let i = 0; i < n; i++) if (labels[i]! >= 0) members[fill[labels[i]!]!++] = i;

  const indices = new Int32Array(k).fill(-1);
  const distanceSums = new Float64Array(k).fill(NaN);
  const evaluated = new Int32Array(k);
  const warnings: string[] = [];
  let done = 0;
  for (let c = 0; c < k; c++) {
    options.progress?.({ stage: "medoids", done, total: offs[k]!, message: `cluster ${c}` });
    const rows = members.subarray(offs[c]!, offs[c + 1]!);
    done += rows.length;
    if (rows.length === 0) {
      warnings.push(`cluster ${c} has no rows: no medoid`);
      continue;
    }
    const r = exactMedoid(X.data, d, rows);
    indices[c] = r.index;
    distanceSums[c] = r.sum;
    evaluated[c] = r.evaluated;
  }
  options.progress?.({ stage: "medoids", done: offs[k]!, total: offs[k]! });
  return { indices, distanceSums, sizes, evaluated, warnings };
}

/** Sum of distances from row `xi` to every row in `rows`, also writing each distance into `out`. */
function distanceSum(X: Float64Array, d: number, xi: number, rows: Int32Array, out: Float64Array | null): number {
  const xo = xi * d;
  let sum = 0;
  for (let j = 0; j < rows.length; j++) {
    const yo = rows[j]! * d;
    let s0 = 0;
    let s1 = 0;
    let t = 0;
    for (; t + 1 < d; t += 2) {
      const a = X[xo + t]! - X[yo + t]!;
      const b = X[xo + t + 1]! - X[yo + t + 1]!;
      s0 += a * a;
      s1 += b * b;
    }
    if (t < d) {
      const a = X[xo + t]! - X[yo + t]!;
      s0 += a * a;
    }
    const dist = Math.sqrt(s0 + s1);
    if (out) out[j] = dist;
    sum += dist;
  }
  return sum;
}

/** Exact evaluations tried with the whole-cluster bound before the cluster is split into groups. */
const SINGLE_GROUP_BUDGET = 24;

export function exactMedoid(Xall: Float64Array, d: number, rowIds: Int32Array): { index: number; sum: number; evaluated: number } {
  const m = rowIds.length;
  if (m <= 2) {
    // One row, or two rows with equal sums: the lowest index.
    return { index: rowIds[0]!, sum: m === 1 ? 0 : distanceSum(Xall, d, rowIds[0]!, rowIds, null), evaluated: m };
  }
  // The cluster's rows copied together once: every later pass reads contiguous memory instead of
  // rows scattered over the whole matrix. Local index order = row order, so ties still go to the
  // lowest row.
  const X = new Float64Array(m * d);
  for (let j = 0; j < m; j++) X.set(Xall.subarray(rowIds[j]! * d, rowIds[j]! * d + d), j * d);
  const rows = Int32Array.from({ length: m }, (_, j) => j);
  const whole = new MomentBounds(X, d, rows, 8);
  const lb = new Float64Array(m);
  for (let j = 0; j < m; j++) lb[j] = whole.bound(X, rows[j]! * d);
  // Candidates come off a binary min-heap keyed by (bound, index): the search usually stops after a
  // few dozen, so a full sort would be wasted.
  let heap = Int32Array.from({ length: m }, (_, i) => i);
  let size = m;
  heapify(heap, size, lb);
  const tri = new Float64Array(m); // trimed bounds, 0 = none yet
  const dist = new Float64Array(m);
  let best = Infinity;
  let bestIdx = -1;
  let evaluated = 0;
  let grouped = false;
  while (size > 0) {
    const p = heap[0]!;
    if (lb[p]! * (1 - MARGIN) > best) break; // the smallest bound left: no other member can win
    heap[0] = heap[--size]!;
    siftDown(heap, size, lb, 0);
    if (tri[p]! * (1 - MARGIN) > best) continue;
    if (!grouped && evaluated >= SINGLE_GROUP_BUDGET && m >= 512) {
      // The whole-cluster bound is not pruning (a cluster of several modes): bound each member by
      // the sum of per-group bounds over a small k-means split, and go on with the members left.
      grouped = true;
      const groups = splitIntoGroups(X, d, rows, Math.min(8, Math.floor(m / 64)));
      const rest = [p, ...heap.subarray(0, size)].filter((q) => Math.max(lb[q]!, tri[q]!) * (1 - MARGIN) <= best);
      for (const q of rest) {
        let s = 0;
        for (const g of groups) s += g.bound(X, rows[q]! * d);
        if (s > lb[q]!) lb[q] = s;
      }
      heap = Int32Array.from(rest);
      size = heap.length;
      heapify(heap, size, lb);
      continue;
    }
    if (whole.tight(X, rows[p]! * d) * (1 - MARGIN) > best) continue;
    const s = distanceSum(X, d, rows[p]!, rows, dist);
    evaluated++;
    tri[p] = s;
    if (s < best || (s === best && rows[p]! < bestIdx)) {
      best = s;
      bestIdx = rows[p]!;
    }
    for (let j = 0; j < m; j++) {
      const b = Math.abs(s - m * dist[j]!);
      if (b > tri[j]!) tri[j] = b;
    }
  }
  return { index: rowIds[bestIdx]!, sum: best, evaluated };
}

function before(a: number, b: number, key: Float64Array): boolean {
  return key[a]! < key[b]! || (key[a] === key[b] && a < b);
}

function siftDown(h: Int32Array, size: number, key: Float64Array, i: number): void {
  for (;;) {
    const l = 2 * i + 1;
    const r = l + 1;
    let m = i;
    if (l < size && before(h[l]!, h[m]!, key)) m = l;
    if (r < size && before(h[r]!, h[m]!, key)) m = r;
    if (m === i) return;
    const t = h[i]!;
    h[i] = h[m]!;
    h[m] = t;
    i = m;
  }
}

function heapify(h: Int32Array, size: number, key: Float64Array): void {
  for (let i = (size >> 1) - 1; i >= 0; i--) siftDown(h, size, key, i);
}

/** Split a cluster's rows into up to g groups with a small seeded k-means; one MomentBounds per group. */
function splitIntoGroups(X: Float64Array, d: number, rows: Int32Array, g: number): MomentBounds[] {
  const m = rows.length;
  const sub: Matrix = { data: new Float64Array(m * d), rows: m, cols: d };
  for (let j = 0; j < m; j++) sub.data.set(X.subarray(rows[j]! * d, rows[j]! * d + d), j * d);
  const fit = kmeans(sub, g, { seed: 0, nInit: 1, maxIter: 10, tol: 1e-3, threads: 1, initSampleSize: Math.min(m, 4000) });
  const members: number[][] = Array.from({ length: g }, () => []);
  for (let j = 0; j < m; j++) members[fit.labels[j]!]!.push(rows[j]!);
  return members.filter((r) => r.length > 0).map((r) => new MomentBounds(X, d, Int32Array.from(r), 4));
}

/**
 * Lower bounds on S(x) = Σ_j |x - y_j| over a set of rows y_j, for any point x, from the set's
 * moments (see medoids). `bound` replaces vᵀ Cov v by an upper bound from Cov's top r eigenpairs (the
 * rest bounded by the (r+1)-th eigenvalue), O(r·d); `tight` uses vᵀ Cov v itself, O(d²).
 */
class MomentBounds {
  private readonly d: number;
  private readonly m: number;
  private readonly mean: Float64Array;
  private readonly cov: Float64Array;
  private readonly c3: Float64Array;
  private readonly T: number;
  private readonly varR2: number;
  private readonly r: number;
  private readonly lam: Float64Array;
  private readonly vecs: Float64Array;
  private readonly lamRest: number;
  private readonly v: Float64Array;

  constructor(X: Float64Array, d: number, rows: Int32Array, rank: number) {
    this.d = d;
    const m = rows.length;
    this.m = m;
    const mean = new Float64Array(d);
    for (let j = 0; j < m; j++) {
      const o = rows[j]! * d;
      for (let t = 0; t < d; t++) mean[t]! += X[o + t]!;
    }
    for (let t = 0; t < d; t++) mean[t]! /= m;
    // Centred rows in blocks of 4, so the covariance accumulates 4 rank-1 updates per pass over it.
    const U = new Float64Array(4 * d);
    const cov = new Float64Array(d * d);
    const c3 = new Float64Array(d);
    const r2 = new Float64Array(m);
    let T = 0;
    for (let j0 = 0; j0 < m; j0 += 4) {
      const nb = Math.min(4, m - j0);
      U.fill(0);
      for (let q = 0; q < nb; q++) {
        const o = rows[j0 + q]! * d;
        let s = 0;
        for (let t = 0; t < d; t++) {
          const v = X[o + t]! - mean[t]!;
          U[q * d + t] = v;
          s += v * v;
        }
        r2[j0 + q] = s;
        T += s;
        for (let t = 0; t < d; t++) c3[t]! += s * U[q * d + t]!;
      }
      addOuterProducts4(cov, U, d);
    }
    T /= m;
    let varR2 = 0;
    for (let j = 0; j < m; j++) varR2 += (r2[j]! - T) ** 2;
    varR2 /= m;
    for (let a = 0; a < d; a++) {
      c3[a]! /= m;
      for (let b = a; b < d; b++) cov[a * d + b]! /= m;
    }
    const full = new Float64Array(d * d);
    for (let a = 0; a < d; a++)
      for (let b = a; b < d; b++) {
        full[a * d + b] = cov[a * d + b]!;
        full[b * d + a] = cov[a * d + b]!;
      }
    const eig = symmetricEigen(full, d);
    this.r = Math.min(d, rank);
    this.lam = eig.values;
    this.vecs = eig.vectors;
    this.lamRest = this.r < d ? Math.max(0, eig.values[this.r]!) : 0;
    // Off-diagonal entries doubled so vᵀ Cov v is a sum over the upper triangle in tight().
    for (let a = 0; a < d; a++) for (let b = a + 1; b < d; b++) cov[a * d + b]! *= 2;
    this.mean = mean;
    this.cov = cov;
    this.c3 = c3;
    this.T = T;
    this.varR2 = varR2;
    this.v = new Float64Array(d);
  }

  private combine(vv: number, vc3: number, q: number): number {
    const m = this.m;
    const A = vv + this.T;
    const V = Math.max(0, this.varR2 - 4 * vc3 + 4 * q);
    const moment = A > 0 ? m * (Math.sqrt(A) - V / (2 * A * Math.sqrt(A))) : 0;
    const centroid = m * Math.sqrt(vv);
    return Math.max(0, moment, centroid);
  }

  /** Centre x (row at offset xo of X) into this.v; returns [|v|², v·c3]. */
  private centre(X: Float64Array, xo: number): [number, number] {
    const { d, mean, c3, v } = this;
    let vv = 0;
    let vc3 = 0;
    for (let t = 0; t < d; t++) {
      const x = X[xo + t]! - mean[t]!;
      v[t] = x;
      vv += x * x;
      vc3 += x * c3[t]!;
    }
    return [vv, vc3];
  }

  bound(X: Float64Array, xo: number): number {
    const [vv, vc3] = this.centre(X, xo);
    const { d, r, lam, vecs, v } = this;
    let top = 0;
    let proj2 = 0;
    for (let k = 0; k < r; k++) {
      const eo = k * d;
      let p = 0;
      for (let t = 0; t < d; t++) p += vecs[eo + t]! * v[t]!;
      proj2 += p * p;
      top += Math.max(0, lam[k]!) * p * p;
    }
    const q = top + this.lamRest * Math.max(0, vv - proj2);
    return this.combine(vv, vc3, q * (1 + 1e-12));
  }

  tight(X: Float64Array, xo: number): number {
    const [vv, vc3] = this.centre(X, xo);
    const { d, cov, v } = this;
    let q = 0;
    for (let a = 0; a < d; a++) {
      const row = a * d;
      let s = 0;
      for (let b = a; b < d; b++) s += cov[row + b]! * v[b]!;
      q += v[a]! * s;
    }
    return this.combine(vv, vc3, q);
  }
}
