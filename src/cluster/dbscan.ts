import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import type { Progress } from "../core/progress.js";
import { checkMatrix, checkNumber, checkWeights } from "./_validate.js";
import { KdTree } from "./_kdtree.js";

export interface DbscanOptions {
  /** Neighbourhood radius (Euclidean, inclusive: a row at exactly eps is a neighbour). */
  eps: number;
  /** Rows (or total weight) within eps, the row itself included, that make a core row. Default 5. */
  minPts?: number;
  /** Optional non-negative weights: a row is core when the weights within eps sum to >= minPts. */
  weights?: Float64Array;
  /** Rows per kd-tree leaf. Default 16 for d <= 4, 64 for d <= 12, else 128. */
  leafSize?: number;
  progress?: Progress;
}

export interface DbscanResult {
  /** Cluster per row, numbered in order of each cluster's lowest core row; -1 = noise (kept: the rare scenarios). */
  labels: Int32Array;
  /** 1 for core rows. */
  core: Uint8Array;
  nClusters: number;
  nNoise: number;
  eps: number;
  minPts: number;
  /** Row-to-row distance evaluations spent (a measure of how much the index saved). */
  distanceEvaluations: number;
  warnings: string[];
}

/**
 * DBSCAN (Ester, Kriegel, Sander & Xu, "A density-based algorithm for discovering clusters in large
 * spatial databases with noise", KDD 1996) with exact eps-neighbourhoods from a kd-tree. Definitions
 * as scikit-learn's DBSCAN: eps inclusive, minPts counts the row itself, clusters are the connected
 * components of core rows (core rows within eps of each other), numbered by their lowest core row; a
 * border row goes to the lowest-numbered cluster with a core row within eps of it (the cluster whose
 * expansion reaches it first in scikit-learn's order), else it is noise (-1).
 *
 * Work: (1) every row counts its neighbours only until it reaches minPts (core) — a non-core row's
 * few neighbours are kept; (2) each core row links to core neighbours through a union–find, skipping
 * the distance whenever the two rows are already connected; (3) labels. No full neighbourhood list is
 * ever stored.
 */
export function dbscan(X: Matrix, options: DbscanOptions): DbscanResult {
  checkMatrix(X, "X");
  if (!options || typeof options !== "object") throw new InputError("dbscan needs options { eps, minPts? }");
  const eps = checkNumber("eps", options.eps, 0, false);
  const minPts = checkNumber("minPts", options.minPts ?? 5, 1);
  const W = checkWeights(options.weights, X.rows);
  // Larger leaves in higher dimension: box tests cost O(d) per node and prune less (measured on blobs:
  // 16 best at d = 3, 64 at d = 8, 128 at d = 32).
  const leafSize = options.leafSize ?? (X.cols <= 4 ? 16 : X.cols <= 12 ? 64 : 128);
  const n = X.rows;
  const d = X.cols;
  const r2 = eps * eps;
  const progress = options.progress;
  const tree = new KdTree(X, leafSize);
  const { pts, perm, start, end, left, right } = tree;
  // Work in tree order throughout (contiguous leaves); map back at the end.
  const Wt = new Float64Array(n);
  for (let p = 0; p < n; p++) Wt[p] = W ? W[perm[p]!]! : 1;
  const core = new Uint8Array(n);
  // Neighbours of non-core rows (tree positions), CSR-style, filled in phase 1.
  const nbStart = new Int32Array(n + 1);
  let nb = new Int32Array(Math.max(16, n));
  let nbLen = 0;
  let nd = 0;
  // Neighbours of core rows found during their (early-exited) core test, CSR by seenEnd.
  let seen = new Int32Array(Math.max(16, n));
  let seenLen = 0;
  const seenEnd = new Int32Array(n);
  const stack = new Int32Array(Math.max(64, 4 * Math.ceil(Math.log2(n + 2)) + 64));
  const stackD = new Float64Array(stack.length);
  // In high dimension a box is almost never wholly inside the eps-ball; the O(d) test is skipped.
  const checkInside = d <= 16;
  const tmp: number[] = [];

  // Per-node weight, for nodes that lie wholly inside a query ball.
  const nodes = tree.nodes;
  const nodeW = new Float64Array(nodes);
  for (let node = nodes - 1; node >= 0; node--) {
    if (left[node] === -1) {
      let w = 0;
      for (let p = start[node]!; p < end[node]!; p++) w += Wt[p]!;
      nodeW[node] = w;
    } else nodeW[node] = nodeW[left[node]!]! + nodeW[right[node]!]!;
  }

  // Phase 1: core test with early exit.
  for (let q = 0; q < n; q++) {
    if ((q & 4095) === 0) progress?.({ stage: "dbscan:core", done: q, total: n });
    const qo = q * d;
    let w = 0;
    tmp.length = 0;
    let sp = 0;
    stack[sp] = 0;
    stackD[sp++] = 0;
    let isCore = false;
    while (sp > 0 && !isCore) {
      --sp;
      const node = stack[sp]!;
      if (stackD[sp]! > r2) continue;
      if (checkInside && tree.boxMaxDist2(node, pts, qo) <= r2) {
        // The whole box is within eps: every row in it is a neighbour, no distances needed.
        w += nodeW[node]!;
        if (w >= minPts) isCore = true;
        else for (let p = start[node]!; p < end[node]!; p++) tmp.push(p);
        continue;
      }
      if (left[node] === -1) {
        for (let p = start[node]!; p < end[node]!; p++) {
          const po = p * d;
          let s = 0;
          for (let t = 0; t < d; t++) {
            const a = pts[po + t]! - pts[qo + t]!;
            s += a * a;
          }
          nd++;
          if (s <= r2) {
            w += Wt[p]!;
            tmp.push(p);
            if (w >= minPts) {
              isCore = true;
              break;
            }
          }
        }
      } else {
        // The child on the query's side first: neighbours are found sooner.
        const l = left[node]!;
        const r = right[node]!;
        const dl = tree.boxDist2(l, pts, qo);
        const dr = tree.boxDist2(r, pts, qo);
        if (dl <= dr) {
          stack[sp] = r;
          stackD[sp++] = dr;
          stack[sp] = l;
          stackD[sp++] = dl;
        } else {
          stack[sp] = l;
          stackD[sp++] = dl;
          stack[sp] = r;
          stackD[sp++] = dr;
        }
      }
    }
    nbStart[q] = nbLen;
    if (isCore) {
      core[q] = 1;
      // Keep the few neighbours found before the early exit: true eps-edges, linked before phase 2.
      if (seenLen + tmp.length > seen.length) {
        const grown = new Int32Array(Math.max(seen.length * 2, seenLen + tmp.length));
        grown.set(seen.subarray(0, seenLen));
        seen = grown;
      }
      for (const p of tmp) if (p !== q) seen[seenLen++] = p;
      seenEnd[q] = seenLen;
    } else {
      seenEnd[q] = seenLen;
      if (nbLen + tmp.length > nb.length) {
        const grown = new Int32Array(Math.max(nb.length * 2, nbLen + tmp.length));
        grown.set(nb.subarray(0, nbLen));
        nb = grown;
      }
      for (const p of tmp) nb[nbLen++] = p;
    }
  }
  nbStart[n] = nbLen;

  // Phase 2: connect core rows (union–find with path halving; the root is the lowest tree position).
  const parent = Int32Array.from({ length: n }, (_, i) => i);
  const find = (a: number): number => {
    while (parent[a] !== a) {
      parent[a] = parent[parent[a]!]!;
      a = parent[a]!;
    }
    return a;
  };
  const union = (a: number, b: number): number => {
    const ra = find(a);
    const rb = find(b);
    if (ra === rb) return ra;
    if (ra < rb) {
      parent[rb] = ra;
      return ra;
    }
    parent[ra] = rb;
    return rb;
  };
  // A node is "settled" once all its core rows are in one component (components only ever merge,
  // so this stays true); rep is one row of that component, -1 when the node has no core row. A
  // settled node in the query's own component is skipped without a single distance.
  // Edges already seen in phase 1 connect most of each dense region at no cost, so phase 2 finds
  // most nodes already settled.
  for (let q = 0, e = 0; q < n; q++) {
    const end = seenEnd[q]!;
    for (; e < end; e++) {
      const p = seen[e]!;
      if (core[p]) union(p, q);
    }
  }
  const settled = new Uint8Array(nodes);
  const rep = new Int32Array(nodes).fill(-1);
  for (let node = nodes - 1; node >= 0; node--) {
    if (left[node] !== -1) continue;
    let cores = 0;
    let one = -1;
    for (let p = start[node]!; p < end[node]!; p++)
      if (core[p]) {
        cores++;
        one = p;
      }
    if (cores <= 1) {
      settled[node] = 1;
      rep[node] = one;
    }
  }
  for (let q = 0; q < n; q++) {
    if (!core[q]) continue;
    if ((q & 4095) === 0) progress?.({ stage: "dbscan:connect", done: q, total: n });
    const qo = q * d;
    let rq = find(q);
    let sp = 0;
    stack[sp++] = 0;
    while (sp > 0) {
      const node = stack[--sp]!;
      if (settled[node] && (rep[node]! < 0 || find(rep[node]!) === rq)) continue;
      if (tree.boxDist2(node, pts, qo) > r2) continue;
      if (tree.boxMaxDist2(node, pts, qo) <= r2) {
        for (let p = start[node]!; p < end[node]!; p++) if (core[p]) rq = union(p, q);
        settled[node] = 1;
        rep[node] = q;
        continue;
      }
      if (left[node] === -1) {
        let r0 = -1;
        let same = true;
        let first = -1;
        for (let p = start[node]!; p < end[node]!; p++) {
          if (!core[p]) continue;
          if (first < 0) first = p;
          if (p !== q) {
            const rp = find(p);
            if (rp !== rq) {
              const po = p * d;
              let s = 0;
              for (let t = 0; t < d; t++) {
                const a = pts[po + t]! - pts[qo + t]!;
                s += a * a;
              }
              nd++;
              if (s <= r2) rq = union(p, q);
            }
          }
        }
        for (let p = start[node]!; p < end[node]! && same; p++) {
          if (!core[p]) continue;
          const rp = find(p);
          if (r0 < 0) r0 = rp;
          else if (rp !== r0) same = false;
        }
        if (same) {
          settled[node] = 1;
          rep[node] = first;
        }
      } else {
        const l = left[node]!;
        const r = right[node]!;
        if (settled[l] && settled[r]) {
          const a = rep[l]!;
          const b = rep[r]!;
          if (a < 0 || b < 0 || find(a) === find(b)) {
            settled[node] = 1;
            rep[node] = a < 0 ? b : a;
            if (rep[node]! < 0 || find(rep[node]!) === rq) continue;
          }
        }
        stack[sp++] = r;
        stack[sp++] = l;
      }
    }
  }

  // Phase 3: number clusters by their lowest core row (original index order), then borders.
  const labels = new Int32Array(n).fill(-1);
  const coreOut = new Uint8Array(n);
  const pos = new Int32Array(n); // original index → tree position
  for (let p = 0; p < n; p++) pos[perm[p]!] = p;
  const rootLabel = new Map<number, number>();
  let nClusters = 0;
  for (let i = 0; i < n; i++) {
    const p = pos[i]!;
    if (!core[p]) continue;
    coreOut[i] = 1;
    const root = find(p);
    let l = rootLabel.get(root);
    if (l === undefined) {
      l = nClusters++;
      rootLabel.set(root, l);
    }
    labels[i] = l;
  }
  let nNoise = 0;
  for (let i = 0; i < n; i++) {
    const p = pos[i]!;
    if (core[p]) continue;
    let best = -1;
    for (let e = nbStart[p]!; e < nbStart[p + 1]!; e++) {
      const o = nb[e]!;
      if (!core[o]) continue;
      const l = rootLabel.get(find(o))!;
      if (best < 0 || l < best) best = l;
    }
    labels[i] = best;
    if (best < 0) nNoise++;
  }
  progress?.({ stage: "dbscan", done: n, total: n });
  const warnings: string[] = [];
  if (nClusters === 0) warnings.push(`no core rows: every row is noise at eps=${eps}, minPts=${minPts}; try a larger eps (see suggestEps)`);
  else if (nNoise > 0.5 * n) warnings.push(`${nNoise} of ${n} rows are noise; eps=${eps} may be too small (see suggestEps)`);
  return { labels, core: coreOut, nClusters, nNoise, eps, minPts, distanceEvaluations: nd, warnings };
}
