import { InputError } from "../core/errors.js";
import type { Matrix } from "../core/matrix.js";
import type { Rng } from "../core/rng.js";
import { homogeneityTest } from "./homogeneityTest.js";

/** Result of a permutation test. */
export interface PermutationResult {
  statistic: number;
  /** (1 + #{permuted ≥ observed}) / (1 + permutations): never 0, valid at any number of permutations (Phipson & Smyth 2010). */
  p: number;
  permutations: number;
  /** What was permuted between the two groups: whole drives (all windows of one ego drive together) or single scenarios. */
  unit: "drive" | "scenario";
  units: { a: number; b: number };
  method: string;
}

/**
 * Units (drives) and their group. `unitOf[i]` is the unit of row i (0..units−1); `unitGroup[u]` is 0
 * for group A, 1 for B. Permuting the group labels of whole units keeps the windows of one drive
 * together, so that their correlation is not mistaken for a difference between the groups.
 */
export interface PermutationUnits {
  unitOf: Int32Array;
  unitGroup: Uint8Array;
  unit: "drive" | "scenario";
}

function checkUnits(u: PermutationUnits, rows: number): { a: number; b: number } {
  if (u.unitOf.length !== rows) throw new InputError(`unitOf has ${u.unitOf.length} entries for ${rows} rows`);
  let a = 0;
  let b = 0;
  for (const g of u.unitGroup) g === 0 ? a++ : b++;
  for (const x of u.unitOf) if (!(x >= 0 && x < u.unitGroup.length)) throw new InputError(`unit index ${x} out of range`);
  if (a === 0 || b === 0) throw new InputError(`a permutation test needs units in both groups (got ${a} and ${b})`);
  return { a, b };
}

function checkPermutations(p: number): void {
  if (!(Number.isInteger(p) && p >= 1)) throw new InputError(`permutations=${p} should be an integer >= 1`, { column: "permutations", value: p });
}

/**
 * Energy-distance two-sample test (Székely & Rizzo 2004, "Testing for equal distributions in high
 * dimension"; Rizzo & Székely 2016): with Euclidean distances, the V-statistic
 *   E = 2·mean|X − Y| − mean|X − X'| − mean|Y − Y'|,   T = n·m / (n + m) · E,
 * and its permutation distribution, permuting whole units between the groups.
 */
export function energyDistanceTest(X: Matrix, units: PermutationUnits, options: { permutations: number; rng: Rng }): PermutationResult {
  const { rows: n, cols } = X;
  const counts = checkUnits(units, n);
  checkPermutations(options.permutations);
  const D = new Float64Array(n * n);
  for (let i = 0; i < n; i++)
    for (let j = i + 1; j < n; j++) {
      let s = 0;
      for (let c = 0; c < cols; c++) {
        const d = X.data[i * cols + c]! - X.data[j * cols + c]!;
        s += d * d;
      }
      D[i * n + j] = D[j * n + i] = Math.sqrt(s);
    }
  let total = 0;
  for (let i = 0; i < n * n; i++) total += D[i]!;
  const inA = new Uint8Array(n);
  const stat = (group: Uint8Array): number => {
    let na = 0;
    for (let i = 0; i < n; i++) na += inA[i] = group[units.unitOf[i]!] === 0 ? 1 : 0;
    const nb = n - na;
    let sAA = 0;
    let sBB = 0;
    for (let i = 0; i < n; i++) {
      const ai = inA[i]!;
      const off = i * n;
      let rA = 0;
      let rB = 0;
      for (let j = 0; j < n; j++) (inA[j] ? (rA += D[off + j]!) : (rB += D[off + j]!));
      if (ai) sAA += rA;
      else sBB += rB;
    }
    const sAB = (total - sAA - sBB) / 2;
    const e = (2 * sAB) / (na * nb) - sAA / (na * na) - sBB / (nb * nb);
    return ((na * nb) / (na + nb)) * e;
  };
  const observed = stat(units.unitGroup);
  const perm = Uint8Array.from(units.unitGroup);
  let ge = 0;
  for (let k = 0; k < options.permutations; k++) {
    options.rng.shuffle(perm as unknown as Uint32Array);
    if (stat(perm) >= observed - 1e-12 * Math.abs(observed)) ge++;
  }
  return {
    statistic: observed,
    p: (1 + ge) / (1 + options.permutations),
    permutations: options.permutations,
    unit: units.unit,
    units: counts,
    method: `energy distance (Székely & Rizzo 2004), ${options.permutations} permutations of ${units.unit}s`,
  };
}

/**
 * Permutation version of the chi-square homogeneity test: the observed Pearson statistic of the
 * 2 × K table against its distribution when whole units (drives) are reassigned between the groups.
 * Unlike the asymptotic p-value it does not assume that windows are independent, only that drives
 * are exchangeable under the null hypothesis.
 */
export function chiSquarePermutationTest(
  categoryOf: Int32Array,
  categories: number,
  units: PermutationUnits,
  options: { permutations: number; rng: Rng },
): PermutationResult {
  const n = categoryOf.length;
  const counts = checkUnits(units, n);
  checkPermutations(options.permutations);
  const U = units.unitGroup.length;
  // Per unit: its category counts, sparse.
  const perUnit: Map<number, number>[] = Array.from({ length: U }, () => new Map());
  for (let i = 0; i < n; i++) {
    const m = perUnit[units.unitOf[i]!]!;
    const c = categoryOf[i]!;
    if (!(c >= 0 && c < categories)) throw new InputError(`category index ${c} out of range`);
    m.set(c, (m.get(c) ?? 0) + 1);
  }
  const total = new Float64Array(categories);
  for (const m of perUnit) for (const [c, k] of m) total[c]! += k;
  const table = (group: Uint8Array): number[][] => {
    const a = new Array<number>(categories).fill(0);
    for (let u = 0; u < U; u++) if (group[u] === 0) for (const [c, k] of perUnit[u]!) a[c]! += k;
    return [a, a.map((v, c) => total[c]! - v)];
  };
  const stat = (group: Uint8Array): number => {
    try {
      return homogeneityTest(table(group)).chiSquare.statistic;
    } catch {
      return 0; // a permutation that leaves one group empty carries no evidence
    }
  };
  const observed = stat(units.unitGroup);
  const perm = Uint8Array.from(units.unitGroup);
  let ge = 0;
  for (let k = 0; k < options.permutations; k++) {
    options.rng.shuffle(perm as unknown as Uint32Array);
    if (stat(perm) >= observed - 1e-12 * Math.abs(observed)) ge++;
  }
  return {
    statistic: observed,
    p: (1 + ge) / (1 + options.permutations),
    permutations: options.permutations,
    unit: units.unit,
    units: counts,
    method: `Pearson chi-square, ${options.permutations} permutations of ${units.unit}s`,
  };
}
