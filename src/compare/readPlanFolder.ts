import { existsSync } from "node:fs";
import { readFile } from "node:fs/promises";
import { join } from "node:path";
import { InputError } from "../core/errors.js";
import { conditionColumn } from "../catalogue/catalogueTables.js";
import { queryCatalogue } from "../catalogue/queryCatalogue.js";
import { CONDITION_FIELDS, type RecordingConditions } from "../recording/conditions.js";
import { makingOfProvenance, type CatalogueSample } from "./catalogueSample.js";
import { diffPlans, type DiffablePlan, type PlanDiff } from "./diffPlans.js";

/** A plan folder read back: its plan.json (as plain JSON), its catalogue as a comparison side, its recordings. */
export interface PlanFolder {
  dir: string;
  plan: Record<string, unknown>;
  sample: CatalogueSample;
  recordings: { id: string; conditions: RecordingConditions }[];
  /** Final cluster label of every scenario as the catalogue stores it (−1 = DBSCAN noise), sample order. */
  clusters: number[];
  /** Scenario ids, sample order. */
  scenarioIds: string[];
}

/** plan.json of a folder (or the file itself), parsed; errors name the file. */
export async function readPlanJson(path: string): Promise<Record<string, unknown>> {
  const file = path.endsWith(".json") ? path : join(path, "plan.json");
  let text: string;
  try {
    text = await readFile(file, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the plan: ${(e as Error).message.split("\n")[0]}; give a folder written by roadsieve plan`, { file });
  }
  let plan: unknown;
  try {
    plan = JSON.parse(text);
  } catch (e) {
    throw new InputError(`plan.json is not valid JSON: ${(e as Error).message}`, { file });
  }
  if (!plan || typeof plan !== "object" || !Array.isArray((plan as Record<string, unknown>).testCases) || typeof (plan as Record<string, unknown>).provenance !== "object")
    throw new InputError(`not a roadsieve plan (no testCases or provenance)`, { file });
  return plan as Record<string, unknown>;
}

/**
 * Read a plan folder written by `roadsieve plan` (plan.json and catalogue.duckdb) as one side of a
 * comparison: every scenario's category (scenario_class when the catalogue has it, else type_key),
 * km, hours, drive and raw features.
 */
export async function readPlanFolder(dir: string, name = dir): Promise<PlanFolder> {
  const plan = await readPlanJson(dir);
  const db = join(dir, "catalogue.duckdb");
  if (!existsSync(db)) throw new InputError(`no catalogue.duckdb in the plan folder (it was written with --no-catalogue?); compare needs the catalogue`, { file: db });
  const cols = new Set(
    (await queryCatalogue(db, "SELECT column_name FROM information_schema.columns WHERE table_name = 'scenarios'")).map((r) => String(r.column_name)),
  );
  const hasClass = cols.has("scenario_class");
  const sc = await queryCatalogue(db, `SELECT id, recording, ego_track, km, duration_s, type_key, "cluster"${hasClass ? ", scenario_class" : ""} FROM scenarios ORDER BY idx`);
  const info = await queryCatalogue(db, "SELECT column_name, feature, feature_group FROM feature_info ORDER BY rowid");
  const featureCols = info.map((r) => String(r.column_name));
  const feats = featureCols.length > 0 ? await queryCatalogue(db, `SELECT ${featureCols.map((c) => `"${c}"`).join(", ")} FROM features ORDER BY idx`) : [];
  const data = new Float64Array(sc.length * featureCols.length);
  feats.forEach((r, i) => featureCols.forEach((c, j) => (data[i * featureCols.length + j] = r[c] === null ? NaN : Number(r[c]))));
  const recCols = new Set(
    (await queryCatalogue(db, "SELECT column_name FROM information_schema.columns WHERE table_name = 'recordings'")).map((r) => String(r.column_name)),
  );
  const condCols = CONDITION_FIELDS.filter((f) => recCols.has(conditionColumn(f)));
  const recs = await queryCatalogue(db, `SELECT id${condCols.map((f) => `, ${conditionColumn(f)}`).join("")} FROM recordings ORDER BY id`);
  const recordings = recs.map((r) => {
    const conditions: Record<string, string> = {};
    for (const f of condCols) if (r[conditionColumn(f)] !== null) conditions[f] = String(r[conditionColumn(f)]);
    return { id: String(r.id), conditions: conditions as RecordingConditions };
  });
  const useClass = hasClass && sc.length > 0 && sc.every((r) => r.scenario_class !== null);
  const prov = plan.provenance as { tool: string; version: string; options: Record<string, unknown>; upstream: Record<string, unknown> };
  const sample: CatalogueSample = {
    name,
    categoryKind: useClass ? "class" : "type key",
    categories: sc.map((r) => String(useClass ? r.scenario_class : r.type_key)),
    km: sc.map((r) => Number(r.km)),
    hours: sc.map((r) => Number(r.duration_s) / 3600),
    drives: sc.map((r) => `${String(r.recording)}/${String(r.ego_track)}`),
    recordings: sc.map((r) => String(r.recording)),
    features: featureCols.length > 0 ? { data, rows: sc.length, cols: featureCols.length } : null,
    featureNames: info.map((r) => String(r.feature)),
    featureGroups: info.map((r) => String(r.feature_group)),
    making: makingOfProvenance({ tool: String(prov.tool), version: String(prov.version), options: prov.options ?? {}, upstream: prov.upstream ?? {} }),
  };
  return { dir, plan, sample, recordings, clusters: sc.map((r) => Number(r.cluster)), scenarioIds: sc.map((r) => String(r.id)) };
}

/** Diff two plans given as folders or plan.json paths (what `roadsieve diff-plans` runs). */
export async function diffPlanFiles(oldPath: string, newPath: string): Promise<PlanDiff> {
  const a = (await readPlanJson(oldPath)) as unknown as DiffablePlan;
  const b = (await readPlanJson(newPath)) as unknown as DiffablePlan;
  return diffPlans(a, b);
}
