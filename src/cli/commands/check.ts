import { parseArgs } from "node:util";
import { readRecording } from "../../recording/readRecording.js";
import type { Command } from "../command.js";
import { progressDisplay } from "../progressDisplay.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError } from "../usageError.js";

const HELP = `roadsieve check TRACKS... [options]

Read and validate recordings without running the pipeline: prints tracks, rows, vehicle-km and
hours per recording, and every rejected track or warning. Exit code 2 names the first bad value
(file, row, column, value).

Options:
${RECORDING_HELP}
  --quiet              no progress display
`;

export const checkCommand: Command = {
  name: "check",
  summary: "validate recordings and summarise them",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...RECORDING_OPTIONS, quiet: { type: "boolean", default: false } },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length === 0) throw new UsageError("give at least one tracks file (CSV or Parquet)");
    const base = await recordingOptions(values, positionals.length);
    for (const file of positionals) {
      const display = progressDisplay(process.stderr, values.quiet);
      const rec = await readRecording(file, { ...base, progress: display.progress });
      display.done();
      let km = 0;
      let seconds = 0;
      let rows = 0;
      for (const t of rec.tracks) {
        const n = t.t.length;
        rows += n;
        if (n > 1) {
          seconds += t.t[n - 1]! - t.t[0]!;
          km += Math.abs(t.x[n - 1]! - t.x[0]!) / 1000;
        }
      }
      console.log(
        `${file}: recording "${rec.id}" on ${rec.road.name}, ${rec.road.laneMarkings.length - 1} lanes, ${rec.road.frameRate} Hz; ` +
          `${rec.tracks.length} tracks, ${rows.toLocaleString("en")} rows, ${km.toFixed(1)} vehicle-km (along the road), ${(seconds / 3600).toFixed(2)} vehicle-hours; ` +
          `${rec.rejected.length} rejected`,
      );
      const cond = Object.entries(rec.road.conditions ?? {});
      if (cond.length > 0) console.log(`  conditions: ${cond.map(([k, v]) => `${k} ${v}`).join(", ")}`);
      for (const r of rec.rejected) console.log(`  rejected track ${r.trackId} (${r.rows} rows)${r.row !== undefined ? ` at row ${r.row}` : ""}: ${r.reason}`);
      for (const w of rec.warnings) console.log(`  warning: ${w}`);
      console.log(`  sha256 ${rec.checksum}`);
    }
    return 0;
  },
};
