import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import type { Progress } from "../core/progress.js";
import { checkMatrix, checkNumber, checkThreads, checkWeights } from "./_validate.js";
import { KdTree } from "./_kdtree.js";
import { DBSCAN_KERNEL_SOURCE } from "./_dbscanKernel.js";
import { Team, autoThreads, ref, sharedF64, sharedI32 } from "./_team.js";

/** Below this many rows the core test runs on one thread. */
export const MIN_ROWS_FOR_DBSCAN_THREADS = 20_000;

/** Tree positions of every row within eps² = r2 of tree position q (inclusive). */
function fullNeighbours(tree: KdTree, q: number, r2: number, out: number[]): void {
  const d = tree.d;
  const pts = tree.pts;
  const qo = q * d;
  const stack: number[] = [0];
  while (stack.length > 0) {
    const node = stack.pop()!;
    if (tree.boxDist2(node, pts, qo) > r2) continue;
    if (tree.left[node] === -1) {
      for (let p = tree.start[node]!; p < tree.end[node]!; p++) {
        let s = 0;
        for (let t = 0; t < d; t++) {
          const a = pts[p * d + t]! - pts[qo + t]!;
          s += a * a;
        }
        if (s <= r2) out.push(p);
      }
    } else stack.push(tree.right[node]!, tree.left[node]!);
  }
}

export interface DbscanOptions {
  /** Neighbourhood radius (Euclidean, inclusive: a row at exactly eps is a neighbour). */
  eps: number;
  /** Rows (or total weight) within eps, the row itself included, that make a core row. Default 5. */
  minPts?: number;
  /** Optional non-negative weights: a row is core when the weights within eps sum to >= minPts. */
  weights?: Float64Array;
  /** Rows per kd-tree leaf. Default 16 for d <= 4, 64 for d <= 12, else 128. */
  leafSize?: number;
  /** Threads for the core test: a number or "auto" (all cores); one thread below 20,000 rows. */
  threads?: number | "auto";
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

  // Phase 1: core test with early exit, on the thread team (rows are independent).
  progress?.({ stage: "dbscan:core", done: 0, total: n });
  const threadsOpt = checkThreads(options.threads ?? "auto");
  const threads = n < MIN_ROWS_FOR_DBSCAN_THREADS ? 1 : Math.min(threadsOpt === "auto" ? autoThreads() : threadsOpt, Math.floor(n / 5000));
  const shared = threads > 1;
  const cap = Math.max(1, Math.ceil(minPts));
  const chunk = 256;
  const nChunks = Math.ceil(n / chunk);
  const sh = <T extends Float64Array | Int32Array>(a: T): T => {
    if (!shared) return a;
    const c = (a instanceof Float64Array ? sharedF64(a.length, true) : sharedI32(a.length, true)) as T;
    c.set(a);
    return c;
  };
  const coreI = sharedI32(n, shared);
  const cnt = sharedI32(n, shared);
  const list = sharedI32(n * cap, shared);
  const stats = sharedF64(nChunks, shared);
  const bufs = {
    pts: sh(pts),
    start: sh(start),
    end: sh(end),
    left: sh(left),
    right: sh(right),
    lo: sh(tree.lo),
    hi: sh(tree.hi),
    nodeW: sh(nodeW),
    Wt: sh(Wt),
    core: coreI,
    cnt,
    list,
    stats,
  };
  const refs = Object.fromEntries(Object.entries(bufs).map(([k, v]) => [k, ref(v)]));
  const meta = { n, d, r2, minPts, cap, chunk, nChunks, checkInside: d <= 16 ? 1 : 0 };
  const team = new Team(DBSCAN_KERNEL_SOURCE, refs, meta, threads);
  const warnings: string[] = [];
  if (team.startupProblem) warnings.push(team.startupProblem);
  try {
    team.run(0, nChunks);
  } finally {
    team.close();
  }
  let nd = 0;
  for (let c = 0; c < nChunks; c++) nd += stats[c]!;
  const core = new Uint8Array(n);
  for (let q = 0; q < n; q++) core[q] = coreI[q]!;
  // Neighbours of non-core rows (complete lists, CSR by nbStart) and of core rows (those met before
  // the early exit, CSR by seenEnd), as tree positions.
  const nbStart = new Int32Array(n + 1);
  const seenEnd = new Int32Array(n);
  let nbLen = 0;
  let seenLen = 0;
  for (let q = 0; q < n; q++) {
    const c = Math.min(cnt[q]!, cap);
    if (core[q]) seenLen += c;
    else nbLen += cnt[q]! > cap ? 0 : c;
  }
  const seen = new Int32Array(seenLen);
  const nbParts: number[] = [];
  let nb = new Int32Array(nbLen);
  nbLen = 0;
  seenLen = 0;
  for (let q = 0; q < n; q++) {
    const c = cnt[q]!;
    const o = q * cap;
    nbStart[q] = nbLen;
    if (core[q]) {
      for (let e = 0; e < Math.min(c, cap); e++) if (list[o + e] !== q) seen[seenLen++] = list[o + e]!;
      seenEnd[q] = seenLen;
      continue;
    }
    seenEnd[q] = seenLen;
    if (c <= cap) {
      for (let e = 0; e < c; e++) nb[nbLen++] = list[o + e]!;
    } else {
      // Fractional weights: the list overflowed its slot; collect it in full here.
      nbParts.length = 0;
      fullNeighbours(tree, q, r2, nbParts);
      if (nbLen + nbParts.length > nb.length) {
        const grown = new Int32Array(Math.max(nb.length * 2, nbLen + nbParts.length));
        grown.set(nb.subarray(0, nbLen));
        nb = grown;
      }
      for (const p of nbParts) nb[nbLen++] = p;
    }
  }
  nbStart[n] = nbLen;
  progress?.({ stage: "dbscan:core", done: n, total: n });
  const stack = new Int32Array(Math.max(64, 4 * Math.ceil(Math.log2(n + 2)) + 64));

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
  if (nClusters === 0) warnings.push(`no core rows: every row is noise at eps=${eps}, minPts=${minPts}; try a larger eps (see suggestEps)`);
  else if (nNoise > 0.5 * n) warnings.push(`${nNoise} of ${n} rows are noise; eps=${eps} may be too small (see suggestEps)`);
  return { labels, core: coreOut, nClusters, nNoise, eps, minPts, distanceEvaluations: nd, warnings };
}
