import { InputError } from "../core/errors.js";
import type { Matrix } from "../core/matrix.js";

/** Boundary checks shared by the cluster stage; messages quote the value and what was expected. */

export function checkMatrix(X: Matrix, name = "X", minRows = 1, checkValues = true): void {
  if (!X || typeof X !== "object" || !(X.data instanceof Float64Array))
    throw new InputError(`${name} should be a Matrix { data: Float64Array, rows, cols }`);
  if (!Number.isInteger(X.rows) || !Number.isInteger(X.cols) || X.rows < 0 || X.cols < 1)
    throw new InputError(`${name}: rows=${X.rows}, cols=${X.cols} should be integers with cols >= 1`);
  if (X.data.length !== X.rows * X.cols)
    throw new InputError(`${name}: data.length=${X.data.length} should equal rows*cols=${X.rows * X.cols}`);
  if (X.rows < minRows) throw new InputError(`${name}: n_samples=${X.rows} should be >= ${minRows}`);
  if (!checkValues) return;
  const a = X.data;
  let big = 0;
  let at = -1;
  for (let i = 0; i < a.length; i++) {
    const v = a[i]!;
    if (v - v !== 0) throw notFinite(name, X.cols, i, v);
    const m = v < 0 ? -v : v;
    if (m > big) {
      big = m;
      at = i;
    }
  }
  checkMagnitude(name, X, big, at);
}

/**
 * Overflow: a squared distance is at most cols · (2·max|x|)², a sum of them (inertia, distance sums)
 * at most rows times that. Finite values can still overflow there (±1e200 → Infinity, then NaN
 * inertia and arbitrary labels), so they are refused, naming the largest value.
 */
export function checkMagnitude(name: string, X: Matrix, big: number, at: number): void {
  if (Number.isFinite(4 * big * big * X.cols * Math.max(1, X.rows))) return;
  const a = X.data;
  throw new InputError(
    `${name}: row ${Math.floor(at / X.cols)}, column ${at % X.cols} is ${a[at]}; values this large overflow squared distances (rows · cols · (2·max|x|)² must stay below ${Number.MAX_VALUE.toExponential(3)}): rescale the data (e.g. standardize it)`,
    { row: Math.floor(at / X.cols), column: String(at % X.cols), value: a[at] },
  );
}

export function notFinite(name: string, cols: number, i: number, v: number): InputError {
  return new InputError(`${name}: row ${Math.floor(i / cols)}, column ${i % cols} is ${v}; expected a finite number`, {
    row: Math.floor(i / cols),
    column: String(i % cols),
    value: v,
  });
}

export function checkInt(name: string, v: unknown, min: number, max = Infinity): number {
  if (typeof v !== "number" || !Number.isInteger(v) || v < min || v > max)
    throw new InputError(
      `${name}=${JSON.stringify(v)} should be an integer ${max === Infinity ? `>= ${min}` : `in [${min}, ${max}]`}`,
      { value: v },
    );
  return v;
}

export function checkNumber(name: string, v: unknown, min: number, inclusive = true): number {
  if (typeof v !== "number" || !Number.isFinite(v) || (inclusive ? v < min : v <= min))
    throw new InputError(`${name}=${JSON.stringify(v)} should be a finite number ${inclusive ? ">=" : ">"} ${min}`, { value: v });
  return v;
}

export function checkWeights(w: Float64Array | undefined, n: number): Float64Array | null {
  if (w === undefined || w === null) return null;
  if (!(w instanceof Float64Array)) throw new InputError("weights should be a Float64Array (one weight per row)");
  if (w.length !== n) throw new InputError(`weights.length=${w.length} should equal n_samples=${n}`);
  for (let i = 0; i < n; i++) {
    const v = w[i]!;
    if (!(v >= 0) || !Number.isFinite(v))
      throw new InputError(`weights[${i}]=${v} should be a finite number >= 0`, { row: i, column: "weight", value: v });
  }
  return w;
}

export function checkLabels(labels: Int32Array, n: number, name = "labels"): number {
  if (!(labels instanceof Int32Array)) throw new InputError(`${name} should be an Int32Array`);
  if (labels.length !== n) throw new InputError(`${name}.length=${labels.length} should equal n_samples=${n}`);
  let max = -1;
  for (let i = 0; i < n; i++) {
    const l = labels[i]!;
    if (l < -1) throw new InputError(`${name}[${i}]=${l} should be >= -1 (-1 = noise)`, { row: i, value: l });
    // Labels are 0..k-1 with k <= n_samples; per-cluster arrays are sized by the largest label, so
    // a stray 1e9 would allocate gigabytes for clusters that cannot exist.
    if (l >= n) throw new InputError(`${name}[${i}]=${l} should be < n_samples=${n} (labels are 0..k-1 with at most one cluster per row)`, { row: i, value: l });
    if (l > max) max = l;
  }
  return max + 1;
}

export function checkThreads(v: unknown): number | "auto" {
  if (v === "auto") return v;
  return checkInt("threads", v, 1, 256);
}
