/**
 * Least-squares polynomial fit y ≈ Σ_{k=0..degree} c_k x^k by Householder QR of the Vandermonde matrix
 * (Golub & Van Loan, "Matrix Computations", §5.3), which stays accurate where the normal equations
 * lose digits. Returns the coefficients and the root-mean-square residual. With fewer points than
 * coefficients the degree is lowered to points − 1.
 */
export function fitPolynomial(x: ArrayLike<number>, y: ArrayLike<number>, degree: number): { coefficients: number[]; rms: number } {
  const n = x.length;
  if (n === 0) return { coefficients: new Array<number>(degree + 1).fill(0), rms: 0 };
  const p = Math.min(degree + 1, n);
  // Column-major Vandermonde A (n × p) and right-hand side b.
  const A = new Float64Array(n * p);
  const b = Float64Array.from(y as ArrayLike<number>);
  for (let i = 0; i < n; i++) {
    let v = 1;
    for (let j = 0; j < p; j++) {
      A[j * n + i] = v;
      v *= x[i]!;
    }
  }
  for (let j = 0; j < p; j++) {
    // Householder vector for column j below the diagonal.
    let norm = 0;
    for (let i = j; i < n; i++) norm += A[j * n + i]! ** 2;
    norm = Math.sqrt(norm);
    if (norm === 0) continue;
    const alpha = A[j * n + j]! > 0 ? -norm : norm;
    const v0 = A[j * n + j]! - alpha;
    A[j * n + j] = v0;
    let vnorm2 = v0 * v0;
    for (let i = j + 1; i < n; i++) vnorm2 += A[j * n + i]! ** 2;
    // Apply H = I − 2vvᵀ/(vᵀv) to the remaining columns and to b.
    for (let k = j + 1; k < p; k++) {
      let s = 0;
      for (let i = j; i < n; i++) s += A[j * n + i]! * A[k * n + i]!;
      const f = (2 * s) / vnorm2;
      for (let i = j; i < n; i++) A[k * n + i] = A[k * n + i]! - f * A[j * n + i]!;
    }
    let s = 0;
    for (let i = j; i < n; i++) s += A[j * n + i]! * b[i]!;
    const f = (2 * s) / vnorm2;
    for (let i = j; i < n; i++) b[i] = b[i]! - f * A[j * n + i]!;
    // The diagonal of R is alpha; keep it in a separate slot by overwriting after use.
    A[j * n + j] = alpha;
    for (let i = j + 1; i < n; i++) A[j * n + i] = 0;
  }
  // Back substitution R c = (Qᵀb)[0..p).
  const c = new Array<number>(degree + 1).fill(0);
  for (let j = p - 1; j >= 0; j--) {
    let s = b[j]!;
    for (let k = j + 1; k < p; k++) s -= A[k * n + j]! * c[k]!;
    const d = A[j * n + j]!;
    c[j] = d === 0 ? 0 : s / d;
  }
  let ss = 0;
  for (let i = 0; i < n; i++) {
    let v = 0;
    for (let k = p - 1; k >= 0; k--) v = v * x[i]! + c[k]!;
    ss += (y[i]! - v) ** 2;
  }
  return { coefficients: c, rms: Math.sqrt(ss / n) };
}
