import { join } from "node:path";
import { writeFileAtomic } from "../core/io.js";
import { logicalScenariosToCsv, planToCsv } from "./logicalCsv.js";
import type { Plan } from "./logicalTypes.js";

/** plan.json text for schema 2.0.0: same rules as testPlanToJson (fixed key order, non-finite as null, final newline). */
export function planToJson(plan: Plan): string {
  return `${JSON.stringify(plan, (_k, v: unknown) => {
    if (typeof v === "number" && !Number.isFinite(v)) return null;
    if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>);
    return v;
  }, 2)}\n`;
}

/** Write plan.json, plan.csv and logical-scenarios.csv into `dir` (each atomically); returns the paths. */
export async function writePlan(plan: Plan, dir: string): Promise<string[]> {
  const out = [join(dir, "plan.json"), join(dir, "plan.csv"), join(dir, "logical-scenarios.csv")];
  await writeFileAtomic(out[0]!, planToJson(plan));
  await writeFileAtomic(out[1]!, planToCsv(plan));
  await writeFileAtomic(out[2]!, logicalScenariosToCsv(plan));
  return out;
}
