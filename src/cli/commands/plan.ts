import { resolve } from "node:path";
import { parseArgs } from "node:util";
import type { Progress } from "../../core/progress.js";
import type { PipelineOptions } from "../../pipeline/options.js";
import { runPipeline } from "../../pipeline/runPipeline.js";
import { writeOutputs } from "../../pipeline/writeOutputs.js";
import { readRecording, type ReadRecordingOptions } from "../../recording/readRecording.js";
import type { Recording } from "../../recording/types.js";
import type { Command } from "../command.js";
import { SCENARIO_CLASS_IDS, isScenarioClassId } from "../../logical/classes.js";
import { progressDisplay } from "../progressDisplay.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError, choiceOption, numberOption, rangeOption } from "../usageError.js";

/** Options of the pipeline on the command line (shared by plan and demo). */
export const PIPELINE_CLI_OPTIONS = {
  out: { type: "string" },
  seed: { type: "string" },
  k: { type: "string" },
  "k-range": { type: "string" },
  budget: { type: "string" },
  "target-share": { type: "string" },
  window: { type: "string" },
  "event-windows": { type: "string" },
  map: { type: "string" },
  weight: { type: "string" },
  eps: { type: "string" },
  "min-pts": { type: "string" },
  "no-dbscan": { type: "boolean", default: false },
  "no-catalogue": { type: "boolean", default: false },
  parquet: { type: "boolean", default: false },
  openscenario: { type: "boolean", default: false },
  critical: { type: "string" },
  rare: { type: "string" },
  quiet: { type: "boolean", default: false },
  classes: { type: "string" },
  "max-k-per-class": { type: "string" },
  "min-share": { type: "string" },
  importance: { type: "string" },
} as const;

export const PIPELINE_HELP = `  --out DIR            output folder                                  (default: out)
  --seed N             seed of every random choice                    (default: 1)
  --k N                number of k-means clusters                     (default: chosen by silhouette)
  --k-range A..B       k tried when --k is not given                  (default: 2..12)
  --budget N           concrete test cases to run (default: 40, or the must-keep count when larger);
                       below one per logical scenario with critical anchors is an error
  --target-share F     add representatives until they stand for this share of the km (0 < F <= 1)
  --window S           fixed scenario windows of S seconds            (default: 10)
  --event-windows A..B windows cut at lane changes and events, A to B seconds long
  --map M              umap | pca, the 2-D map in the report          (default: umap)
  --weight W           km | hours: what a scenario weighs in clustering and shares (default: km)
  --eps E              DBSCAN radius                                  (default: knee of the k-distance curve)
  --min-pts N          DBSCAN minPts                                  (default: 2 × dimensions)
  --no-dbscan          no DBSCAN: rare scenarios come from type keys seen once only
  --critical P         each | per-type: every critical scenario its own test case, or the most
                       critical one per cluster and type key standing for the others (default: each)
  --rare R             noise+types | noise | types | none: which rare scenarios are kept on their
                       own: DBSCAN noise, type keys seen once                  (default: noise+types)
  --no-catalogue       do not write catalogue.duckdb
  --parquet            also export the catalogue tables to DIR/catalogue/*.parquet
  --openscenario       also write one ASAM OpenSCENARIO 1.x file per test case to DIR/openscenario/
  --quiet              no progress display
  --classes A,B        scenario classes clustered inside (others: one logical scenario each); ids in docs/logical.md
  --max-k-per-class N  most logical scenarios per class                (default: 2)
  --min-share F        logical scenarios with at least this km share get a test case first (default: 0.01)
  --importance D       shift sampled variations D standard deviations towards the critical side, with
                       likelihood-ratio weights in the plan              (default: 0, off)`;

type PipelineCliValues = { [K in keyof typeof PIPELINE_CLI_OPTIONS]?: (typeof PIPELINE_CLI_OPTIONS)[K]["type"] extends "boolean" ? boolean : string };

/** Command-line values → pipeline options. */
export function pipelineOptions(v: PipelineCliValues): PipelineOptions {
  const o: PipelineOptions = { plan: {} };
  o.seed = numberOption("seed", v.seed, { integer: true, min: 0 });
  o.k = numberOption("k", v.k, { integer: true, min: 1 }) ?? null;
  const kr = rangeOption("k-range", v["k-range"], 2);
  if (kr) o.kRange = kr;
  if (v.k !== undefined && v["k-range"] !== undefined) throw new UsageError("give --k or --k-range, not both");
  const budget = numberOption("budget", v.budget, { integer: true, min: 1 });
  o.logical = {};
  const fit: NonNullable<NonNullable<PipelineOptions["logical"]>["fit"]> = {};
  if (v.classes !== undefined) {
    const ids = v.classes.split(",").map((x) => x.trim()).filter((x) => x !== "");
    for (const id of ids) if (!isScenarioClassId(id)) throw new UsageError(`--classes: unknown scenario class "${id}"; known: ${SCENARIO_CLASS_IDS.join(", ")}`);
    fit.classes = ids;
  }
  const maxK = numberOption("max-k-per-class", v["max-k-per-class"], { integer: true, min: 1 });
  if (maxK !== undefined) fit.maxK = maxK;
  o.logical.fit = fit;
  const minShare = numberOption("min-share", v["min-share"], { min: 0, max: 1 });
  if (minShare !== undefined) o.logical.minShare = minShare;
  const imp = numberOption("importance", v.importance, { min: 0, max: 5 });
  if (imp !== undefined) o.logical.importanceShift = imp;
  const share = numberOption("target-share", v["target-share"], { min: Number.MIN_VALUE, max: 1 });
  if (budget !== undefined) o.plan!.budget = budget;
  if (share !== undefined) o.plan!.targetShare = share;
  const win = numberOption("window", v.window, { min: 0.5 });
  const ev = v["event-windows"];
  if (win !== undefined && ev !== undefined) throw new UsageError("give --window or --event-windows, not both");
  if (win !== undefined) o.scenario = { window: { mode: "fixed", seconds: win } };
  if (ev !== undefined) {
    const m = /^(\d+(?:\.\d+)?)\.\.(\d+(?:\.\d+)?)$/.exec(ev.trim());
    if (!m || !(Number(m[1]) > 0) || Number(m[2]) < Number(m[1])) throw new UsageError(`--event-windows=${JSON.stringify(ev)} should look like 4..20 (seconds, min..max)`);
    o.scenario = { window: { mode: "events", minSeconds: Number(m[1]), maxSeconds: Number(m[2]) } };
  }
  const critical = choiceOption("critical", v.critical, ["each", "per-type"] as const);
  if (critical) o.plan!.criticalPolicy = critical === "each" ? "each" : "most-critical-per-type";
  const rare = choiceOption("rare", v.rare, ["noise+types", "noise", "types", "none"] as const);
  if (rare) {
    o.plan!.includeNoise = rare === "noise+types" || rare === "noise";
    o.plan!.includeSingletonTypes = rare === "noise+types" || rare === "types";
  }
  o.map = choiceOption("map", v.map, ["umap", "pca"] as const);
  const weight = choiceOption("weight", v.weight, ["km", "hours"] as const);
  if (weight) o.weightBy = weight;
  const eps = numberOption("eps", v.eps, { min: Number.MIN_VALUE });
  const minPts = numberOption("min-pts", v["min-pts"], { integer: true, min: 2 });
  if (v["no-dbscan"]) {
    if (eps !== undefined || minPts !== undefined) throw new UsageError("--no-dbscan cannot go with --eps or --min-pts");
    o.dbscan = false;
  } else o.dbscan = { eps, minPts };
  return o;
}

/** Read recordings, run the pipeline, write the outputs, print the summary. Shared by plan and demo. */
export async function planFromFiles(files: string[], readOptions: ReadRecordingOptions, v: PipelineCliValues, defaultOut: string): Promise<number> {
  const options = pipelineOptions(v);
  const out = resolve(v.out ?? defaultOut);
  const display = progressDisplay(process.stderr, Boolean(v.quiet));
  const progress: Progress = display.progress;
  const recordings: Recording[] = [];
  try {
    for (const f of files) recordings.push(await readRecording(f, { ...readOptions, progress }));
    for (const r of recordings) for (const rj of r.rejected) process.stderr.write(`\nrejected: ${r.source}: track ${rj.trackId}${rj.row !== undefined ? ` (row ${rj.row})` : ""}: ${rj.reason}\n`);
    const result = runPipeline(recordings, options, progress);
    const written = await writeOutputs(result, out, {
      catalogue: !v["no-catalogue"],
      parquet: Boolean(v.parquet),
      openScenario: v.openscenario ? recordings : undefined,
      progress,
    });
    display.done();
    process.stdout.write(`${result.plan.summary}\n\n`);
    const t = Object.entries(result.timings)
      .map(([k, s]) => `${k} ${s.toFixed(2)} s`)
      .join(", ");
    process.stdout.write(`timings: ${t}\n`);
    for (const w of written.files) process.stdout.write(`wrote ${w}\n`);
    for (const w of written.warnings) process.stderr.write(`warning: ${w}\n`);
    return 0;
  } finally {
    display.done();
  }
}

const HELP = `roadsieve plan TRACKS... [options]

Read recordings (CSV or Parquet tracks, one row per object per frame, with a road description),
detect every vehicle's maneuvers, cut every drive into scenarios, cluster them, pick a real
recorded medoid per cluster, keep rare and critical scenarios on their own, and write:
  DIR/plan.json        the test plan (schema: docs/plan.md)
  DIR/plan.csv         one row per test case
  DIR/model.json       the fitted clustering, for roadsieve assign (new recordings into this plan)
  DIR/report.html      a self-contained report with charts (opens offline)
  DIR/catalogue.duckdb every scenario, feature, maneuver and test case, for SQL

Options:
${RECORDING_HELP}
${PIPELINE_HELP}

Example:
  roadsieve plan recordings/day1/tracks.parquet recordings/day2/tracks.csv --budget 40 --out plan-q3
`;

export const planCommand: Command = {
  name: "plan",
  summary: "recordings in, test plan, report and catalogue out",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...RECORDING_OPTIONS, ...PIPELINE_CLI_OPTIONS },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length === 0) throw new UsageError("give at least one tracks file (CSV or Parquet); roadsieve plan --help");
    const readOptions = await recordingOptions(values);
    return planFromFiles(positionals, readOptions, values, "out");
  },
};
