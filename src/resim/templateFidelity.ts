import { mkdir, rm } from "node:fs/promises";
import { join } from "node:path";
import { writeFileAtomic } from "../core/io.js";
import type { Road } from "../recording/types.js";
import { readRecording } from "../recording/readRecording.js";
import { tracksCsv } from "../recording/writeTracks.js";
import { logicalTemplateXml, TEMPLATE_INPUTS } from "../exports/logicalTemplateXml.js";
import type { LogicalScenarioLike } from "../exports/logicalScenarioShape.js";
import { openDriveXml } from "../exports/openDriveXml.js";
import { chainView } from "./egoSeries.js";
import { measureTemplateParameters, templateTolerance } from "./measureTemplateParameters.js";
import { readOpenScenario } from "./readOpenScenario.js";
import { simulateScenario } from "./simulateScenario.js";

export interface TemplateFidelityRow {
  requested: Record<string, number>;
  measured: Record<string, number | null>;
  /** Per parameter: |measured − requested| within its tolerance. */
  within: Record<string, boolean>;
  allWithin: boolean;
}

/**
 * Write a logical scenario's template, run it once per requested value set (replay: the ego holds the
 * template's actions), read each run back through the chain and re-measure the inputs. `dir` receives
 * the template, its road and the runs; it is removed afterwards unless `keep` is set.
 */
export async function templateFidelity(
  ls: LogicalScenarioLike,
  road: Road,
  valueSets: readonly Record<string, number>[],
  dir: string,
  options: { keep?: boolean; duration?: number } = {},
): Promise<TemplateFidelityRow[]> {
  await mkdir(dir, { recursive: true });
  const tpl = logicalTemplateXml(ls, road, { roadFile: "road.xodr", duration: options.duration });
  const file = join(dir, `${ls.id}.xosc`);
  await writeFileAtomic(join(dir, "road.xodr"), openDriveXml(road));
  await writeFileAtomic(file, tpl.xml);
  const inputs = TEMPLATE_INPUTS[ls.classId] ?? [];
  const rows: TemplateFidelityRow[] = [];
  try {
    for (const [i, set] of valueSets.entries()) {
      const parameters: Record<string, number | string> = {};
      for (const p of tpl.parameters) if (set[p.input] !== undefined) parameters[p.name] = set[p.input]!;
      if (ls.classId === "cut-in" && set.cutterRelSpeed !== undefined) parameters.cutInTriggerRule = set.cutterRelSpeed < 0 ? "lessOrEqual" : "greaterOrEqual";
      const run = simulateScenario(await readOpenScenario(file, { parameters }), { recordingId: `${ls.id}-${i}` });
      const csv = join(dir, `${ls.id}-${i}.csv`);
      await writeFileAtomic(csv, tracksCsv(run.recording));
      const back = await readRecording(csv, { road: run.recording.road, id: `${ls.id}-${i}` });
      const measured = measureTemplateParameters(chainView(back), ls.classId, run.trackIds);
      const within: Record<string, boolean> = {};
      for (const name of inputs) {
        const req = set[name];
        const got = measured[name];
        if (req === undefined) continue;
        within[name] = got !== null && got !== undefined && Math.abs(got - req) <= templateTolerance(name, req);
      }
      rows.push({ requested: { ...set }, measured, within, allWithin: Object.values(within).every(Boolean) });
    }
  } finally {
    if (!options.keep) await rm(dir, { recursive: true, force: true });
  }
  return rows;
}
