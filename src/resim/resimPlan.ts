import { existsSync } from "node:fs";
import { readFile, rename, rm, mkdir } from "node:fs/promises";
import { basename, join, resolve } from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import { VERSION } from "../core/version.js";
import { fidelitySection } from "../report/fidelitySection.js";
import { renderHtml } from "../report/html.js";
import type { Progress } from "../core/progress.js";
import { loadClusteringModel } from "../cluster/clusteringModel.js";
import { assignLogicalScenarios, logicalModelFromJSON } from "../logical/assignLogicalScenarios.js";
import type { LogicalModel } from "../logical/fitLogicalScenarios.js";
import { extractRecording } from "../pipeline/extractRecording.js";
import { extractionOptionsOf, type PipelineOptions } from "../pipeline/options.js";
import { readRecording } from "../recording/readRecording.js";
import type { Recording } from "../recording/types.js";
import { tracksCsv } from "../recording/writeTracks.js";
import { chainView, egoSeries, type ChainView } from "./egoSeries.js";
import { fidelityCsv, fidelityBlock, withinTargets, type FidelityRow } from "./fidelityTable.js";
import { readOpenScenario } from "./readOpenScenario.js";
import type { ReferenceDriverOptions } from "./referenceDriver.js";
import { replayFidelity } from "./replayFidelity.js";
import { simulateScenario, type SimulationRun } from "./simulateScenario.js";
import type { ScenarioModel } from "./scenarioModel.js";
import type { LogicalScenarioLike } from "../exports/logicalScenarioShape.js";
import { TEMPLATE_INPUTS } from "../exports/logicalTemplateXml.js";
import { templateFidelity, type TemplateFidelityRow } from "./templateFidelity.js";

export interface ResimPlanOptions {
  /** Also drive every ego with the reference driver (default true). */
  closedLoop?: boolean;
  driver?: ReferenceDriverOptions;
  /** Also run the plan's sampled variations through their logical scenario's template (default true). */
  variations?: boolean;
  /** Re-simulate only the test cases this accepts (by id and role); default all. */
  only?: (testCase: { id: string; role: string }) => boolean;
  progress?: Progress;
}

interface PlanCase {
  id: string;
  role: string;
  logicalScenario: string | null;
  source: { recording: string; egoTrack: number; tStart: number; tEnd: number };
}

/** Sampled variations of a plan (schema 2: kind "variation", no source) grouped by logical scenario. */
interface PlanVariations {
  logical: LogicalScenarioLike;
  cases: { id: string; values: Record<string, number> }[];
}

async function readPlanJson(planDir: string): Promise<unknown> {
  const file = join(planDir, "plan.json");
  try {
    return JSON.parse(await readFile(file, "utf8"));
  } catch (e) {
    throw new InputError(`cannot read the plan: ${(e as Error).message}`, { file });
  }
}

function planVariations(plan: unknown): PlanVariations[] {
  const lss = (plan as { logicalScenarios?: unknown }).logicalScenarios;
  const tcs = (plan as { testCases?: unknown }).testCases;
  if (!Array.isArray(lss) || !Array.isArray(tcs)) return [];
  const out: PlanVariations[] = [];
  for (const ls of lss as LogicalScenarioLike[]) {
    if (!TEMPLATE_INPUTS[ls.classId]) continue;
    const cases = (tcs as Record<string, unknown>[])
      .filter((tc) => tc.kind === "variation" && tc.logicalScenario === ls.id && typeof tc.values === "object" && tc.values !== null)
      .map((tc) => ({ id: String(tc.id), values: Object.fromEntries(Object.entries(tc.values as Record<string, unknown>).filter((e): e is [string, number] => typeof e[1] === "number")) }));
    if (cases.length > 0) out.push({ logical: ls, cases });
  }
  return out;
}

/** The test cases of a plan.json with a recorded source (sampled variations have none and are skipped here). */
async function readPlanCases(planDir: string, plan?: unknown): Promise<PlanCase[]> {
  const file = join(planDir, "plan.json");
  plan ??= await readPlanJson(planDir);
  const tcs = (plan as { testCases?: unknown }).testCases;
  if (!Array.isArray(tcs)) throw new InputError(`the plan has no testCases array`, { file, column: "testCases" });
  const out: PlanCase[] = [];
  tcs.forEach((tc: Record<string, unknown>, i) => {
    const src = tc.source as Record<string, unknown> | null | undefined;
    if (typeof tc.id !== "string") throw new InputError(`testCases[${i}].id should be a string`, { file, column: "id", value: tc.id });
    if (src === null || src === undefined) return;
    if (typeof src.recording !== "string" || typeof src.egoTrack !== "number" || typeof src.tStart !== "number" || typeof src.tEnd !== "number")
      throw new InputError(`testCases[${i}].source should hold recording, egoTrack, tStart, tEnd`, { file, column: "source", value: JSON.stringify(src) });
    out.push({
      id: tc.id,
      role: String(tc.kind ?? tc.role ?? ""),
      logicalScenario: typeof tc.logicalScenario === "string" ? tc.logicalScenario : null,
      source: { recording: src.recording, egoTrack: src.egoTrack, tStart: src.tStart, tEnd: src.tEnd },
    });
  });
  return out;
}

/** The plan's fitted logical model and the extraction options it was made with, from DIR/model.json. */
async function logicalModelOf(planDir: string): Promise<{ model: LogicalModel; options: PipelineOptions } | null> {
  const file = join(planDir, "model.json");
  if (!existsSync(file)) return null;
  const m = await loadClusteringModel(file);
  if (m.logical === undefined) return null;
  const { options } = extractionOptionsOf(m.extraction);
  return { model: logicalModelFromJSON(JSON.stringify(m.logical), file), options };
}

/**
 * The re-simulated run goes through the plan's own extraction (maneuvers, scenes, windows, class and
 * parameters); the window of the test case's ego that starts nearest its source's start is assigned
 * with the fitted logical model, and must land in the test case's own logical scenario.
 */
function assignedBack(back: { model: LogicalModel; options: PipelineOptions }, played: Recording, c: PlanCase): boolean {
  // The player starts before the window (lead-in); cut the run to the source window so that the
  // first scenario window of the ego is the test case's own window.
  const { tStart, tEnd } = c.source;
  const tracks = played.tracks.flatMap((tr) => {
    let a = 0;
    while (a < tr.t.length && tr.t[a]! < tStart - 1e-6) a++;
    let b = a;
    while (b < tr.t.length && tr.t[b]! <= tEnd + 1e-6) b++;
    if (b - a < 2) return [];
    return [{ ...tr, t: tr.t.slice(a, b), x: tr.x.slice(a, b), y: tr.y.slice(a, b), vx: tr.vx.slice(a, b), vy: tr.vy.slice(a, b), ax: tr.ax.slice(a, b), ay: tr.ay.slice(a, b), lane: tr.lane.slice(a, b) }];
  });
  const x = extractRecording({ ...played, tracks }, back.options);
  let best: (typeof x.set.scenarios)[number] | null = null;
  for (const s of x.set.scenarios)
    if (s.egoTrack === c.source.egoTrack && (best === null || Math.abs(s.tStart - c.source.tStart) < Math.abs(best.tStart - c.source.tStart))) best = s;
  if (best === null) return false;
  return assignLogicalScenarios(back.model, [best])[0]!.logicalScenario === c.logicalScenario;
}

export interface ResimPlanResult {
  rows: FidelityRow[];
  /** Sampled variations (plan schema 2): requested vs re-measured template inputs, per test case. */
  variations: { testCase: string; logicalScenario: string; row: TemplateFidelityRow }[];
  /** Files written (under DIR/resim/). */
  files: string[];
  warnings: string[];
}

/**
 * Re-simulate a plan folder: every test case's `openscenario/<id>.xosc` is read (with its road),
 * played at the recording's frame rate with the ego replayed and, unless switched off, again with
 * the reference driver; each replayed run is written in our tracks format, read back through
 * readRecording, and measured by the chain (maneuvers, scenes) like its source in `recordings`.
 * Writes DIR/resim/<id>.csv (replay), DIR/resim/<id>.closed-loop.csv, fidelity.csv and fidelity.json.
 * Every file is read and simulated before anything is written; the folder appears by one rename.
 */
export async function resimPlanFolder(planDir: string, recordings: readonly Recording[], options: ResimPlanOptions = {}): Promise<ResimPlanResult> {
  const plan = await readPlanJson(planDir);
  const cases = (await readPlanCases(planDir, plan)).filter((c) => !options.only || options.only({ id: c.id, role: c.role }));
  const variations = options.variations === false ? [] : planVariations(plan);
  const closed = options.closedLoop ?? true;
  const warnings: string[] = [];
  const byId = new Map(recordings.map((r) => [r.id, r]));
  for (const c of cases) if (!byId.has(c.source.recording)) throw new InputError(`test case ${c.id} comes from recording "${c.source.recording}", which was not given; pass its tracks file`, { file: join(planDir, "plan.json") });
  // 1. read and run everything (bad input stops here, before any file is written).
  const runs: { c: PlanCase; file: string; model: ScenarioModel; replay: SimulationRun; closedLoop: SimulationRun | null }[] = [];
  for (const [i, c] of cases.entries()) {
    options.progress?.({ stage: "resim", done: i, total: cases.length });
    const file = join(planDir, "openscenario", `${c.id}.xosc`);
    const model = await readOpenScenario(file);
    const replay = simulateScenario(model, { ego: "replay", recordingId: c.id });
    const closedLoop = closed ? simulateScenario(model, { ego: "closed-loop", recordingId: `${c.id}.closed-loop`, driver: options.driver }) : null;
    runs.push({ c, file, model, replay, closedLoop });
  }
  options.progress?.({ stage: "resim", done: cases.length, total: cases.length });
  const back = await logicalModelOf(planDir);
  if (!back) warnings.push("model.json has no logical model: re-simulated test cases are not assigned back to a logical scenario");
  // 2. source views, once per recording.
  const views = new Map<string, ChainView>();
  for (const r of new Set(cases.map((c) => c.source.recording))) views.set(r, chainView(byId.get(r)!));
  // 3. write each run in our format into a staging folder, read it back, measure.
  const finalDir = join(planDir, "resim");
  const stage = join(planDir, `.resim.${process.pid}.tmp`);
  await rm(stage, { recursive: true, force: true });
  await mkdir(stage, { recursive: true });
  const rows: FidelityRow[] = [];
  const variationRows: ResimPlanResult["variations"] = [];
  const names: string[] = [];
  try {
    for (const [i, r] of runs.entries()) {
      options.progress?.({ stage: "fidelity", done: i, total: runs.length });
      const path = join(stage, `${r.c.id}.csv`);
      await writeFileAtomic(path, tracksCsv(r.replay.recording));
      names.push(`${r.c.id}.csv`);
      if (r.closedLoop) {
        await writeFileAtomic(join(stage, `${r.c.id}.closed-loop.csv`), tracksCsv(r.closedLoop.recording));
        names.push(`${r.c.id}.closed-loop.csv`);
      }
      const played = await readRecording(path, { road: r.replay.recording.road, id: r.c.id });
      const resimSeries = egoSeries(chainView(played), r.c.source.egoTrack, r.c.source.tStart, r.c.source.tEnd);
      const srcSeries = egoSeries(views.get(r.c.source.recording)!, r.c.source.egoTrack, r.c.source.tStart, r.c.source.tEnd);
      const w = [...r.replay.warnings];
      const replay = resimSeries && srcSeries ? replayFidelity(srcSeries, resimSeries) : null;
      if (!replay) w.push(`the ego track ${r.c.source.egoTrack} is missing from the ${resimSeries ? "source" : "re-simulated"} run`);
      rows.push({
        testCase: r.c.id,
        role: r.c.role,
        logicalScenario: r.c.logicalScenario,
        file: `openscenario/${r.c.id}.xosc`,
        replay,
        withinTargets: replay ? withinTargets(replay) : null,
        replayOutcome: r.replay.ego,
        closedLoop: r.closedLoop?.ego ?? null,
        assignedBack: back && r.c.logicalScenario ? assignedBack(back, played, r.c) : null,
        warnings: w,
      });
      warnings.push(...w.map((x) => `${r.c.id}: ${x}`));
    }
    options.progress?.({ stage: "fidelity", done: runs.length, total: runs.length });
    // Sampled variations: each through its logical scenario's template, re-measured by the chain.
    for (const v of variations) {
      const rec = byId.get(v.logical.representative.recording) ?? recordings[0];
      if (!rec) break;
      const tf = await templateFidelity(v.logical, rec.road, v.cases.map((c) => c.values), join(stage, "variations", v.logical.id), { keep: true });
      tf.forEach((row, i) => variationRows.push({ testCase: v.cases[i]!.id, logicalScenario: v.logical.id, row }));
    }
    await writeFileAtomic(join(stage, "fidelity.csv"), fidelityCsv(rows));
    const variationJson = variationRows.map((v) => ({ id: v.testCase, logicalScenario: v.logicalScenario, requested: v.row.requested, measured: v.row.measured, within: v.row.within, allWithin: v.row.allWithin }));
    await writeFileAtomic(join(stage, "fidelity.json"), `${JSON.stringify({ testCases: rows.map((r) => ({ id: r.testCase, role: r.role, logicalScenario: r.logicalScenario, fidelity: fidelityBlock(r) })), variations: variationJson }, null, 2)}\n`);
    const html = renderHtml({ title: "roadsieve re-simulation", subtitle: `plan folder ${basename(resolve(planDir))}`, sections: [fidelitySection(rows)], provenance: { tool: `roadsieve ${VERSION}`, plan: "plan.json" } });
    await writeFileAtomic(join(stage, "fidelity.html"), html);
    names.push("fidelity.csv", "fidelity.json", "fidelity.html");
    await rm(finalDir, { recursive: true, force: true });
    await rename(stage, finalDir);
  } catch (e) {
    await rm(stage, { recursive: true, force: true });
    throw e;
  }
  return { rows, variations: variationRows, files: names.map((n) => join(finalDir, n)), warnings };
}
