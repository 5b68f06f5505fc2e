import type { Matrix } from "../core/matrix.js";
import { assertMatrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";

/** Options of {@link standardize}. */
export interface StandardizeOptions {
  /** Group name of every column (length = matrix.cols). Without it every column is its own group. */
  groups?: readonly string[];
  /** Weight per group (>= 0); missing groups weigh 1. */
  weights?: Readonly<Record<string, number>>;
  /**
   * Divide each column by sqrt(size of its group), so that every group contributes the same total
   * variance (its weight²) whatever its number of columns. Default true.
   */
  balanceGroups?: boolean;
}

/** Parameters of a fitted standardization: x' = (x − mean) / scale · weight, per column. */
export interface Standardization {
  mean: Float64Array;
  /** Population standard deviation; 1 for a constant column (which then maps to 0). */
  scale: Float64Array;
  /** Group weight / sqrt(group size) (or the plain group weight without balancing). */
  weight: Float64Array;
}

/**
 * Z-score standardization per column (population standard deviation, as scikit-learn's
 * StandardScaler) followed by a weight per column group. Constant columns map to 0 and are named in
 * `warnings`. Returns the transformed copy and the parameters, which {@link applyStandardization}
 * applies to new rows.
 */
export function standardize(matrix: Matrix, options: StandardizeOptions = {}): Standardization & { matrix: Matrix; warnings: string[] } {
  assertMatrix(matrix, "matrix");
  const { rows, cols, data } = matrix;
  if (rows < 1) throw new InputError(`matrix has ${rows} rows; standardize needs at least 1`);
  const groups = options.groups ?? Array.from({ length: cols }, (_, j) => `column ${j}`);
  if (groups.length !== cols) throw new InputError(`groups has ${groups.length} entries, expected one per column (${cols})`);
  const weights = options.weights ?? {};
  for (const [g, w] of Object.entries(weights)) {
    if (!groups.includes(g)) throw new InputError(`weights names group "${g}", which no column has; groups: ${[...new Set(groups)].join(", ")}`);
    if (typeof w !== "number" || !Number.isFinite(w) || w < 0) throw new InputError(`weights["${g}"]=${String(w)} should be a finite number >= 0`);
  }
  const balance = options.balanceGroups ?? true;
  const size = new Map<string, number>();
  for (const g of groups) size.set(g, (size.get(g) ?? 0) + 1);
  const mean = new Float64Array(cols);
  const scale = new Float64Array(cols);
  const weight = new Float64Array(cols);
  const warnings: string[] = [];
  const constant: number[] = [];
  for (let j = 0; j < cols; j++) {
    // Two-pass mean and variance for accuracy.
    let m = 0;
    for (let i = 0; i < rows; i++) m += data[i * cols + j]!;
    m /= rows;
    let v = 0;
    for (let i = 0; i < rows; i++) {
      const d = data[i * cols + j]! - m;
      v += d * d;
    }
    const sd = Math.sqrt(v / rows);
    mean[j] = m;
    // A column constant up to rounding is treated as constant.
    const isConstant = !(sd > 1e-12 * Math.max(1, Math.abs(m)));
    scale[j] = isConstant ? 1 : sd;
    if (isConstant) constant.push(j);
    const g = groups[j]!;
    const w = weights[g] ?? 1;
    weight[j] = balance ? w / Math.sqrt(size.get(g)!) : w;
  }
  if (constant.length > 0) warnings.push(`${constant.length} constant column(s) map to 0: ${constant.slice(0, 10).join(", ")}${constant.length > 10 ? " …" : ""}`);
  const params = { mean, scale, weight };
  return { matrix: applyStandardization(matrix, params), ...params, warnings };
}

/** Apply fitted standardization parameters to (new) rows with the same columns. */
export function applyStandardization(matrix: Matrix, params: Standardization): Matrix {
  const { rows, cols, data } = matrix;
  if (params.mean.length !== cols) throw new InputError(`matrix has ${cols} columns, the standardization was fitted on ${params.mean.length}`);
  const out = new Float64Array(rows * cols);
  for (let i = 0; i < rows; i++)
    for (let j = 0; j < cols; j++) {
      const p = i * cols + j;
      const z = (data[p]! - params.mean[j]!) / params.scale[j]!;
      out[p] = z * params.weight[j]!;
    }
  // Constant columns: (x − mean) is exactly 0 on the fitted rows; keep -0 out of results.
  for (let p = 0; p < out.length; p++) if (out[p] === 0) out[p] = 0;
  return { data: out, rows, cols };
}
