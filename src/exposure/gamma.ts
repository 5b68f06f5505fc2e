/**
 * The gamma-function family the exact interval estimates need: log-gamma, the regularized
 * incomplete gamma functions P(a, x) and Q(a, x) = 1 − P(a, x), and their inverses in x.
 *
 * Methods: Lanczos (1964) approximation of Γ with g = 7 and nine coefficients (relative error
 * about 1e-15); P by its power series when x < a + 1 and Q by its continued fraction (modified
 * Lentz) otherwise; the inverses by Halley's method from the starting values of Numerical Recipes
 * (Press et al. 2007, 3rd ed., §6.2.1), working on whichever tail is smaller so that quantiles
 * close to 0 or 1 keep their relative precision.
 */

const LANCZOS_G = 7;
const LANCZOS = [
  0.99999999999980993, 676.5203681218851, -1259.1392167224028, 771.32342877765313, -176.61502916214059,
  12.507343278686905, -0.13857109526572012, 9.9843695780195716e-6, 1.5056327351493116e-7,
];
const HALF_LOG_2PI = 0.5 * Math.log(2 * Math.PI);
const EPS = 1e-16;
const TINY = 1e-300;

/** ln Γ(x) for x > 0 (and by reflection for non-integer x < 0.5). */
export function logGamma(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x < 0.5) {
    // Reflection: Γ(x) Γ(1 − x) = π / sin(πx).
    return Math.log(Math.PI / Math.abs(Math.sin(Math.PI * x))) - logGamma(1 - x);
  }
  const z = x - 1;
  let a = LANCZOS[0]!;
  const t = z + LANCZOS_G + 0.5;
  for (let i = 1; i < LANCZOS.length; i++) a += LANCZOS[i]! / (z + i);
  return HALF_LOG_2PI + (z + 0.5) * Math.log(t) - t + Math.log(a);
}

function checkShape(a: number, x: number): void {
  if (!(a > 0) || !Number.isFinite(a)) throw new RangeError(`shape a=${a} should be a finite number > 0`);
  if (!(x >= 0)) throw new RangeError(`x=${x} should be a number >= 0`);
}

/** The common prefactor x^a e^(−x) / Γ(a), in log space for large a. */
function logPrefactor(a: number, x: number): number {
  return a * Math.log(x) - x - logGamma(a);
}

/** Power series of P(a, x); converges for every x, fast for x < a + 1. */
function seriesP(a: number, x: number): number {
  let ap = a;
  let del = 1 / a;
  let sum = del;
  const maxIter = 100000 + 20 * Math.ceil(Math.sqrt(a));
  for (let n = 0; n < maxIter; n++) {
    ap += 1;
    del *= x / ap;
    sum += del;
    if (Math.abs(del) < Math.abs(sum) * EPS) return sum * Math.exp(logPrefactor(a, x));
  }
  throw new Error(`regularized gamma series did not converge for a=${a}, x=${x}`);
}

/** Continued fraction of Q(a, x) (modified Lentz); fast for x > a + 1. */
function fractionQ(a: number, x: number): number {
  let b = x + 1 - a;
  let c = 1 / TINY;
  let d = 1 / b;
  let h = d;
  const maxIter = 100000 + 20 * Math.ceil(Math.sqrt(a));
  for (let i = 1; i < maxIter; i++) {
    const an = -i * (i - a);
    b += 2;
    d = an * d + b;
    if (Math.abs(d) < TINY) d = TINY;
    c = b + an / c;
    if (Math.abs(c) < TINY) c = TINY;
    d = 1 / d;
    const del = d * c;
    h *= del;
    if (Math.abs(del - 1) < EPS) return Math.exp(logPrefactor(a, x)) * h;
  }
  throw new Error(`regularized gamma continued fraction did not converge for a=${a}, x=${x}`);
}

/** Regularized lower incomplete gamma P(a, x) = γ(a, x) / Γ(a). */
export function regularizedGammaP(a: number, x: number): number {
  checkShape(a, x);
  if (x === 0) return 0;
  if (x === Infinity) return 1;
  return x < a + 1 ? seriesP(a, x) : 1 - fractionQ(a, x);
}

/** Regularized upper incomplete gamma Q(a, x) = Γ(a, x) / Γ(a) = 1 − P(a, x), accurate when small. */
export function regularizedGammaQ(a: number, x: number): number {
  checkShape(a, x);
  if (x === 0) return 1;
  if (x === Infinity) return 0;
  return x < a + 1 ? 1 - seriesP(a, x) : fractionQ(a, x);
}

/**
 * The x with P(a, x) = p (the p-quantile of a gamma distribution with shape a and scale 1).
 * `upperTail: true` solves Q(a, x) = p instead, which keeps precision for quantiles near 1.
 */
export function inverseRegularizedGamma(a: number, p: number, upperTail = false): number {
  if (!(a > 0) || !Number.isFinite(a)) throw new RangeError(`shape a=${a} should be a finite number > 0`);
  if (!(p >= 0 && p <= 1)) throw new RangeError(`probability p=${p} should be in [0, 1]`);
  // Lower-tail probability pl and upper-tail probability pu, both kept exactly as given.
  const pl = upperTail ? 1 - p : p;
  const pu = upperTail ? p : 1 - p;
  if (pl <= 0) return 0;
  if (pu <= 0) return Infinity;
  const a1 = a - 1;
  const gln = logGamma(a);
  const lna1 = a > 1 ? Math.log(a1) : 0;
  const afac = a > 1 ? Math.exp(a1 * (lna1 - 1) - gln) : 0;
  let x: number;
  if (a > 1) {
    // Wilson–Hilferty start with the normal quantile approximation of Abramowitz & Stegun 26.2.22.
    const pp = pl < 0.5 ? pl : pu;
    const t = Math.sqrt(-2 * Math.log(pp));
    let z = (2.30753 + t * 0.27061) / (1 + t * (0.99229 + t * 0.04481)) - t;
    if (pl < 0.5) z = -z;
    x = Math.max(1e-3, a * Math.pow(1 - 1 / (9 * a) - z / (3 * Math.sqrt(a)), 3));
  } else {
    const t = 1 - a * (0.253 + a * 0.12);
    x = pl < t ? Math.pow(pl / t, 1 / a) : 1 - Math.log(1 - (pl - t) / (1 - t));
  }
  const useUpper = pl > 0.5;
  for (let j = 0; j < 200; j++) {
    if (x <= 0) return 0;
    // err = P(a, x) − pl, computed from the smaller tail.
    const err = useUpper ? pu - regularizedGammaQ(a, x) : regularizedGammaP(a, x) - pl;
    const dens = a > 1 ? afac * Math.exp(-(x - a1) + a1 * (Math.log(x) - lna1)) : Math.exp(-x + a1 * Math.log(x) - gln);
    if (dens === 0 || !Number.isFinite(dens)) break;
    const u = err / dens;
    const step = u / (1 - 0.5 * Math.min(1, u * (a1 / x - 1)));
    const next = x - step;
    x = next <= 0 ? 0.5 * x : next;
    if (Math.abs(step) < 1e-15 * x) break;
  }
  return x;
}

/** Quantile of the chi-square distribution with `df` degrees of freedom: 2 · P⁻¹(df / 2, p). */
export function chiSquareQuantile(p: number, df: number): number {
  if (!(df > 0)) throw new RangeError(`df=${df} should be > 0`);
  return 2 * inverseRegularizedGamma(df / 2, p);
}

/** Complementary error function via erfc(x) = Q(1/2, x²) for x ≥ 0. */
export function erfc(x: number): number {
  if (Number.isNaN(x)) return NaN;
  if (x >= 0) return regularizedGammaQ(0.5, x * x);
  return 2 - regularizedGammaQ(0.5, x * x);
}

/**
 * Quantile of the standard normal distribution: Acklam's rational approximation (relative error
 * 1.15e-9) refined by one Halley step on erfc, which brings it to full double precision.
 */
export function normalQuantile(p: number): number {
  if (!(p >= 0 && p <= 1)) throw new RangeError(`probability p=${p} should be in [0, 1]`);
  if (p === 0) return -Infinity;
  if (p === 1) return Infinity;
  const a = [-3.969683028665376e1, 2.209460984245205e2, -2.759285104469687e2, 1.38357751867269e2, -3.066479806614716e1, 2.506628277459239];
  const b = [-5.447609879822406e1, 1.615858368580409e2, -1.556989798598866e2, 6.680131188771972e1, -1.328068155288572e1];
  const c = [-7.784894002430293e-3, -3.223964580411365e-1, -2.400758277161838, -2.549732539343734, 4.374664141464968, 2.938163982698783];
  const d = [7.784695709041462e-3, 3.224671290700398e-1, 2.445134137142996, 3.754408661907416];
  const plow = 0.02425;
  let x: number;
  if (p < plow) {
    const q = Math.sqrt(-2 * Math.log(p));
    x = (((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) / ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1);
  } else if (p <= 1 - plow) {
    const q = p - 0.5;
    const r = q * q;
    x = ((((((a[0]! * r + a[1]!) * r + a[2]!) * r + a[3]!) * r + a[4]!) * r + a[5]!) * q) /
      (((((b[0]! * r + b[1]!) * r + b[2]!) * r + b[3]!) * r + b[4]!) * r + 1);
  } else {
    const q = Math.sqrt(-2 * Math.log(1 - p));
    x = -(((((c[0]! * q + c[1]!) * q + c[2]!) * q + c[3]!) * q + c[4]!) * q + c[5]!) / ((((d[0]! * q + d[1]!) * q + d[2]!) * q + d[3]!) * q + 1);
  }
  // Halley refinement: e = Φ(x) − p with Φ(x) = erfc(−x/√2)/2.
  const e = 0.5 * erfc(-x / Math.SQRT2) - p;
  const u = e * Math.sqrt(2 * Math.PI) * Math.exp((x * x) / 2);
  return x - u / (1 + (x * u) / 2);
}
