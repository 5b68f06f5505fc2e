import { minimumJerkShape } from "./laneChangeShapes.js";

export { minimumJerkShape };

/**
 * Boundaries of a lane change from a fit of a normalised lateral profile s (by default the
 * minimum-jerk s(τ) = 10τ³ − 15τ⁴ + 6τ⁵, Flash & Hogan 1985; see laneChangeShapes.ts for the others)
 * to the measured lateral positions:
 *
 *   y(t) ≈ a + b·(t − t̄) + D·s((t − t0) / (t1 − t0)),  s = 0 before t0 and 1 after t1.
 *
 * For fixed (t0, t1) the model is linear in (a, b, D) and solved exactly; (t0, t1) are found by a
 * coarse-to-fine grid search around the threshold boundaries. The linear drift b absorbs slow
 * weaving within the lane. A lateral-speed threshold marks the start late and the end early, by an
 * amount that grows with the lane change's duration because the movement starts and ends with
 * near-zero lateral speed; the fit recovers the onset and the settling.
 */
export interface ProfileFit {
  t0: number;
  t1: number;
  /** Lateral offset a (m), drift b (m/s) and displacement D (m) of the fitted model. */
  offset: number;
  drift: number;
  displacement: number;
  /** Root-mean-square residual over the fitted samples (m). */
  rms: number;
}

/**
 * Fit over samples lo..hi (inclusive) of (t, y). t0 is searched in [t0Lo, t0Hi], t1 in [t1Lo, t1Hi]
 * with t1 − t0 >= minDuration. Returns undefined when there are too few samples to fit.
 */
export function fitLaneChangeProfile(
  t: Float64Array,
  y: Float64Array,
  lo: number,
  hi: number,
  t0Range: [number, number],
  t1Range: [number, number],
  minDuration: number,
  shape: (tau: number) => number = minimumJerkShape,
): ProfileFit | undefined {
  const n = hi - lo + 1;
  if (n < 8) return undefined;
  let tm = 0;
  for (let i = lo; i <= hi; i++) tm += t[i]!;
  tm /= n;
  // Prefix sums of u = t − tm, u², y, u·y, y² over lo..hi: outside (t0, t1) the shape is 0 or 1,
  // so only the samples of the movement itself need a pass per candidate pair.
  const P = prefixSums(t, y, lo, hi, tm);
  let best: ProfileFit | undefined;
  let bestSse = Infinity;
  const tryPair = (t0: number, t1: number): void => {
    if (!(t1 - t0 >= minDuration)) return;
    const r = solve(t, y, lo, hi, tm, t0, t1, shape, P);
    if (r && r.sse < bestSse) {
      bestSse = r.sse;
      best = { t0, t1, offset: r.a, drift: r.b, displacement: r.d, rms: Math.sqrt(r.sse / n) };
    }
  };
  // Coarse pass, then two refinements around the best pair.
  let step = 0.2;
  let [a0, b0] = t0Range;
  let [a1, b1] = t1Range;
  for (let pass = 0; pass < 3; pass++) {
    const n0 = Math.max(1, Math.round((b0 - a0) / step));
    const n1 = Math.max(1, Math.round((b1 - a1) / step));
    for (let i = 0; i <= n0; i++) for (let j = 0; j <= n1; j++) tryPair(a0 + ((b0 - a0) * i) / n0, a1 + ((b1 - a1) * j) / n1);
    if (!best) return undefined;
    const c0 = (best as ProfileFit).t0;
    const c1 = (best as ProfileFit).t1;
    a0 = Math.max(t0Range[0], c0 - step);
    b0 = Math.min(t0Range[1], c0 + step);
    a1 = Math.max(t1Range[0], c1 - step);
    b1 = Math.min(t1Range[1], c1 + step);
    step /= 5;
  }
  return best;
}

interface Prefix {
  lo: number;
  /** Cumulative sums over lo..lo+k−1 (length n + 1). */
  u: Float64Array;
  y: Float64Array;
  uu: Float64Array;
  uy: Float64Array;
  yy: Float64Array;
}

function prefixSums(t: Float64Array, y: Float64Array, lo: number, hi: number, tm: number): Prefix {
  const n = hi - lo + 1;
  const P: Prefix = { lo, u: new Float64Array(n + 1), y: new Float64Array(n + 1), uu: new Float64Array(n + 1), uy: new Float64Array(n + 1), yy: new Float64Array(n + 1) };
  for (let k = 0; k < n; k++) {
    const u = t[lo + k]! - tm;
    const v = y[lo + k]!;
    P.u[k + 1] = P.u[k]! + u;
    P.y[k + 1] = P.y[k]! + v;
    P.uu[k + 1] = P.uu[k]! + u * u;
    P.uy[k + 1] = P.uy[k]! + u * v;
    P.yy[k + 1] = P.yy[k]! + v * v;
  }
  return P;
}

/** First index in [lo, hi + 1] with t[i] > x (t ascending). */
function firstAbove(t: Float64Array, lo: number, hi: number, x: number): number {
  let a = lo;
  let b = hi + 1;
  while (a < b) {
    const m = (a + b) >> 1;
    if (t[m]! > x) b = m;
    else a = m + 1;
  }
  return a;
}

/** Least squares of y on [1, t − tm, s(τ)] over lo..hi; the residual sum of squares. */
function solve(
  t: Float64Array,
  y: Float64Array,
  lo: number,
  hi: number,
  tm: number,
  t0: number,
  t1: number,
  shape: (tau: number) => number,
  P: Prefix,
): { a: number; b: number; d: number; sse: number } | undefined {
  const n = hi - lo + 1;
  const st = P.u[n]!, stt = P.uu[n]!, sy = P.y[n]!, sty = P.uy[n]!, syy = P.yy[n]!;
  // Samples before t0 have s = 0, from t1 on s = 1; only (t0, t1) is summed sample by sample.
  const i0 = firstAbove(t, lo, hi, t0);
  const i1 = Math.max(i0, firstAbove(t, lo, hi, t1 - 1e-12));
  const after = hi + 1 - i1;
  let ss = after, sts = P.u[n]! - P.u[i1 - lo]!, sss = after, ssy = P.y[n]! - P.y[i1 - lo]!;
  const inv = 1 / (t1 - t0);
  for (let i = i0; i < i1; i++) {
    const u = t[i]! - tm;
    const sh = shape((t[i]! - t0) * inv);
    const v = y[i]!;
    ss += sh;
    sts += u * sh;
    sss += sh * sh;
    ssy += sh * v;
  }
  // Normal equations G β = r, G symmetric 3×3, solved by Cramer's rule.
  const g00 = n, g01 = st, g02 = ss, g11 = stt, g12 = sts, g22 = sss;
  const det = g00 * (g11 * g22 - g12 * g12) - g01 * (g01 * g22 - g12 * g02) + g02 * (g01 * g12 - g11 * g02);
  if (!(Math.abs(det) > 1e-12 * Math.max(1, g00 * g11 * g22))) return undefined;
  const c00 = g11 * g22 - g12 * g12;
  const c01 = -(g01 * g22 - g02 * g12);
  const c02 = g01 * g12 - g02 * g11;
  const c11 = g00 * g22 - g02 * g02;
  const c12 = -(g00 * g12 - g01 * g02);
  const c22 = g00 * g11 - g01 * g01;
  const a = (c00 * sy + c01 * sty + c02 * ssy) / det;
  const b = (c01 * sy + c11 * sty + c12 * ssy) / det;
  const d = (c02 * sy + c12 * sty + c22 * ssy) / det;
  const sse = syy - (a * sy + b * sty + d * ssy);
  return { a, b, d, sse: Math.max(sse, 0) };
}
