import type { Matrix } from "../core/matrix.js";

/**
 * A static kd-tree (Bentley, "Multidimensional binary search trees used for associative searching",
 * CACM 18, 1975) in flat typed arrays: rows are copied in tree order so a leaf is one contiguous
 * block; each node keeps its bounding box, which gives an exact lower bound on the distance from a
 * query to anything inside (Friedman, Bentley & Finkel, ACM TOMS 3, 1977). Splits are at the median of
 * the widest box side, so the build is deterministic and O(n log n).
 */
export class KdTree {
  readonly n: number;
  readonly d: number;
  /** tree position → original row index */
  readonly perm: Int32Array;
  /** rows in tree order, row-major */
  readonly pts: Float64Array;
  readonly start: Int32Array;
  readonly end: Int32Array;
  /** child node ids, -1 for a leaf */
  readonly left: Int32Array;
  readonly right: Int32Array;
  /** bounding boxes, node-major: lo[node*d + t] */
  readonly lo: Float64Array;
  readonly hi: Float64Array;
  readonly nodes: number;

  constructor(X: Matrix, leafSize = 16) {
    const n = X.rows;
    const d = X.cols;
    this.n = n;
    this.d = d;
    const maxNodes = Math.max(1, 2 * Math.ceil(n / Math.max(1, leafSize >> 1)) + 1);
    const start = new Int32Array(maxNodes);
    const end = new Int32Array(maxNodes);
    const left = new Int32Array(maxNodes).fill(-1);
    const right = new Int32Array(maxNodes).fill(-1);
    const lo = new Float64Array(maxNodes * d);
    const hi = new Float64Array(maxNodes * d);
    const perm = Int32Array.from({ length: n }, (_, i) => i);
    const src = X.data;
    let count = 1;
    start[0] = 0;
    end[0] = n;
    const stack = [0];
    while (stack.length > 0) {
      const node = stack.pop()!;
      const s = start[node]!;
      const e = end[node]!;
      const bo = node * d;
      for (let t = 0; t < d; t++) {
        lo[bo + t] = Infinity;
        hi[bo + t] = -Infinity;
      }
      for (let p = s; p < e; p++) {
        const ro = perm[p]! * d;
        for (let t = 0; t < d; t++) {
          const v = src[ro + t]!;
          if (v < lo[bo + t]!) lo[bo + t] = v;
          if (v > hi[bo + t]!) hi[bo + t] = v;
        }
      }
      if (e - s <= leafSize) continue;
      let dim = 0;
      let spread = -1;
      for (let t = 0; t < d; t++) {
        const w = hi[bo + t]! - lo[bo + t]!;
        if (w > spread) {
          spread = w;
          dim = t;
        }
      }
      if (spread <= 0) continue; // all rows identical: keep as one leaf
      const mid = (s + e) >>> 1;
      select(perm, src, d, dim, s, e - 1, mid);
      const l = count++;
      const r = count++;
      start[l] = s;
      end[l] = mid;
      start[r] = mid;
      end[r] = e;
      left[node] = l;
      right[node] = r;
      stack.push(r, l);
    }
    this.nodes = count;
    this.start = start.slice(0, count);
    this.end = end.slice(0, count);
    this.left = left.slice(0, count);
    this.right = right.slice(0, count);
    this.lo = lo.slice(0, count * d);
    this.hi = hi.slice(0, count * d);
    this.perm = perm;
    const pts = new Float64Array(n * d);
    for (let p = 0; p < n; p++) pts.set(src.subarray(perm[p]! * d, perm[p]! * d + d), p * d);
    this.pts = pts;
  }

  /** Squared distance from q (at qo in Q) to the node's box: 0 inside. */
  boxDist2(node: number, Q: Float64Array, qo: number): number {
    const d = this.d;
    const bo = node * d;
    let s = 0;
    for (let t = 0; t < d; t++) {
      const v = Q[qo + t]!;
      const a = this.lo[bo + t]! - v;
      if (a > 0) s += a * a;
      else {
        const b = v - this.hi[bo + t]!;
        if (b > 0) s += b * b;
      }
    }
    return s;
  }

  /** Squared distance from q to the farthest corner of the node's box. */
  boxMaxDist2(node: number, Q: Float64Array, qo: number): number {
    const d = this.d;
    const bo = node * d;
    let s = 0;
    for (let t = 0; t < d; t++) {
      const v = Q[qo + t]!;
      const a = v - this.lo[bo + t]!;
      const b = this.hi[bo + t]! - v;
      const m = a > b ? a : b;
      s += m * m;
    }
    return s;
  }

  /**
   * Original indices of every row with squared distance <= r2 from q (inclusive), appended to `out`;
   * returns how many were added.
   */
  radius(Q: Float64Array, qo: number, r2: number, out: number[]): number {
    const d = this.d;
    const pts = this.pts;
    const stack: number[] = [0];
    let added = 0;
    while (stack.length > 0) {
      const node = stack.pop()!;
      if (this.boxDist2(node, Q, qo) > r2) continue;
      if (this.left[node] === -1) {
        for (let p = this.start[node]!; p < this.end[node]!; p++) {
          const po = p * d;
          let s = 0;
          for (let t = 0; t < d; t++) {
            const a = pts[po + t]! - Q[qo + t]!;
            s += a * a;
          }
          if (s <= r2) {
            out.push(this.perm[p]!);
            added++;
          }
        }
      } else stack.push(this.right[node]!, this.left[node]!);
    }
    return added;
  }

  /**
   * The k nearest rows to q (ties broken by lower original index), written sorted by distance into
   * idx/dist2 (length k). `skip` (an original index) is excluded, e.g. the query row itself.
   */
  knn(Q: Float64Array, qo: number, k: number, idx: Int32Array, dist2: Float64Array, skip = -1): void {
    const d = this.d;
    const pts = this.pts;
    // Max-heap of the best k so far, by (dist2, index).
    let size = 0;
    const worse = (a: number, b: number): boolean => dist2[a]! > dist2[b]! || (dist2[a] === dist2[b] && idx[a]! > idx[b]!);
    const push = (di: number, ii: number): void => {
      if (size < k) {
        let c = size++;
        dist2[c] = di;
        idx[c] = ii;
        while (c > 0) {
          const p = (c - 1) >> 1;
          if (!worse(c, p)) break;
          swap(idx, dist2, c, p);
          c = p;
        }
        return;
      }
      if (di > dist2[0]! || (di === dist2[0] && ii > idx[0]!)) return;
      dist2[0] = di;
      idx[0] = ii;
      let c = 0;
      for (;;) {
        const l = 2 * c + 1;
        const r = l + 1;
        let m = c;
        if (l < size && worse(l, m)) m = l;
        if (r < size && worse(r, m)) m = r;
        if (m === c) break;
        swap(idx, dist2, c, m);
        c = m;
      }
    };
    const bound = (): number => (size < k ? Infinity : dist2[0]!);
    const stackN: number[] = [0];
    const stackD: number[] = [0];
    while (stackN.length > 0) {
      const node = stackN.pop()!;
      const bd = stackD.pop()!;
      if (bd > bound()) continue;
      if (this.left[node] === -1) {
        for (let p = this.start[node]!; p < this.end[node]!; p++) {
          const orig = this.perm[p]!;
          if (orig === skip) continue;
          const po = p * d;
          let s = 0;
          for (let t = 0; t < d; t++) {
            const a = pts[po + t]! - Q[qo + t]!;
            s += a * a;
          }
          push(s, orig);
        }
      } else {
        const l = this.left[node]!;
        const r = this.right[node]!;
        const dl = this.boxDist2(l, Q, qo);
        const dr = this.boxDist2(r, Q, qo);
        // Visit the nearer child first (pushed last).
        if (dl <= dr) {
          stackN.push(r, l);
          stackD.push(dr, dl);
        } else {
          stackN.push(l, r);
          stackD.push(dl, dr);
        }
      }
    }
    // Heap → ascending order.
    const order = Array.from({ length: size }, (_, i) => i).sort((a, b) => dist2[a]! - dist2[b]! || idx[a]! - idx[b]!);
    const i2 = order.map((o) => idx[o]!);
    const d2 = order.map((o) => dist2[o]!);
    for (let j = 0; j < size; j++) {
      idx[j] = i2[j]!;
      dist2[j] = d2[j]!;
    }
    for (let j = size; j < k; j++) {
      idx[j] = -1;
      dist2[j] = Infinity;
    }
  }
}

function swap(idx: Int32Array, dist2: Float64Array, a: number, b: number): void {
  const ti = idx[a]!;
  idx[a] = idx[b]!;
  idx[b] = ti;
  const td = dist2[a]!;
  dist2[a] = dist2[b]!;
  dist2[b] = td;
}

/** Quickselect (Hoare) on perm[lo..hi] by coordinate `dim`, so that perm[kth] holds the kth smallest. */
function select(perm: Int32Array, X: Float64Array, d: number, dim: number, lo: number, hi: number, kth: number): void {
  while (hi > lo) {
    const pivot = X[perm[(lo + hi) >>> 1]! * d + dim]!;
    let i = lo;
    let j = hi;
    while (i <= j) {
      while (X[perm[i]! * d + dim]! < pivot) i++;
      while (X[perm[j]! * d + dim]! > pivot) j--;
      if (i <= j) {
        const t = perm[i]!;
        perm[i] = perm[j]!;
        perm[j] = t;
        i++;
        j--;
      }
    }
    if (kth <= j) hi = j;
    else if (kth >= i) lo = i;
    else return;
  }
}
