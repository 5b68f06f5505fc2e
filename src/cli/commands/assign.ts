import { existsSync, statSync } from "node:fs";
import { join, resolve } from "node:path";
import { parseArgs } from "node:util";
import { assignScenarios } from "../../cluster/assignScenarios.js";
import { checkModelFeatures, loadClusteringModel } from "../../cluster/clusteringModel.js";
import { writeFileAtomic } from "../../core/io.js";
import type { Progress } from "../../core/progress.js";
import { embedScenarios } from "../../embed/features.js";
import { scenarioWeights } from "../../exposure/sampleWeights.js";
import { extractRecording } from "../../pipeline/extractRecording.js";
import { mergeScenarioSets } from "../../pipeline/mergeScenarioSets.js";
import { extractionOptionsOf } from "../../pipeline/options.js";
import { checkDistinctIds } from "../../pipeline/planCatalogue.js";
import { readRecording } from "../../recording/readRecording.js";
import type { ScenarioSet } from "../../scenario/types.js";
import type { Command } from "../command.js";
import { progressDisplay } from "../progressDisplay.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError, numberOption } from "../usageError.js";

const HELP = `roadsieve assign PLAN_DIR TRACKS... [options]

Put the scenarios of new recordings into the clusters of an existing plan, without refitting:
reads PLAN_DIR/model.json (written by roadsieve plan / demo), cuts and embeds the new recordings
exactly as the plan's recordings were (the options stored in the model), assigns every scenario to
the nearest cluster centre and flags the novel ones — those in no dense region of the plan's
scenarios (DBSCAN noise under the plan's eps), i.e. kinds of driving the plan has no test case for.
Prints scenarios and kilometres per cluster beside the plan's own shares, and the novel scenarios.
A model that does not match the recordings (other feature names or counts) is exit code 2.

Options:
${RECORDING_HELP}
  --out FILE           also write one CSV row per scenario: its cluster, distances, novelty
  --list N             list at most N novel scenarios                 (default: 20)
  --quiet              no progress display

Example:
  roadsieve assign out recordings/day3/tracks.parquet --out out/day3-assigned.csv
`;

/** An RFC 4180 CSV field. */
function cell(v: string | number): string {
  const s = typeof v === "number" ? (Number.isFinite(v) ? String(v) : "") : v;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

const pct = (x: number): string => `${(100 * x).toFixed(1)} %`;

export const assignCommand: Command = {
  name: "assign",
  summary: "new recordings into an existing plan's clusters, novel scenarios flagged",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...RECORDING_OPTIONS, out: { type: "string" }, list: { type: "string" }, quiet: { type: "boolean", default: false } },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length < 2) throw new UsageError("give the plan folder (with model.json) and at least one tracks file; roadsieve assign --help");
    const [planDir, ...files] = positionals as [string, ...string[]];
    const listMax = numberOption("list", values.list, { integer: true, min: 0 }) ?? 20;
    const modelPath = existsSync(planDir) && statSync(planDir).isDirectory() ? join(planDir, "model.json") : planDir;
    const model = await loadClusteringModel(modelPath);
    const readOptions = await recordingOptions(values, files.length);
    const display = progressDisplay(process.stderr, Boolean(values.quiet));
    const progress: Progress = display.progress;
    try {
      const warnings: string[] = [];
      // Cut and embed exactly as the plan did; a model written outside the pipeline has no record of it.
      if (model.extraction === null) warnings.push("the model records no extraction options; the new recordings are cut and embedded with the defaults");
      const { options: opts, weightBy } = extractionOptionsOf(model.extraction);
      const recs = [];
      for (const f of files) recs.push(await readRecording(f, { ...readOptions, progress }));
      checkDistinctIds(recs);
      const sets: ScenarioSet[] = [];
      for (const rec of recs) {
        const x = extractRecording(rec, opts, progress);
        sets.push(x.set);
        for (const w of x.summary.warnings) warnings.push(`${rec.id}: ${w}`);
      }
      const merged = mergeScenarioSets(sets);
      const sc = merged.scenarios;
      if (sc.length === 0) throw new UsageError("the recordings gave no scenarios to assign");
      const embedding = embedScenarios(merged, opts.embedding);
      checkModelFeatures(model, embedding.features.map((f) => f.name), modelPath);
      const a = assignScenarios(model, embedding);
      warnings.push(...a.warnings);
      display.done();

      const w = scenarioWeights(sc, weightBy);
      let total = 0;
      for (const v of w) total += v;
      const k = model.k;
      const count = new Array<number>(k + 1).fill(0);
      const km = new Array<number>(k + 1).fill(0);
      const weight = new Array<number>(k + 1).fill(0);
      for (let i = 0; i < sc.length; i++) {
        const slot = a.labels[i]! < 0 ? k : a.labels[i]!;
        count[slot]!++;
        km[slot]! += sc[i]!.km;
        weight[slot]! += w[i]!;
      }
      const out = process.stdout;
      out.write(
        `${modelPath}: k = ${k} clusters (${model.kChosenBy === "silhouette" ? "chosen by silhouette" : "given"})` +
          `${model.dbscan ? `, novelty by DBSCAN on ${model.pca!.components.rows} principal components (eps ${model.dbscan.eps.toPrecision(4)})` : ", novelty by k-means distance (no DBSCAN in the model)"}` +
          `; fitted on ${model.training.rows} scenarios\n`,
      );
      const kmAll = km.reduce((s, v) => s + v, 0);
      out.write(`assigned ${sc.length} scenarios (${kmAll.toFixed(1)} vehicle-km) from ${recs.length} recording(s)\n\n`);
      const header = ["cluster", "scenarios", "km", `share (${weightBy})`, "share in the plan"];
      const rows: string[][] = [];
      for (let c = 0; c <= k; c++) {
        if (c === k && count[k] === 0 && model.training.noiseShare === 0) continue;
        rows.push([
          c === k ? (model.dbscan ? "novel (noise)" : "-") : String(c),
          String(count[c]),
          km[c]!.toFixed(2),
          pct(total > 0 ? weight[c]! / total : 0),
          pct(c === k ? model.training.noiseShare : model.training.clusterShare[c]!),
        ]);
      }
      const width = header.map((h, j) => Math.max(h.length, ...rows.map((r) => r[j]!.length)));
      out.write(header.map((h, j) => (j === 0 ? h.padEnd(width[j]!) : h.padStart(width[j]!))).join("  ") + "\n");
      for (const r of rows) out.write(r.map((v, j) => (j === 0 ? v.padEnd(width[j]!) : v.padStart(width[j]!))).join("  ") + "\n");

      const novel: number[] = [];
      for (let i = 0; i < sc.length; i++) if (a.novel[i]) novel.push(i);
      const score = a.densityNovelty ?? a.novelty;
      novel.sort((x, y) => score[y]! - score[x]! || x - y);
      out.write(
        `\n${novel.length} novel scenario(s)${model.dbscan ? " — in no dense region of the plan's scenarios (nearest core scenario farther than eps)" : " — farther from their centre than 95 % of its own training scenarios"}` +
          `${novel.length > 0 ? ", most novel first:" : ""}\n`,
      );
      for (const i of novel.slice(0, listMax)) {
        const s = sc[i]!;
        out.write(
          `  ${s.id}  recording ${s.recording}, ego track ${s.egoTrack}, ${s.tStart.toFixed(1)}–${s.tEnd.toFixed(1)} s, nearest cluster ${a.cluster[i]}, ` +
            `novelty ${score[i]!.toFixed(2)}${a.densityNovelty ? " (distance / eps)" : ""}\n`,
        );
      }
      if (novel.length > listMax) out.write(`  … ${novel.length - listMax} more${values.out ? "" : " (--out FILE lists every scenario)"}\n`);

      if (values.out) {
        const lines = [["scenario_id", "recording", "ego_track", "t_start_s", "t_end_s", "km", "cluster", "nearest_cluster", "distance", "novelty", "density_novelty", "novel"].join(",")];
        for (let i = 0; i < sc.length; i++) {
          const s = sc[i]!;
          lines.push(
            [s.id, s.recording, s.egoTrack, s.tStart, s.tEnd, s.km, a.labels[i]!, a.cluster[i]!, a.distance[i]!, a.novelty[i]!, a.densityNovelty ? a.densityNovelty[i]! : "", a.novel[i]!]
              .map((v) => cell(v as string | number))
              .join(","),
          );
        }
        const path = resolve(values.out);
        await writeFileAtomic(path, lines.join("\n") + "\n");
        out.write(`wrote ${path}\n`);
      }
      for (const msg of warnings) process.stderr.write(`warning: ${msg}\n`);
      return 0;
    } finally {
      display.done();
    }
  },
};
