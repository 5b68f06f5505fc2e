import { parseArgs } from "node:util";
import { readRecording } from "../../recording/readRecording.js";
import type { Recording } from "../../recording/types.js";
import { FIDELITY_TARGETS } from "../../resim/fidelityTable.js";
import { resimPlanFolder } from "../../resim/resimPlan.js";
import type { Command } from "../command.js";
import { progressDisplay } from "../progressDisplay.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError } from "../usageError.js";

const HELP = `roadsieve resim PLAN_DIR TRACKS... [options]

Re-simulate a plan folder written with --openscenario: every PLAN_DIR/openscenario/<test case>.xosc
is played by roadsieve's own player at the recording's frame rate, with the ego replayed and again
driven by the reference driver (IDM car-following, MOBIL lane changes). Each replayed run is written
in roadsieve's tracks format, read back and measured by the same chain as its source recording
(TRACKS: the recordings the plan was made from), and compared with it:
  PLAN_DIR/resim/fidelity.csv, fidelity.json   MAPE of speed, gap, THW, lateral position, min THW,
                                               the reference driver's min TTC / THW / collision
  PLAN_DIR/resim/<test case>.csv               the replayed run (tracks format)
  PLAN_DIR/resim/<test case>.closed-loop.csv   the closed-loop run
Targets: speed MAPE <= ${FIDELITY_TARGETS.speedMape} % (common practice), gap MAPE <= ${FIDELITY_TARGETS.gapMape} %, min THW within ${FIDELITY_TARGETS.minThwDiff} s.

Options:
${RECORDING_HELP}
  --no-closed-loop     replay only
  --quiet              no progress display
`;

export const resimCommand: Command = {
  name: "resim",
  summary: "re-simulate a plan's OpenSCENARIO files and measure their fidelity",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: { ...RECORDING_OPTIONS, "no-closed-loop": { type: "boolean", default: false }, quiet: { type: "boolean", default: false } },
      strict: true,
      allowPositionals: true,
    });
    const [planDir, ...files] = positionals;
    if (!planDir || files.length === 0) throw new UsageError("give the plan folder and the tracks file(s) it was made from; roadsieve resim --help");
    const base = await recordingOptions(values);
    const display = progressDisplay(process.stderr, values.quiet);
    try {
      const recordings: Recording[] = [];
      for (const f of files) recordings.push(await readRecording(f, { ...base, progress: display.progress }));
      const t0 = performance.now();
      const res = await resimPlanFolder(planDir, recordings, { closedLoop: !values["no-closed-loop"], progress: display.progress });
      display.done();
      const rows = res.rows;
      const ok = rows.filter((r) => r.withinTargets === true).length;
      const worst = (k: "speedMape" | "gapMape" | "minThwDiff"): string => {
        const v = rows.map((r) => r.replay?.[k]).filter((x): x is number => typeof x === "number");
        return v.length ? Math.max(...v).toFixed(3) : "n/a";
      };
      const collisions = rows.filter((r) => r.closedLoop?.collision).length;
      process.stdout.write(
        `${rows.length} test cases re-simulated in ${((performance.now() - t0) / 1000).toFixed(1)} s; ${ok} within the fidelity targets; ` +
          `worst speed MAPE ${worst("speedMape")} %, gap MAPE ${worst("gapMape")} %, min THW difference ${worst("minThwDiff")} s` +
          (values["no-closed-loop"] ? "\n" : `; reference driver: ${collisions} collision(s)\n`),
      );
      if (res.variations.length > 0)
        process.stdout.write(`${res.variations.length} sampled variations re-simulated from their templates; ${res.variations.filter((v) => v.row.allWithin).length} re-measured within tolerance of the requested values\n`);
      for (const f of res.files.filter((p) => /fidelity\.(csv|json|html)$/.test(p))) process.stdout.write(`wrote ${f}\n`);
      for (const w of res.warnings) process.stderr.write(`warning: ${w}\n`);
      return 0;
    } finally {
      display.done();
    }
  },
};
