import { join } from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import type { Plan } from "../plan/logicalTypes.js";
import type { Recording } from "../recording/types.js";
import type { Scenario } from "../scenario/types.js";
import { concreteScenarioXml, type ConcreteScenarioOptions } from "./concreteScenarioXml.js";
import { logicalTemplateXml, TEMPLATE_INPUTS } from "./logicalTemplateXml.js";
import { openDriveXml } from "./openDriveXml.js";
import { marginalsXml, variationsXml } from "./parameterDistributionXml.js";

export interface ScenarioExportFile {
  path: string;
  text: string;
}

/** File name of a recording's road (one per recording, beside the scenarios that use it). */
export function roadFileName(recording: string): string {
  return `${recording.replace(/[^A-Za-z0-9._-]/g, "_")}.xodr`;
}

/** Road extent along x: the road's xRange, else the tracks' extent (whole metres, widened by 10 m). */
export function roadExtent(rec: Recording): [number, number] {
  if (rec.road.xRange) return rec.road.xRange;
  let lo = Infinity;
  let hi = -Infinity;
  for (const tr of rec.tracks)
    for (let i = 0; i < tr.x.length; i++) {
      lo = Math.min(lo, tr.x[i]!);
      hi = Math.max(hi, tr.x[i]!);
    }
  if (!(hi > lo)) throw new InputError(`recording "${rec.id}" has no positions to derive the road's length from`, { file: rec.source });
  return [Math.floor(lo) - 10, Math.ceil(hi) + 10];
}

/**
 * The concrete OpenSCENARIO files of a plan (one per test case, "<id>.xosc"), one OpenDRIVE road per
 * recording ("<recording>.xodr") and, when the plan has logical scenarios, a parameterized template
 * per logical scenario with its value sets and marginals ("logical/<id>.xosc", ".variations.xosc",
 * ".marginals.xosc"), as texts. Nothing is written; see {@link writeExportFiles}.
 */
export function scenarioExportFiles(
  plan: Plan,
  scenarios: readonly Scenario[],
  recordings: readonly Recording[],
  options: ConcreteScenarioOptions = {},
): { files: ScenarioExportFile[]; warnings: string[] } {
  const byId = new Map(recordings.map((r) => [r.id, r]));
  const files: ScenarioExportFile[] = [];
  const warnings: string[] = [];
  const roads = new Set<string>();
  for (const tc of plan.testCases) {
    // Sampled variations have no recording to replay: they run through their logical scenario's template.
    if (tc.scenarioIndex === null) continue;
    const s = scenarios[tc.scenarioIndex];
    if (!s || s.id !== tc.scenarioId) throw new InputError(`test case ${tc.id} refers to scenario ${tc.scenarioIndex} ("${tc.scenarioId}"), which the scenario list does not hold`);
    const rec = byId.get(s.recording);
    if (!rec) throw new InputError(`test case ${tc.id}: recording "${s.recording}" was not passed; pass the recordings the pipeline ran on`);
    const roadFile = roadFileName(rec.id);
    if (!roads.has(rec.id)) {
      roads.add(rec.id);
      files.push({ path: roadFile, text: openDriveXml(rec.road, { xRange: roadExtent(rec) }) });
    }
    try {
      const r = concreteScenarioXml(
        { scenario: s, tracks: rec.tracks, frameRate: rec.road.frameRate, roadFile, name: tc.id, description: `${tc.id} (${tc.kind}, ${tc.logicalScenario}): ${tc.reasons.join("; ")}` },
        options,
      );
      files.push({ path: `${tc.id}.xosc`, text: r.xml });
      warnings.push(...r.warnings.map((w) => `${tc.id}: ${w}`));
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      warnings.push(`${tc.id}: not exported: ${e.message}`);
    }
  }
  // Logical scenarios: a template per logical scenario of a templated class, with its value sets
  // and marginals, under logical/.
  for (const ls of plan.logicalScenarios) {
    if (!TEMPLATE_INPUTS[ls.classId]) {
      warnings.push(`${ls.id}: class "${ls.classId}" has no template; not exported as a logical scenario`);
      continue;
    }
    const rec = byId.get(ls.representative.recording) ?? recordings[0];
    if (!rec) continue;
    const roadFile = roadFileName(rec.id);
    if (!roads.has(rec.id)) {
      roads.add(rec.id);
      files.push({ path: roadFile, text: openDriveXml(rec.road, { xRange: roadExtent(rec) }) });
    }
    const tpl = logicalTemplateXml(ls, rec.road, { roadFile: `../${roadFile}`, thresholds: options.thresholds });
    files.push({ path: `logical/${ls.id}.xosc`, text: tpl.xml });
    files.push({ path: `logical/${ls.id}.variations.xosc`, text: variationsXml(ls, plan.testCases, `${ls.id}.xosc`).xml });
    files.push({ path: `logical/${ls.id}.marginals.xosc`, text: marginalsXml(ls, `${ls.id}.xosc`, { seed: plan.provenance.seed ?? 1 }).xml });
    warnings.push(...tpl.warnings.map((w) => `${ls.id}: ${w}`));
  }
  return { files, warnings };
}

/**
 * Write the files of {@link scenarioExportFiles} (or any list of export files) into `dir`. All texts
 * are built before the first file is written, and each file is written atomically.
 */
export async function writeExportFiles(files: readonly ScenarioExportFile[], dir: string): Promise<string[]> {
  const paths: string[] = [];
  for (const f of files) {
    const p = join(dir, f.path);
    await writeFileAtomic(p, f.text);
    paths.push(p);
  }
  return paths;
}
