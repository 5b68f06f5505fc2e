import { resolve } from "node:path";
import { parseArgs } from "node:util";
import { defaultWorkers } from "../../extract/extractFiles.js";
import { extractionOptions, portableReadOptions } from "../../extract/extractionOptions.js";
import { ExtractPool } from "../../extract/extractPool.js";
import { resolvePipelineOptions } from "../../pipeline/options.js";
import type { Command } from "../command.js";
import { progressDisplay } from "../progressDisplay.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError, numberOption } from "../usageError.js";
import { PIPELINE_CLI_OPTIONS, pipelineOptions } from "./plan.js";

/** The pipeline options that shape extraction, on the command line (the rest belong to plan). */
export const EXTRACT_CLI_OPTIONS = { window: PIPELINE_CLI_OPTIONS.window, "event-windows": PIPELINE_CLI_OPTIONS["event-windows"] } as const;
export const EXTRACT_HELP = `  --window S           fixed scenario windows of S seconds            (default: 10)
  --event-windows A..B windows cut at lane changes and events, A to B seconds long`;

const HELP = `roadsieve extract TRACKS... --out DIR [options]

Turn each recording into a scenario shard: read it, detect maneuvers, find neighbours, cut the
scenario windows, and write into DIR
  <id>.<hash>.scenarios.parquet  one row per scenario (queryable columns, the whole scenario, its tensor)
  <id>.<hash>.maneuvers.parquet  one row per track (its maneuver segments)
  <id>.shard.json                the manifest: tool version, options, input checksum, files
The manifest is written last and only once: a shard that is already there with the same input,
options and version is left as it is. Stateless: run one extract per recording under any batch
scheduler, then \`roadsieve plan DIR\`. Give plan the same --window / --event-windows (and reading
options) as extract; a shard extracted otherwise is refused, naming both.

Options:
  --out DIR            shard folder (required)
${RECORDING_HELP}
${EXTRACT_HELP}
  --workers N          extraction threads when several TRACKS are given (default: cores, at most 2)
  --quiet              no progress display

Example:
  roadsieve extract recordings/day1/tracks.parquet --out shards
`;

export const extractCommand: Command = {
  name: "extract",
  summary: "one recording in, one scenario shard out (for plan, batch schedulers and the queue)",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...RECORDING_OPTIONS, ...EXTRACT_CLI_OPTIONS, out: { type: "string" }, workers: { type: "string" }, quiet: { type: "boolean", default: false } },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length === 0) throw new UsageError("give at least one tracks file; roadsieve extract --help");
    if (!values.out) throw new UsageError("--out DIR is required");
    const read = await recordingOptions(values);
    const o = resolvePipelineOptions(pipelineOptions(values));
    const manifestOptions = extractionOptions(read, o);
    const workers = numberOption("workers", values.workers, { integer: true, min: 1 }) ?? defaultWorkers(positionals.length);
    const display = progressDisplay(process.stderr, values.quiet);
    const pool = new ExtractPool(workers);
    const dir = resolve(values.out);
    try {
      const replies = await Promise.all(positionals.map((p) => pool.extractToShard(p, portableReadOptions(read), o, dir, manifestOptions, workers === 1 ? display.progress : undefined)));
      display.done();
      for (const r of replies) {
        for (const rj of r.rejected) process.stderr.write(`rejected: ${r.summary.source}: track ${rj.trackId}${rj.row !== undefined ? ` (row ${rj.row})` : ""}: ${rj.reason}\n`);
        process.stdout.write(`${r.shard.status === "written" ? "wrote" : "already there"} ${r.shard.manifest} (${r.summary.id}: ${r.summary.scenarios} scenarios, ${r.summary.rows} rows)\n`);
      }
      return 0;
    } finally {
      display.done();
      await pool.close();
    }
  },
};
