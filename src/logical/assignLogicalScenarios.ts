import { InputError } from "../core/errors.js";
import type { Scenario } from "../scenario/types.js";
import { isScenarioClassId } from "./classes.js";
import type { LogicalModel, LogicalModelClass } from "./fitLogicalScenarios.js";

export interface LogicalAssignment {
  /** Logical scenario id, or null when the model has no logical scenario of the scenario's class. */
  logicalScenario: string | null;
  /** Standardized distance to its representative. */
  distance: number;
  /**
   * True when the scenario is new to the model: its class is not in the model, or it lies farther
   * from the nearest representative than any member did at fit time (the logical scenario's radius)
   * and outside the tolerance of a key parameter.
   */
  novel: boolean;
}

/**
 * Put new scenarios (classified and measured by measureScenarioParameters) into the logical
 * scenarios of a fitted model: the nearest representative of the scenario's class in the class's
 * standardized parameter space (a missing value sits at the mean, as in the fit).
 */
export function assignLogicalScenarios(model: LogicalModel, scenarios: readonly Scenario[]): LogicalAssignment[] {
  const byClass = new Map(model.classes.map((c) => [c.classId, c]));
  return scenarios.map((s, i) => {
    if (!s.scenarioClass || !s.parameters) throw new InputError(`scenario ${s.id} has no class or parameters; run measureScenarioParameters first`, { row: i + 1 });
    const c = byClass.get(s.scenarioClass);
    if (!c || c.scenarios.length === 0) return { logicalScenario: null, distance: Infinity, novel: true };
    const z = standardize(c, c.parameters.map((p) => s.parameters![p] ?? null));
    let best = 0;
    let bestD = Infinity;
    c.scenarios.forEach((ls, k) => {
      const d = dist(z, standardize(c, ls.centre));
      if (d < bestD) {
        bestD = d;
        best = k;
      }
    });
    const ls = c.scenarios[best]!;
    const outside = c.parameters.some((_, j) => {
      const a = s.parameters![c.parameters[j]!] ?? null;
      const b = ls.centre[j] ?? null;
      return a !== null && b !== null && Math.abs(a - b) > c.tolerance[j]!;
    });
    return { logicalScenario: ls.id, distance: bestD, novel: bestD > ls.radius + 1e-12 && outside };
  });
}

function standardize(c: LogicalModelClass, v: (number | null)[]): number[] {
  return v.map((x, j) => (x === null ? 0 : (x - c.mean[j]!) / c.sd[j]!));
}

function dist(a: number[], b: number[]): number {
  let s = 0;
  for (let j = 0; j < a.length; j++) s += (a[j]! - b[j]!) ** 2;
  return Math.sqrt(s);
}

const FORMAT = "roadsieve-logical-model";

/** JSON text of a fitted logical model (stable key order; numbers round-trip; null = not measurable). */
export function logicalModelToJSON(model: LogicalModel): string {
  return `${JSON.stringify({
    format: FORMAT,
    version: 1,
    classes: model.classes.map((c) => ({
      classId: c.classId,
      parameters: c.parameters,
      mean: c.mean,
      sd: c.sd,
      tolerance: c.tolerance,
      scenarios: c.scenarios.map((s) => ({ id: s.id, centre: s.centre, radius: s.radius })),
    })),
  })}\n`;
}

/** Read a model written by logicalModelToJSON; a bad field is named. */
export function logicalModelFromJSON(text: string, file?: string): LogicalModel {
  let o: Record<string, unknown>;
  try {
    o = JSON.parse(text) as Record<string, unknown>;
  } catch (e) {
    throw new InputError(`not valid JSON: ${(e as Error).message}`, { file });
  }
  const bad = (field: string, expected: string): never => {
    throw new InputError(`field "${field}" should be ${expected}`, { file, column: field });
  };
  if (!o || o.format !== FORMAT) bad("format", JSON.stringify(FORMAT));
  if (o.version !== 1) bad("version", "1");
  if (!Array.isArray(o.classes)) bad("classes", "an array");
  const finite = (v: unknown): v is number => typeof v === "number" && Number.isFinite(v);
  const classes = (o.classes as Record<string, unknown>[]).map((c, i) => {
    const f = `classes[${i}]`;
    if (!isScenarioClassId(c.classId)) bad(`${f}.classId`, "a scenario class id");
    const d = Array.isArray(c.parameters) ? c.parameters.length : bad(`${f}.parameters`, "an array of names");
    for (const k of ["mean", "sd", "tolerance"]) {
      const v = c[k];
      if (!Array.isArray(v) || v.length !== d || !v.every(finite)) bad(`${f}.${k}`, `${d} finite numbers`);
    }
    if (!(c.sd as number[]).every((x) => x > 0)) bad(`${f}.sd`, "numbers > 0");
    if (!Array.isArray(c.scenarios)) bad(`${f}.scenarios`, "an array");
    const scenarios = (c.scenarios as Record<string, unknown>[]).map((s, k) => {
      if (typeof s.id !== "string") bad(`${f}.scenarios[${k}].id`, "a string");
      if (!Array.isArray(s.centre) || s.centre.length !== d || !s.centre.every((x) => x === null || finite(x))) bad(`${f}.scenarios[${k}].centre`, `${d} numbers or nulls`);
      if (!finite(s.radius) || (s.radius as number) < 0) bad(`${f}.scenarios[${k}].radius`, "a number >= 0");
      return { id: s.id as string, centre: s.centre as (number | null)[], radius: s.radius as number };
    });
    return { classId: c.classId, parameters: c.parameters as string[], mean: c.mean as number[], sd: c.sd as number[], tolerance: c.tolerance as number[], scenarios } as LogicalModelClass;
  });
  return { format: FORMAT, version: 1, classes };
}
