/**
 * The k-means hot loops as one self-contained JavaScript source (no imports, no closures over module
 * state). The same text is compiled on the main thread with `new Function` and evaluated in worker
 * threads (`new Worker(src, { eval: true })`), so every thread count runs byte-for-byte the same code
 * and gives the same numbers. It works on plain typed arrays; `makeState` wraps the buffers.
 *
 * Work is cut into fixed chunks of rows whose size depends only on (n, k, d), never on the number of
 * threads; each chunk keeps its own partial sums and counters, and the main thread combines chunks
 * in chunk order. That is what makes the result independent of the thread count.
 *
 * Assignment with bounds follows Hamerly, "Making k-means even faster", SDM 2010: one upper bound on
 * the distance to the assigned centre and one lower bound on the distance to every other centre. The
 * first assignment also uses lower bounds from a projection on the centres' principal directions; it
 * and the full searches skip centres with the centre-to-centre triangle inequality of Elkan, "Using the triangle inequality to accelerate k-means", ICML 2003 (Lemma 1:
 * d(c_a, c_j) >= 2 d(x, c_a) implies d(x, c_j) >= d(x, c_a)).
 */
export const KMEANS_KERNEL_SOURCE = String.raw`
"use strict";
// Bounds are compared with this relative slack so that rounding can only cause extra work, never a
// wrong label.
var SLACK = 1e-12;

function view(T, b) { return b === null ? null : new T(b.buffer, b.byteOffset, b.length); }

function makeState(bufs, meta) {
  return {
    n: meta.n, d: meta.d, k: meta.k, chunk: meta.chunk, nChunks: meta.nChunks,
    X: view(Float64Array, bufs.X), W: view(Float64Array, bufs.W), C: view(Float64Array, bufs.C),
    CC: view(Float64Array, bufs.CC), half: view(Float64Array, bufs.half), move: view(Float64Array, bufs.move),
    labels: view(Int32Array, bufs.labels), upper: view(Float64Array, bufs.upper), lower: view(Float64Array, bufs.lower),
    sums: view(Float64Array, bufs.sums), wsum: view(Float64Array, bufs.wsum), stats: view(Float64Array, bufs.stats),
    proj: view(Float64Array, bufs.proj), cproj: view(Float64Array, bufs.cproj), p: meta.p,
    scratch: new Float64Array(meta.k), pd2: new Float64Array(meta.k), xp: new Float64Array(Math.max(1, meta.p)),
  };
}

// Squared Euclidean distance between row xo of X and row co of C, 4-way unrolled.
function dist2(X, xo, C, co, d) {
  var s0 = 0, s1 = 0, s2 = 0, s3 = 0, t = 0;
  for (; t + 3 < d; t += 4) {
    var a0 = X[xo + t] - C[co + t], a1 = X[xo + t + 1] - C[co + t + 1];
    var a2 = X[xo + t + 2] - C[co + t + 2], a3 = X[xo + t + 3] - C[co + t + 3];
    s0 += a0 * a0; s1 += a1 * a1; s2 += a2 * a2; s3 += a3 * a3;
  }
  for (; t < d; t++) { var a = X[xo + t] - C[co + t]; s0 += a * a; }
  return (s0 + s1) + (s2 + s3);
}

function addRow(sums, so, X, xo, d, w) {
  for (var t = 0; t < d; t++) sums[so + t] += w * X[xo + t];
}

// stats per chunk: [changed labels, distance evaluations, inertia, unused]
// OP 0: first assignment with bounds, chunk sums from scratch. Each row is first projected on p
// orthonormal directions (proj, p × d; cproj = the centres' projections, k × p): the projected
// distance is a lower bound on the true one (projection is 1-Lipschitz), so the row starts at the
// centre nearest in projection and skips every centre whose projected distance already exceeds the
// best true distance, or that Elkan's centre–centre test rules out.
function opInit(S, ch0, ch1) {
  var n = S.n, d = S.d, k = S.k, X = S.X, W = S.W, C = S.C, CC = S.CC, p = S.p, P = S.proj, CP = S.cproj;
  var labels = S.labels, upper = S.upper, lower = S.lower, sums = S.sums, wsum = S.wsum;
  var pd2 = S.pd2, xp = S.xp;
  for (var ch = ch0; ch < ch1; ch++) {
    var r0 = ch * S.chunk, r1 = Math.min(n, r0 + S.chunk), so = ch * k * d, wo = ch * k;
    sums.fill(0, so, so + k * d); wsum.fill(0, wo, wo + k);
    var nd = 0;
    for (var i = r0; i < r1; i++) {
      var xo = i * d;
      for (var a = 0; a < p; a++) {
        var po = a * d, s = 0;
        for (var t = 0; t < d; t++) s += P[po + t] * X[xo + t];
        xp[a] = s;
      }
      var first = 0, fmin = Infinity;
      for (var j = 0; j < k; j++) {
        var q2 = 0, co = j * p;
        for (var a2 = 0; a2 < p; a2++) { var e = xp[a2] - CP[co + a2]; q2 += e * e; }
        pd2[j] = q2;
        if (q2 < fmin) { fmin = q2; first = j; }
      }
      var best = first, bsq = dist2(X, xo, C, first * d, d), bd = Math.sqrt(bsq);
      nd++;
      // The two smallest per-centre lower bounds (and the index of the smallest), so the bound on
      // the second-nearest centre needs no second pass: it is m1 unless m1 belongs to the winner.
      var m1 = bd, i1 = first, m2 = Infinity, v = 0;
      for (var j3 = 0; j3 < k; j3++) {
        if (j3 === first) continue;
        var pj = pd2[j3];
        if (pj * (1 - SLACK) > bsq) {
          if (pj >= m2 * m2) continue; // cannot be among the two smallest bounds: skip the sqrt
          v = Math.sqrt(pj) * (1 - SLACK);
        } else {
          var cc = CC[best * k + j3];
          if (cc * (1 - SLACK) > 2 * bd) {
            v = cc - bd;
          } else {
            var q = dist2(X, xo, C, j3 * d, d);
            nd++;
            v = Math.sqrt(q);
            if (q < bsq || (q === bsq && j3 < best)) { best = j3; bsq = q; bd = v; }
          }
        }
        if (v < m1) { m2 = m1; m1 = v; i1 = j3; } else if (v < m2) m2 = v;
      }
      var l = i1 === best ? m2 : m1;
      labels[i] = best;
      upper[i] = bd;
      lower[i] = l;
      var w = W === null ? 1 : W[i];
      addRow(sums, so + best * d, X, xo, d, w);
      wsum[wo + best] += w;
    }
    S.stats[ch * 4] = r1 - r0;
    S.stats[ch * 4 + 1] = nd;
  }
}

// OP 1: one Hamerly iteration. half[j] = half the distance from centre j to its nearest other centre;
// move[j] = how far centre j moved in the last update; move[k], move[k+1], move[k+2] = largest move,
// second largest move, index of the largest. Chunk sums are updated incrementally.
function opHamerly(S, ch0, ch1) {
  var n = S.n, d = S.d, k = S.k, X = S.X, W = S.W, C = S.C, CC = S.CC, half = S.half, move = S.move;
  var labels = S.labels, upper = S.upper, lower = S.lower, sums = S.sums, wsum = S.wsum;
  var m1 = move[k], m2 = move[k + 1], am = move[k + 2];
  for (var ch = ch0; ch < ch1; ch++) {
    var r0 = ch * S.chunk, r1 = Math.min(n, r0 + S.chunk), so = ch * k * d, wo = ch * k;
    var nd = 0, changed = 0;
    for (var i = r0; i < r1; i++) {
      var a = labels[i];
      var u = upper[i] + move[a];
      var l = lower[i] - (a === am ? m2 : m1);
      var z = l > half[a] ? l : half[a];
      if (u > z * (1 - SLACK)) {
        var xo = i * d;
        var usq = dist2(X, xo, C, a * d, d);
        nd++;
        u = Math.sqrt(usq);
        if (u > z * (1 - SLACK)) {
          var b = a, d1sq = usq, d1 = u, d2sq = Infinity, d2 = Infinity, ao = a * k;
          for (var j = 0; j < k; j++) {
            if (j === a) continue;
            // d(x, c_j) >= d(c_a, c_j) - d(x, c_a) >= d2: cannot be nearest or second nearest.
            if ((CC[ao + j] - u) * (1 - SLACK) > d2) continue;
            var q = dist2(X, xo, C, j * d, d);
            nd++;
            if (q < d1sq || (q === d1sq && j < b)) {
              d2sq = d1sq; d2 = d1; d1sq = q; d1 = Math.sqrt(q); b = j;
            } else if (q < d2sq) {
              d2sq = q; d2 = Math.sqrt(q);
            }
          }
          if (b !== a) {
            var w = W === null ? 1 : W[i];
            addRow(sums, so + a * d, X, xo, d, -w);
            addRow(sums, so + b * d, X, xo, d, w);
            wsum[wo + a] -= w;
            wsum[wo + b] += w;
            labels[i] = b;
            changed++;
          }
          u = d1;
          l = d2;
        }
      }
      upper[i] = u;
      lower[i] = l;
    }
    S.stats[ch * 4] = changed;
    S.stats[ch * 4 + 1] = nd;
  }
}

// OP 2: one plain Lloyd assignment (all k distances per row), chunk sums from scratch.
function opLloyd(S, ch0, ch1) {
  var n = S.n, d = S.d, k = S.k, X = S.X, W = S.W, C = S.C, labels = S.labels, sums = S.sums, wsum = S.wsum;
  for (var ch = ch0; ch < ch1; ch++) {
    var r0 = ch * S.chunk, r1 = Math.min(n, r0 + S.chunk), so = ch * k * d, wo = ch * k;
    sums.fill(0, so, so + k * d); wsum.fill(0, wo, wo + k);
    var changed = 0;
    for (var i = r0; i < r1; i++) {
      var xo = i * d, best = 0, bsq = dist2(X, xo, C, 0, d);
      for (var j = 1; j < k; j++) {
        var q = dist2(X, xo, C, j * d, d);
        if (q < bsq) { bsq = q; best = j; }
      }
      if (labels[i] !== best) changed++;
      labels[i] = best;
      var w = W === null ? 1 : W[i];
      addRow(sums, so + best * d, X, xo, d, w);
      wsum[wo + best] += w;
    }
    S.stats[ch * 4] = changed;
    S.stats[ch * 4 + 1] = (r1 - r0) * k;
  }
}

// OP 3: exact weighted inertia per chunk with the current centres and labels.
function opInertia(S, ch0, ch1) {
  var n = S.n, d = S.d, X = S.X, W = S.W, C = S.C, labels = S.labels;
  for (var ch = ch0; ch < ch1; ch++) {
    var r0 = ch * S.chunk, r1 = Math.min(n, r0 + S.chunk), s = 0;
    for (var i = r0; i < r1; i++) {
      var q = dist2(X, i * d, C, labels[i] * d, d);
      s += W === null ? q : W[i] * q;
    }
    S.stats[ch * 4 + 2] = s;
  }
}

var OPS = [opInit, opHamerly, opLloyd, opInertia];
`;

export const OP_INIT = 0;
export const OP_HAMERLY = 1;
export const OP_LLOYD = 2;
export const OP_INERTIA = 3;
