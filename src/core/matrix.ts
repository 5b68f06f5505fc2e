import { InputError } from "./errors.js";
/** Row-major dense matrix of float64 values. The one matrix shape used across roadsieve. */
export interface Matrix {
  data: Float64Array;
  rows: number;
  cols: number;
}

export function zeros(rows: number, cols: number): Matrix {
  return { data: new Float64Array(rows * cols), rows, cols };
}

/** Convert nested arrays once at the boundary; throws on ragged or non-finite input. */
export function fromRows(rows: ArrayLike<ArrayLike<number>>): Matrix {
  const n = rows.length;
  const d = n > 0 ? rows[0]!.length : 0;
  const m = zeros(n, d);
  for (let i = 0; i < n; i++) {
    const r = rows[i]!;
    if (r.length !== d) throw new InputError(`row ${i} has ${r.length} values, expected ${d} like row 0`);
    for (let j = 0; j < d; j++) {
      const v = r[j]!;
      if (!Number.isFinite(v)) throw new InputError(`row ${i}, column ${j}: value ${v} should be a finite number`);
      m.data[i * d + j] = v;
    }
  }
  return m;
}

export function toRows(m: Matrix): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < m.rows; i++) out.push(Array.from(m.data.subarray(i * m.cols, (i + 1) * m.cols)));
  return out;
}

/** A view (no copy) of row i. */
export function row(m: Matrix, i: number): Float64Array {
  return m.data.subarray(i * m.cols, (i + 1) * m.cols);
}

/** A copy of the selected rows. */
export function takeRows(m: Matrix, indices: ArrayLike<number>): Matrix {
  const out = zeros(indices.length, m.cols);
  for (let k = 0; k < indices.length; k++) {
    const i = indices[k]!;
    out.data.set(m.data.subarray(i * m.cols, (i + 1) * m.cols), k * m.cols);
  }
  return out;
}

/** Squared Euclidean distance between row i of a and row j of b. */
export function sqDist(a: Matrix, i: number, b: Matrix, j: number): number {
  const d = a.cols;
  const ad = a.data;
  const bd = b.data;
  let s = 0;
  const oa = i * d;
  const ob = j * d;
  for (let k = 0; k < d; k++) {
    const t = ad[oa + k]! - bd[ob + k]!;
    s += t * t;
  }
  return s;
}

/** Validate a matrix argument once at a stage boundary. */
export function assertMatrix(m: Matrix, name = "matrix"): void {
  if (!m || !(m.data instanceof Float64Array)) throw new InputError(`${name} should be { data: Float64Array, rows, cols }`);
  if (m.data.length !== m.rows * m.cols)
    throw new InputError(`${name}: data.length=${m.data.length} should equal rows*cols=${m.rows * m.cols}`);
  for (let k = 0; k < m.data.length; k++) {
    const v = m.data[k]!;
    if (!Number.isFinite(v))
      throw new InputError(`${name}: row ${Math.floor(k / m.cols)}, column ${k % m.cols} is ${v}; expected a finite number`);
  }
}
