/**
 * DBSCAN's core test (phase 1) as a self-contained JavaScript source, run by the same thread team as
 * k-means (see _team.ts): every row is independent, so rows are cut into fixed chunks and split over
 * the threads; the result does not depend on the thread count.
 *
 * For each row q (tree position) it walks the kd-tree nearest box first, adds up the weights of rows
 * within eps (inclusive) until they reach minPts (core, early exit), and records the first `cap`
 * neighbours it met (their tree positions) with their count. With unit weights a non-core row has at
 * most cap - 1 neighbours, so its list is complete; with fractional weights a longer list overflows
 * (count > cap) and the caller recomputes it.
 */
export const DBSCAN_KERNEL_SOURCE = String.raw`
"use strict";
function view(T, b) { return b === null ? null : new T(b.buffer, b.byteOffset, b.length); }
function makeState(bufs, meta) {
  var depth = 64 + 4 * Math.ceil(Math.log2(meta.n + 2));
  return {
    n: meta.n, d: meta.d, r2: meta.r2, minPts: meta.minPts, cap: meta.cap, chunk: meta.chunk,
    checkInside: meta.checkInside,
    pts: view(Float64Array, bufs.pts), start: view(Int32Array, bufs.start), end: view(Int32Array, bufs.end),
    left: view(Int32Array, bufs.left), right: view(Int32Array, bufs.right),
    lo: view(Float64Array, bufs.lo), hi: view(Float64Array, bufs.hi), nodeW: view(Float64Array, bufs.nodeW),
    Wt: view(Float64Array, bufs.Wt), core: view(Int32Array, bufs.core), cnt: view(Int32Array, bufs.cnt),
    list: view(Int32Array, bufs.list), stats: view(Float64Array, bufs.stats),
    stack: new Int32Array(depth), stackD: new Float64Array(depth),
  };
}

function boxDist2(lo, hi, node, d, Q, qo) {
  var bo = node * d, s = 0;
  for (var t = 0; t < d; t++) {
    var v = Q[qo + t], a = lo[bo + t] - v;
    if (a > 0) s += a * a;
    else { var b = v - hi[bo + t]; if (b > 0) s += b * b; }
  }
  return s;
}

function boxMaxDist2(lo, hi, node, d, Q, qo) {
  var bo = node * d, s = 0;
  for (var t = 0; t < d; t++) {
    var v = Q[qo + t], a = v - lo[bo + t], b = hi[bo + t] - v, m = a > b ? a : b;
    s += m * m;
  }
  return s;
}

function opCore(S, ch0, ch1) {
  var n = S.n, d = S.d, r2 = S.r2, minPts = S.minPts, cap = S.cap, pts = S.pts, lo = S.lo, hi = S.hi;
  var start = S.start, end = S.end, left = S.left, right = S.right, nodeW = S.nodeW, Wt = S.Wt;
  var core = S.core, cnt = S.cnt, list = S.list, stack = S.stack, stackD = S.stackD, checkInside = S.checkInside;
  for (var ch = ch0; ch < ch1; ch++) {
    var r0 = ch * S.chunk, r1 = Math.min(n, r0 + S.chunk), nd = 0;
    for (var q = r0; q < r1; q++) {
      var qo = q * d, w = 0, c = 0, lo0 = q * cap, sp = 0, isCore = false;
      stack[0] = 0; stackD[0] = 0; sp = 1;
      while (sp > 0 && !isCore) {
        --sp;
        var node = stack[sp];
        if (stackD[sp] > r2) continue;
        if (checkInside && boxMaxDist2(lo, hi, node, d, pts, qo) <= r2) {
          // The whole box is within eps: every row in it is a neighbour, no distances needed.
          w += nodeW[node];
          if (w >= minPts) isCore = true;
          else for (var p0 = start[node]; p0 < end[node]; p0++) { if (c < cap) list[lo0 + c] = p0; c++; }
          continue;
        }
        if (left[node] === -1) {
          for (var p = start[node]; p < end[node]; p++) {
            var po = p * d, s = 0;
            for (var t = 0; t < d; t++) { var a = pts[po + t] - pts[qo + t]; s += a * a; }
            nd++;
            if (s <= r2) {
              w += Wt[p];
              if (c < cap) list[lo0 + c] = p;
              c++;
              if (w >= minPts) { isCore = true; break; }
            }
          }
        } else {
          // The child on the query's side first: neighbours are found sooner.
          var l = left[node], r = right[node];
          var dl = boxDist2(lo, hi, l, d, pts, qo), dr = boxDist2(lo, hi, r, d, pts, qo);
          if (dl <= dr) { stack[sp] = r; stackD[sp++] = dr; stack[sp] = l; stackD[sp++] = dl; }
          else { stack[sp] = l; stackD[sp++] = dl; stack[sp] = r; stackD[sp++] = dr; }
        }
      }
      core[q] = isCore ? 1 : 0;
      cnt[q] = c;
    }
    S.stats[ch] = nd;
  }
}

var OPS = [opCore];
`;
