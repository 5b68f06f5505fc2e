/**
 * Eigen-decomposition of a real symmetric matrix: Householder reduction to tridiagonal form followed
 * by the implicit QL algorithm (the EISPACK routines tred2 and tql2; Bowdler, Martin, Reinsch &
 * Wilkinson, Numer. Math. 11, 1968; as published in the public-domain JAMA library of NIST/MathWorks).
 * O(d³), accurate to working precision, no iteration limit tuning needed.
 *
 * Input: row-major d×d symmetric `A` (only read). Output: eigenvalues in DESCENDING order and the
 * matching unit eigenvectors as the rows of a row-major d×d matrix.
 */
export function symmetricEigen(A: Float64Array, n: number): { values: Float64Array; vectors: Float64Array } {
  // V[i][j] as V[i * n + j]; starts as A, ends as the eigenvector matrix (columns).
  const V = Float64Array.from(A.subarray(0, n * n));
  const d = new Float64Array(n);
  const e = new Float64Array(n);
  tred2(V, d, e, n);
  tql2(V, d, e, n);
  const order = Array.from({ length: n }, (_, i) => i).sort((a, b) => d[b]! - d[a]! || a - b);
  const values = new Float64Array(n);
  const vectors = new Float64Array(n * n);
  for (let r = 0; r < n; r++) {
    const c = order[r]!;
    values[r] = d[c]!;
    for (let i = 0; i < n; i++) vectors[r * n + i] = V[i * n + c]!;
  }
  return { values, vectors };
}

function tred2(V: Float64Array, d: Float64Array, e: Float64Array, n: number): void {
  for (let j = 0; j < n; j++) d[j] = V[(n - 1) * n + j]!;
  for (let i = n - 1; i > 0; i--) {
    let scale = 0;
    let h = 0;
    for (let k = 0; k < i; k++) scale += Math.abs(d[k]!);
    if (scale === 0) {
      e[i] = d[i - 1]!;
      for (let j = 0; j < i; j++) {
        d[j] = V[(i - 1) * n + j]!;
        V[i * n + j] = 0;
        V[j * n + i] = 0;
      }
    } else {
      for (let k = 0; k < i; k++) {
        d[k]! /= scale;
        h += d[k]! * d[k]!;
      }
      let f = d[i - 1]!;
      let g = Math.sqrt(h);
      if (f > 0) g = -g;
      e[i] = scale * g;
      h -= f * g;
      d[i - 1] = f - g;
      for (let j = 0; j < i; j++) e[j] = 0;
      for (let j = 0; j < i; j++) {
        f = d[j]!;
        V[j * n + i] = f;
        g = e[j]! + V[j * n + j]! * f;
        for (let k = j + 1; k <= i - 1; k++) {
          g += V[k * n + j]! * d[k]!;
          e[k]! += V[k * n + j]! * f;
        }
        e[j] = g;
      }
      f = 0;
      for (let j = 0; j < i; j++) {
        e[j]! /= h;
        f += e[j]! * d[j]!;
      }
      const hh = f / (h + h);
      for (let j = 0; j < i; j++) e[j]! -= hh * d[j]!;
      for (let j = 0; j < i; j++) {
        f = d[j]!;
        g = e[j]!;
        for (let k = j; k <= i - 1; k++) V[k * n + j]! -= f * e[k]! + g * d[k]!;
        d[j] = V[(i - 1) * n + j]!;
        V[i * n + j] = 0;
      }
    }
    d[i] = h;
  }
  for (let i = 0; i < n - 1; i++) {
    V[(n - 1) * n + i] = V[i * n + i]!;
    V[i * n + i] = 1;
    const h = d[i + 1]!;
    if (h !== 0) {
      for (let k = 0; k <= i; k++) d[k] = V[k * n + i + 1]! / h;
      for (let j = 0; j <= i; j++) {
        let g = 0;
        for (let k = 0; k <= i; k++) g += V[k * n + i + 1]! * V[k * n + j]!;
        for (let k = 0; k <= i; k++) V[k * n + j]! -= g * d[k]!;
      }
    }
    for (let k = 0; k <= i; k++) V[k * n + i + 1] = 0;
  }
  for (let j = 0; j < n; j++) {
    d[j] = V[(n - 1) * n + j]!;
    V[(n - 1) * n + j] = 0;
  }
  V[(n - 1) * n + n - 1] = 1;
  e[0] = 0;
}

function tql2(V: Float64Array, d: Float64Array, e: Float64Array, n: number): void {
  for (let i = 1; i < n; i++) e[i - 1] = e[i]!;
  e[n - 1] = 0;
  let f = 0;
  let tst1 = 0;
  const eps = 2 ** -52;
  for (let l = 0; l < n; l++) {
    tst1 = Math.max(tst1, Math.abs(d[l]!) + Math.abs(e[l]!));
    let m = l;
    while (m < n) {
      if (Math.abs(e[m]!) <= eps * tst1) break;
      m++;
    }
    if (m > l) {
      for (let iter = 0; iter < 100; iter++) {
        let g = d[l]!;
        let p = (d[l + 1]! - g) / (2 * e[l]!);
        let r = Math.hypot(p, 1);
        if (p < 0) r = -r;
        d[l] = e[l]! / (p + r);
        d[l + 1] = e[l]! * (p + r);
        const dl1 = d[l + 1]!;
        let h = g - d[l]!;
        for (let i = l + 2; i < n; i++) d[i]! -= h;
        f += h;
        p = d[m]!;
        let c = 1;
        let c2 = c;
        let c3 = c;
        const el1 = e[l + 1]!;
        let s = 0;
        let s2 = 0;
        for (let i = m - 1; i >= l; i--) {
          c3 = c2;
          c2 = c;
          s2 = s;
          g = c * e[i]!;
          h = c * p;
          r = Math.hypot(p, e[i]!);
          e[i + 1] = s * r;
          s = e[i]! / r;
          c = p / r;
          p = c * d[i]! - s * g;
          d[i + 1] = h + s * (c * g + s * d[i]!);
          for (let k = 0; k < n; k++) {
            h = V[k * n + i + 1]!;
            V[k * n + i + 1] = s * V[k * n + i]! + c * h;
            V[k * n + i] = c * V[k * n + i]! - s * h;
          }
        }
        p = (-s * s2 * c3 * el1 * e[l]!) / dl1;
        e[l] = s * p;
        d[l] = c * p;
        if (Math.abs(e[l]!) <= eps * tst1) break;
      }
    }
    d[l] = d[l]! + f;
    e[l] = 0;
  }
}

/**
 * Upper triangle of `cov` (d × d, row-major) += Σ_q u_q u_qᵀ over the four rows u_0..u_3 of `U`
 * (4 × d; unused rows zero). Four rank-1 updates per pass over the matrix keep it in cache.
 */
export function addOuterProducts4(cov: Float64Array, U: Float64Array, d: number): void {
  for (let a = 0; a < d; a++) {
    const u0 = U[a]!;
    const u1 = U[d + a]!;
    const u2 = U[2 * d + a]!;
    const u3 = U[3 * d + a]!;
    const row = a * d;
    for (let b = a; b < d; b++) cov[row + b]! += u0 * U[b]! + u1 * U[d + b]! + u2 * U[2 * d + b]! + u3 * U[3 * d + b]!;
  }
}
