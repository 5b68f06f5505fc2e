import { join } from "node:path";
import { writeFileAtomic } from "../core/io.js";
import { testPlanToCsv } from "./planCsv.js";
import { testPlanToJson } from "./planJson.js";
import type { TestPlan } from "./types.js";

/** Write plan.json and plan.csv into `dir` (each atomically); returns the paths written. */
export async function writeTestPlan(plan: TestPlan, dir: string): Promise<string[]> {
  const json = join(dir, "plan.json");
  const csv = join(dir, "plan.csv");
  await writeFileAtomic(json, testPlanToJson(plan));
  await writeFileAtomic(csv, testPlanToCsv(plan));
  return [json, csv];
}
