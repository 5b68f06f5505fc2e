import { InputError } from "../core/errors.js";
import { compensatedSum } from "../exposure/compensatedSum.js";

/**
 * The coupon collector: how many draws until every kind has been seen at least once.
 *
 * Equal probabilities 1/n: E[T] = n·H_n exactly. Unequal probabilities p_i: with Poissonized draws
 * (draw times a unit-rate Poisson process) the kinds arrive independently, so the time T by which all
 * have appeared has P(T ≤ t) = Π_i (1 − e^{−p_i t}) and E[T] = ∫₀^∞ (1 − Π_i (1 − e^{−p_i t})) dt.
 * Flajolet, Gardy & Thimonier (1992, "Birthday paradox, coupon collectors, caching algorithms and
 * self-organizing search", Discrete Applied Mathematics 39, 207–229) show this integral is also the
 * exact expected number of draws of the discrete process. The quantiles reported are those of the
 * Poissonized time T (the draws made by then are Poisson(t), i.e. t ± √t); they are not the exact
 * quantiles of the discrete draw count, which differ by O(√t).
 *
 * Speed: probabilities come as groups {p, count} of equal values, so the product costs one term per
 * group. Near-equal values can be merged (groupProbabilities, zipfProbabilities) with a relative
 * spread of at most δ; because P(T ≤ t) increases in every p_i and scaling all p_i by c scales T by
 * 1/c, every merged result is within a factor (1 + δ) of the exact one (reported as
 * relativeErrorBound). The integral is taken over u = ln t with adaptive Gauss–Kronrod (7, 15)
 * quadrature, where the integrand e^u (1 − F(e^u)) is smooth and bell-shaped.
 */

/** `count` kinds, each drawn with probability `p`. */
export interface ProbabilityGroup {
  p: number;
  count: number;
}

/** Groups plus how far merging moved any probability (0 when every group holds exactly equal values). */
export interface GroupedProbabilities {
  groups: ProbabilityGroup[];
  /** Number of kinds, Σ count. */
  types: number;
  /** Largest ratio − 1 between the probabilities merged into one group. */
  relativeErrorBound: number;
}

export interface CouponCollectorOptions {
  /** Probabilities at which to report quantiles of the Poissonized collection time (default [0.5, 0.95, 0.999]). */
  quantiles?: number[];
  /**
   * When true, the groups are only part of a distribution (they may add up to less than 1) and the
   * result is the expected number of draws from the full distribution until every listed kind has
   * appeared (e.g. the kinds not seen yet). Default false: the groups must add up to 1.
   */
  partial?: boolean;
  /** Relative tolerance of the quadrature (default 1e-12). */
  tolerance?: number;
}

export interface CouponCollectorResult {
  types: number;
  /** Expected number of draws until every kind has appeared. */
  expected: number;
  /** Quantiles of the Poissonized collection time T. */
  quantiles: { q: number; draws: number }[];
  /** Bound on the relative error from merging near-equal probabilities (0 = exact grouping). */
  relativeErrorBound: number;
  groups: number;
  method: "harmonic" | "integral";
}

const EULER_GAMMA = 0.57721566490153286061;

/** H_n = Σ_{k=1}^{n} 1/k: summed smallest-first up to 10⁶, asymptotic expansion beyond (error < 1e-30). */
export function harmonicNumber(n: number): number {
  if (!(Number.isInteger(n) && n >= 0)) throw new InputError(`n=${n} should be an integer >= 0`);
  if (n <= 1e6) {
    let s = 0;
    for (let k = n; k >= 1; k--) s += 1 / k;
    return s;
  }
  const n2 = n * n;
  return Math.log(n) + EULER_GAMMA + 1 / (2 * n) - 1 / (12 * n2) + 1 / (120 * n2 * n2) - 1 / (252 * n2 * n2 * n2);
}

function checkQuantiles(qs: number[]): void {
  for (const q of qs) if (!(q > 0 && q < 1)) throw new InputError(`quantile ${q} should be strictly between 0 and 1`);
}

/** n equally likely kinds: E = n·H_n, quantiles t_q = −n ln(1 − q^{1/n}) of the Poissonized time. */
export function couponCollectorEqual(n: number, options: Pick<CouponCollectorOptions, "quantiles"> = {}): CouponCollectorResult {
  if (!(Number.isInteger(n) && n >= 1)) throw new InputError(`n=${n} should be an integer >= 1`);
  const qs = options.quantiles ?? [0.5, 0.95, 0.999];
  checkQuantiles(qs);
  return {
    types: n,
    expected: n * harmonicNumber(n),
    quantiles: qs.map((q) => ({ q, draws: -n * Math.log(-Math.expm1(Math.log(q) / n)) })),
    relativeErrorBound: 0,
    groups: 1,
    method: "harmonic",
  };
}

/** ln(1 − e^{−x}) for x > 0, accurate at both ends (Mächler 2012, "Accurately computing log(1 − exp(−|a|))"). */
function log1mexp(x: number): number {
  return x <= Math.LN2 ? Math.log(-Math.expm1(-x)) : Math.log1p(-Math.exp(-x));
}

/** ln P(T ≤ t) = Σ count · ln(1 − e^{−p t}); groups sorted by ascending p so small t exits early. */
function logCdf(p: Float64Array, c: Float64Array, t: number): number {
  let s = 0;
  for (let g = 0; g < p.length; g++) {
    s += c[g]! * log1mexp(p[g]! * t);
    if (s < -1e4) return -Infinity;
  }
  return s;
}

// Gauss–Kronrod (7, 15) nodes and weights (Piessens et al. 1983, QUADPACK).
const XGK = [
  0.991455371120812639206854697526329, 0.949107912342758524526189684047851, 0.864864423359769072789712788640926,
  0.741531185599394439863864773280788, 0.586087235467691130294144845693013, 0.405845151377397166906606412076961,
  0.207784955007898467600689403773245, 0,
];
const WGK = [
  0.02293532201052922496373200805897, 0.063092092629978553290700663189204, 0.104790010322250183839876322541518,
  0.140653259715525918745189590510238, 0.16900472663926790282658342659855, 0.190350578064785409913256402421014,
  0.204432940075298892414161999234649, 0.209482141084727828012999174891714,
];
const WG = [0.129484966168869693270611432679082, 0.27970539148927666790146777142378, 0.381830050505118944950369775488975, 0.417959183673469387755102040816327];

function gk15(f: (u: number) => number, a: number, b: number): { value: number; error: number } {
  const c = 0.5 * (a + b);
  const h = 0.5 * (b - a);
  const fc = f(c);
  let k = WGK[7]! * fc;
  let g = WG[3]! * fc;
  for (let j = 0; j < 7; j++) {
    const d = h * XGK[j]!;
    const s = f(c - d) + f(c + d);
    k += WGK[j]! * s;
    if (j % 2 === 1) g += WG[(j - 1) / 2]! * s;
  }
  return { value: k * h, error: Math.abs((k - g) * h) };
}

function adaptiveIntegral(f: (u: number) => number, a: number, b: number, tol: number): number {
  const parts = 16;
  const w = (b - a) / parts;
  const pieces: { a: number; b: number; value: number; error: number; depth: number }[] = [];
  for (let i = 0; i < parts; i++) {
    const lo = a + i * w;
    const hi = i === parts - 1 ? b : lo + w;
    pieces.push({ a: lo, b: hi, ...gk15(f, lo, hi), depth: 0 });
  }
  const total = (): number => compensatedSum(pieces.map((p) => p.value));
  for (let iter = 0; iter < 5000; iter++) {
    const est = Math.abs(total());
    let worst = -1;
    let worstErr = 0;
    let errSum = 0;
    for (let i = 0; i < pieces.length; i++) {
      errSum += pieces[i]!.error;
      if (pieces[i]!.error > worstErr && pieces[i]!.depth < 60) {
        worstErr = pieces[i]!.error;
        worst = i;
      }
    }
    if (errSum <= tol * est || worst < 0) break;
    const p = pieces[worst]!;
    const mid = 0.5 * (p.a + p.b);
    pieces.splice(worst, 1, { a: p.a, b: mid, ...gk15(f, p.a, mid), depth: p.depth + 1 }, { a: mid, b: p.b, ...gk15(f, mid, p.b), depth: p.depth + 1 });
  }
  return total();
}

/** Find u in [lo, hi] with pred(u) false below and true above (monotone), by bisection. */
function bisect(pred: (u: number) => boolean, lo: number, hi: number): number {
  for (let i = 0; i < 200 && hi - lo > 1e-15 * Math.max(1, Math.abs(lo), Math.abs(hi)); i++) {
    const mid = 0.5 * (lo + hi);
    if (pred(mid)) hi = mid;
    else lo = mid;
  }
  return 0.5 * (lo + hi);
}

/** Expected draws and quantiles for unequal probabilities given as groups (see the module comment). */
export function couponCollector(input: ProbabilityGroup[] | GroupedProbabilities, options: CouponCollectorOptions = {}): CouponCollectorResult {
  const grouped: GroupedProbabilities = Array.isArray(input)
    ? { groups: input, types: input.reduce((s, g) => s + g.count, 0), relativeErrorBound: 0 }
    : input;
  const groups = grouped.groups.filter((g) => g.count > 0);
  if (groups.length === 0) throw new InputError("the coupon collector needs at least one group with count > 0");
  for (const [i, g] of groups.entries()) {
    if (!(g.p > 0 && g.p <= 1)) throw new InputError(`group ${i} has p=${g.p}; expected a probability in (0, 1]`, { column: "p", row: i + 1, value: g.p });
    if (!(Number.isInteger(g.count) && g.count >= 1))
      throw new InputError(`group ${i} has count=${g.count}; expected an integer >= 1`, { column: "count", row: i + 1, value: g.count });
  }
  const qs = options.quantiles ?? [0.5, 0.95, 0.999];
  checkQuantiles(qs);
  const tol = options.tolerance ?? 1e-12;
  const sorted = [...groups].sort((a, b) => a.p - b.p);
  const p = Float64Array.from(sorted, (g) => g.p);
  const c = Float64Array.from(sorted, (g) => g.count);
  const total = compensatedSum(Array.from(sorted, (g) => g.p * g.count));
  if (!options.partial && Math.abs(total - 1) > 1e-9)
    throw new InputError(`the probabilities add up to ${total}; expected 1 (set partial: true for a part of a distribution)`, { value: total });
  if (options.partial && total > 1 + 1e-9) throw new InputError(`the probabilities add up to ${total}; a part of a distribution cannot exceed 1`, { value: total });
  const types = sorted.reduce((s, g) => s + g.count, 0);
  const lf = (u: number): number => logCdf(p, c, Math.exp(u));
  // Range of ln t: below uLo, F < e^{-40}; above uHi, 1 − F < 1e-18.
  const uLo = bisect((u) => lf(u) > -40, -700, 700);
  const uHi = bisect((u) => lf(u) > -1e-18, uLo, 700);
  const integrand = (u: number): number => {
    const t = Math.exp(u);
    return t * -Math.expm1(lf(u));
  };
  // ∫₀^{t_lo} (1 − F) dt = t_lo − ∫₀^{t_lo} F dt, and the second term is below t_lo · e^{−40}.
  const expected = Math.exp(uLo) + adaptiveIntegral(integrand, uLo, uHi, tol);
  const quantiles = qs.map((q) => {
    const lq = Math.log(q);
    return { q, draws: Math.exp(bisect((u) => lf(u) >= lq, uLo - 50, uHi + 5)) };
  });
  return { types, expected, quantiles, relativeErrorBound: grouped.relativeErrorBound, groups: sorted.length, method: "integral" };
}

/**
 * Group explicit probabilities: sort, then merge runs whose largest and smallest value differ by a
 * factor of at most 1 + relTol (0 merges only exact ties). Each group carries the mean of its run, so
 * the total probability is kept.
 */
export function groupProbabilities(probabilities: ArrayLike<number>, relTol = 0): GroupedProbabilities {
  if (!(relTol >= 0)) throw new InputError(`relTol=${relTol} should be >= 0`);
  const v = Float64Array.from(probabilities);
  for (let i = 0; i < v.length; i++)
    if (!(v[i]! > 0 && v[i]! <= 1)) throw new InputError(`probability ${i} is ${v[i]}; expected a value in (0, 1]`, { row: i + 1, value: v[i] });
  v.sort();
  v.reverse();
  const groups: ProbabilityGroup[] = [];
  let bound = 0;
  let start = 0;
  while (start < v.length) {
    let end = start + 1;
    while (end < v.length && v[start]! <= v[end]! * (1 + relTol)) end++;
    const run = v.subarray(start, end);
    groups.push({ p: compensatedSum(run) / run.length, count: run.length });
    bound = Math.max(bound, v[start]! / v[end - 1]! - 1);
    start = end;
  }
  return { groups, types: v.length, relativeErrorBound: bound };
}

/** Σ_{i=a}^{b} i^{−s}: direct for short ranges, Euler–Maclaurin (three correction terms) otherwise. */
function powerSum(a: number, b: number, s: number): number {
  if (b - a < 64) {
    let sum = 0;
    for (let i = b; i >= a; i--) sum += Math.pow(i, -s);
    return sum;
  }
  const r = Math.log1p((b - a) / a); // ln(b/a)
  const integral = s === 1 ? r : (Math.pow(a, 1 - s) * -Math.expm1((1 - s) * r)) / (s - 1);
  const fa = Math.pow(a, -s);
  const fb = Math.pow(b, -s);
  const d1 = (-s * (fb / b - fa / a)) / 12;
  const d3 = (-s * (s + 1) * (s + 2) * (fb / (b * b * b) - fa / (a * a * a))) / 720;
  return integral + (fa + fb) / 2 + d1 - d3;
}

/**
 * Zipf probabilities p_i ∝ i^{−s}, i = 1..n, grouped without materializing n values: kinds stay
 * single while consecutive ratios exceed 1 + relTol, then consecutive ranks are merged into bins whose
 * first and last probabilities differ by at most that factor.
 */
export function zipfProbabilities(n: number, s = 1, relTol = 1e-3): GroupedProbabilities {
  if (!(Number.isInteger(n) && n >= 1)) throw new InputError(`n=${n} should be an integer >= 1`);
  if (!(s > 0)) throw new InputError(`s=${s} should be > 0`);
  if (!(relTol >= 0)) throw new InputError(`relTol=${relTol} should be >= 0`);
  const growth = Math.pow(1 + relTol, 1 / s);
  // Ranks i with (1 + 1/i)^s > 1 + relTol stay single.
  const single = relTol === 0 ? n : Math.min(n, Math.floor(1 / (growth - 1)));
  const weights: number[] = [];
  const counts: number[] = [];
  let bound = 0;
  for (let i = 1; i <= single; i++) {
    weights.push(Math.pow(i, -s));
    counts.push(1);
  }
  let a = single + 1;
  while (a <= n) {
    const b = Math.max(a, Math.min(n, Math.floor(a * growth)));
    weights.push(powerSum(a, b, s));
    counts.push(b - a + 1);
    bound = Math.max(bound, Math.pow(b / a, s) - 1);
    a = b + 1;
  }
  const h = compensatedSum(weights);
  return { groups: weights.map((w, k) => ({ p: w / counts[k]! / h, count: counts[k]! })), types: n, relativeErrorBound: bound };
}
