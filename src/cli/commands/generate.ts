import { parseArgs } from "node:util";
import { Rng } from "../../core/rng.js";
import { generateTraffic } from "../../synth/generateTraffic.js";
import { SAMPLE_DATA_OPTIONS } from "../../synth/sampleData.js";
import { writeGeneratedTraffic } from "../../synth/writeGeneratedTraffic.js";
import type { Command } from "../command.js";
import { progressDisplay } from "../progressDisplay.js";
import { UsageError, choiceOption, numberOption } from "../usageError.js";

const HELP = `roadsieve generate --out DIR [options]

Generate a recording of the fictional Orrowind Motorway with our traffic generator (IDM
car-following, MOBIL lane changes, planted hard braking and tight cut-ins) and write it in
roadsieve's input format with the ground truth beside it:
  DIR/tracks.parquet (or tracks.csv), DIR/road.json, DIR/truth.json, DIR/meta.json

Options:
  --out DIR            output folder (required)
  --vehicle-km N       size of the run in vehicle-kilometres      (default: 350, like the sample)
  --seed N             seed                                       (default: the sample's seed)
  --lanes N            lanes of the carriageway                   (default: 3)
  --noise M            position noise sd in metres                (default: 0.1)
  --flow N             inflow per lane, vehicles per hour          (default: 800)
  --format F           parquet | csv                              (default: parquet)
  --id NAME            recording id                               (default: orrowind-01)
  --sample             write exactly the bundled sample (ignores the other options)
  --quiet              no progress display

Examples:
  roadsieve generate --sample --out sample-data/orrowind
  roadsieve generate --vehicle-km 20000 --seed 7 --out big/orrowind-big
`;

export const generateCommand: Command = {
  name: "generate",
  summary: "generate a synthetic recording with ground truth",
  help: HELP,
  async run(argv) {
    const { values } = parseArgs({
      args: argv,
      options: {
        out: { type: "string" },
        "vehicle-km": { type: "string" },
        seed: { type: "string" },
        lanes: { type: "string" },
        noise: { type: "string" },
        flow: { type: "string" },
        format: { type: "string" },
        id: { type: "string" },
        sample: { type: "boolean", default: false },
        quiet: { type: "boolean", default: false },
      },
      strict: true,
      allowPositionals: false,
    });
    if (!values.out) throw new UsageError("--out DIR is required");
    const s = SAMPLE_DATA_OPTIONS;
    const traffic = { ...s.traffic };
    let seed = s.seed;
    let format = s.format;
    if (!values.sample) {
      const vkm = numberOption("vehicle-km", values["vehicle-km"], { min: 0.1 });
      if (vkm !== undefined) traffic.vehicleKm = vkm;
      seed = numberOption("seed", values.seed, { integer: true, min: 0 }) ?? seed;
      const lanes = numberOption("lanes", values.lanes, { integer: true, min: 1, max: 8 });
      if (lanes !== undefined) traffic.lanes = lanes;
      const noise = numberOption("noise", values.noise, { min: 0 });
      if (noise !== undefined) traffic.positionNoiseSd = noise;
      const flow = numberOption("flow", values.flow, { min: 1 });
      if (flow !== undefined) traffic.flowPerLane = flow;
      format = choiceOption("format", values.format, ["parquet", "csv"] as const) ?? format;
      if (values.id) traffic.recordingId = values.id;
    }
    const display = progressDisplay(process.stderr, values.quiet);
    const generated = generateTraffic(traffic, new Rng(seed), display.progress);
    const files = await writeGeneratedTraffic(values.out, generated, { format });
    display.done();
    const st = generated.stats;
    console.log(
      `generated ${st.vehicles} vehicles, ${st.vehicleKm.toFixed(1)} vehicle-km, ${(st.vehicleHours).toFixed(2)} vehicle-hours, ` +
        `${st.rows.toLocaleString("en")} rows, ${st.laneChanges} lane changes, ${st.cutIns} cut-ins, ${st.planted} planted critical events (seed ${seed})`,
    );
    for (const f of files) console.log(`wrote ${f}`);
    for (const w of generated.warnings) console.error(`warning: ${w}`);
    return 0;
  },
};
