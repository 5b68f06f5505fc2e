import { join, resolve } from "node:path";
import { openOutputFolder } from "../../core/outputFolder.js";
import { parseArgs } from "node:util";
import type { Progress } from "../../core/progress.js";
import { collectExtractions } from "../../extract/collectExtractions.js";
import { resolvePipelineOptions, type PipelineOptions } from "../../pipeline/options.js";
import { planCatalogue } from "../../pipeline/planCatalogue.js";
import { writeOutputs } from "../../pipeline/writeOutputs.js";
import { readRecording, type ReadRecordingOptions } from "../../recording/readRecording.js";
import type { Recording } from "../../recording/types.js";
import { planInputs } from "../../shard/planInputs.js";
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
  --openscenario       also write one ASAM OpenSCENARIO 1.2 file per recorded test case, a parameterized
                       template per logical scenario and an ASAM OpenDRIVE 1.6 road per recording to
                       DIR/openscenario/ (docs/openscenario.md)
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
  if (win !== undefined) o.scenario = { window: { mode: "fixed", lengthS: win } };
  if (ev !== undefined) {
    const m = /^(\d+(?:\.\d+)?)\.\.(\d+(?:\.\d+)?)$/.exec(ev.trim());
    if (!m || !(Number(m[1]) > 0) || Number(m[2]) < Number(m[1])) throw new UsageError(`--event-windows=${JSON.stringify(ev)} should look like 4..20 (seconds, min..max)`);
    o.scenario = { window: { mode: "events", minS: Number(m[1]), maxS: Number(m[2]) } };
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

/** How plan inputs are taken in (plan only; demo uses the defaults). */
export interface PlanInputOptions {
  /** Extraction threads; default one per core, at most 2. */
  workers?: number;
  /** Plan a shard folder even when some expected recordings have no shard. */
  allowIncomplete?: boolean;
}

/**
 * Take in recordings and/or shards, plan, write the outputs, print the summary. Shared by plan and
 * demo. Tracks files are extracted on worker threads, one recording per thread at a time, and only
 * their scenario rows are kept; shards are read back as they were extracted. Results are merged in
 * input order, so the plan does not depend on the number of workers, and planning from shards
 * gives the same bytes as planning from their recordings in the same order.
 */
export async function planFromFiles(args: string[], readOptions: ReadRecordingOptions, v: PipelineCliValues, defaultOut: string, inputOptions: PlanInputOptions = {}): Promise<number> {
  const options = resolvePipelineOptions(pipelineOptions(v));
  // --out is checked (and locked) before any work: a bad folder fails in a second, not after the run.
  const folder = await openOutputFolder(resolve(v.out ?? defaultOut));
  const display = progressDisplay(process.stderr, Boolean(v.quiet));
  const progress: Progress = display.progress;
  try {
    for (const w of folder.warnings) process.stderr.write(`warning: ${w}\n`);
    const { inputs, warnings: inputWarnings } = await planInputs(args, { allowIncomplete: inputOptions.allowIncomplete });
    const t0 = performance.now();
    const extracted = await collectExtractions(inputs, readOptions, options, {
      workers: inputOptions.workers,
      progress,
      onRejected: (source, rejected) => {
        for (const rj of rejected) process.stderr.write(`\nrejected: ${source}: track ${rj.trackId}${rj.row !== undefined ? ` (row ${rj.row})` : ""}: ${rj.reason}\n`);
      },
    });
    const extractWall = (performance.now() - t0) / 1000;
    const result = planCatalogue(
      extracted.map((x) => x.set),
      extracted.map((x) => x.summary),
      extracted.map((x) => x.maneuvers),
      options,
      progress,
    );
    // Stage seconds as before (summed over recordings, whichever thread ran them), then planning.
    const timings: Record<string, number> = {};
    for (const x of extracted) for (const [k, s] of Object.entries(x.timings)) timings[k] = (timings[k] ?? 0) + s;
    timings["extraction (wall)"] = extractWall;
    for (const [k, s] of Object.entries(result.timings)) timings[k] = (timings[k] ?? 0) + s;
    result.timings = timings;
    // OpenSCENARIO needs the tracks: read again, after planning, only the recordings test cases use.
    let recordings: Recording[] | undefined;
    if (v.openscenario) {
      const used = new Set([...result.plan.testCases.flatMap((tc) => (tc.source ? [tc.source.recording] : [])), ...result.plan.logicalScenarios.map((ls) => ls.representative.recording)]);
      recordings = [];
      for (const s of result.recordings) if (used.has(s.id)) recordings.push(await readRecording(s.source, { ...readOptions, id: s.id, progress }));
    }
    const written = await writeOutputs(result, folder.dir, {
      catalogue: !v["no-catalogue"],
      parquet: Boolean(v.parquet),
      openScenario: recordings,
      progress,
    });
    const manifest = await folder.commit(result.recordings.map((r) => ({ path: r.source, sha256: r.checksum })));
    display.done();
    process.stdout.write(`${result.plan.summary}\n\n`);
    const t = Object.entries(result.timings)
      .map(([k, s]) => `${k} ${s.toFixed(2)} s`)
      .join(", ");
    process.stdout.write(`timings: ${t}\n`);
    for (const f of manifest.files) process.stdout.write(`wrote ${join(folder.out, f.path)}\n`);
    process.stdout.write(`wrote ${join(folder.out, "manifest.json")}\n`);
    for (const w of inputWarnings) process.stderr.write(`warning: ${w}\n`);
    for (const w of written.warnings) process.stderr.write(`warning: ${w}\n`);
    return 0;
  } catch (e) {
    await folder.abort();
    throw e;
  } finally {
    display.done();
  }
}

const HELP = `roadsieve plan INPUT... [options]

Each INPUT is a tracks file (CSV or Parquet, one row per object per frame, with a road
description), a shard written by \`roadsieve extract\` (NAME.shard.json), or a folder of shards
(planned in the order of its expected.json, else by name; with an expected.json, every listed
recording must have its shard unless --allow-incomplete). Read recordings,
detect every vehicle's maneuvers, cut every drive into scenarios, cluster them, pick a real
recorded medoid per cluster, keep rare and critical scenarios on their own, and write:
  DIR/plan.json        the test plan (schema: docs/plan.md)
  DIR/plan.csv         one row per test case
  DIR/model.json       the fitted clustering, for roadsieve assign (new recordings into this plan)
  DIR/report.html      a self-contained report with charts (opens offline)
  DIR/catalogue.duckdb every scenario, feature, maneuver and test case, for SQL
  DIR/manifest.json    every file with its size and SHA-256, the tool version and the inputs
DIR is replaced as a whole at the end (written beside it first); a second run into the same DIR
while one is going is refused.

Options:
${RECORDING_HELP}
${PIPELINE_HELP}
  --workers N          extraction threads, one recording per thread at a time (default: cores, at most 2)
  --allow-incomplete   plan a shard folder even when expected recordings have no shard (says which)

Planning from shards gives the same plan.json, byte for byte, as planning from their recordings
in the same order with the same options. A shard from another tool version or extracted with
other options is refused, naming both.

Examples:
  roadsieve plan recordings/day1/tracks.parquet recordings/day2/tracks.csv --budget 40 --out plan-q3
  roadsieve plan shards/ --budget 40 --out plan-q3
`;

export const planCommand: Command = {
  name: "plan",
  summary: "recordings in, test plan, report and catalogue out",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...RECORDING_OPTIONS, ...PIPELINE_CLI_OPTIONS, workers: { type: "string" }, "allow-incomplete": { type: "boolean", default: false } },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length === 0) throw new UsageError("give at least one tracks file (CSV or Parquet), shard or shard folder; roadsieve plan --help");
    const readOptions = await recordingOptions(values, positionals.length);
    const workers = numberOption("workers", values.workers, { integer: true, min: 1 });
    return planFromFiles(positionals, readOptions, values, "out", { workers, allowIncomplete: values["allow-incomplete"] });
  },
};
