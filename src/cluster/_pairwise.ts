import type { Matrix } from "../core/matrix.js";

/**
 * Condensed pairwise Euclidean distances of the selected rows (upper triangle, row-major, like
 * scipy's pdist): entry for (a, b), a < b, sits at a*m - a*(a+1)/2 + (b - a - 1).
 */
export function condensedDistances(X: Matrix, rows: Int32Array | null): Float64Array {
  const m = rows ? rows.length : X.rows;
  const d = X.cols;
  const data = X.data;
  const out = new Float64Array((m * (m - 1)) / 2);
  let p = 0;
  for (let a = 0; a < m; a++) {
    const ao = (rows ? rows[a]! : a) * d;
    for (let b = a + 1; b < m; b++) {
      const bo = (rows ? rows[b]! : b) * d;
      let s = 0;
      for (let t = 0; t < d; t++) {
        const v = data[ao + t]! - data[bo + t]!;
        s += v * v;
      }
      out[p++] = Math.sqrt(s);
    }
  }
  return out;
}

/**
 * Mean silhouette (Rousseeuw, "Silhouettes: a graphical aid to the interpretation and validation of
 * cluster analysis", J. Comput. Appl. Math. 20, 1987) from condensed distances. Rows with label -1
 * (noise) take no part. Per-row value: s = (b - a) / max(a, b) with a the mean distance to the other
 * members of its cluster, b the lowest mean distance to another cluster; s = 0 in a singleton
 * cluster (scikit-learn's convention).
 */
export function silhouetteFromCondensed(D: Float64Array, labels: ArrayLike<number>, m: number, k: number): Float64Array {
  const sums = new Float64Array(m * k);
  const counts = new Float64Array(k);
  for (let a = 0; a < m; a++) if (labels[a]! >= 0) counts[labels[a]!]!++;
  let p = 0;
  for (let a = 0; a < m; a++) {
    const la = labels[a]!;
    for (let b = a + 1; b < m; b++) {
      const v = D[p++]!;
      const lb = labels[b]!;
      if (la < 0 || lb < 0) continue;
      sums[a * k + lb]! += v;
      sums[b * k + la]! += v;
    }
  }
  const s = new Float64Array(m);
  for (let a = 0; a < m; a++) {
    const la = labels[a]!;
    if (la < 0) {
      s[a] = NaN;
      continue;
    }
    const own = counts[la]!;
    if (own <= 1) {
      s[a] = 0;
      continue;
    }
    const ai = sums[a * k + la]! / (own - 1);
    let bi = Infinity;
    for (let c = 0; c < k; c++) {
      if (c === la || counts[c] === 0) continue;
      const v = sums[a * k + c]! / counts[c]!;
      if (v < bi) bi = v;
    }
    const den = Math.max(ai, bi);
    s[a] = den > 0 ? (bi - ai) / den : 0;
  }
  return s;
}
