import { existsSync } from "node:fs";
import { parseArgs } from "node:util";
import type { Command } from "../command.js";
import { sampleTracksPath } from "../samplePath.js";
import { PIPELINE_CLI_OPTIONS, PIPELINE_HELP, planFromFiles } from "./plan.js";

const HELP = `roadsieve demo [options]

Run the whole job on the bundled sample recording of the fictional Orrowind Motorway
(sample-data/orrowind, made by our traffic generator) and write plan.json, plan.csv,
model.json, report.html and catalogue.duckdb into out/.

Options:
${PIPELINE_HELP}
`;

export const demoCommand: Command = {
  name: "demo",
  summary: "the whole job on the bundled sample data, into out/",
  help: HELP,
  async run(argv) {
    const { values } = parseArgs({ args: argv, options: PIPELINE_CLI_OPTIONS, strict: true, allowPositionals: false });
    const tracks = sampleTracksPath();
    if (!existsSync(tracks)) throw new Error(`the bundled sample recording is missing at ${tracks}; regenerate it with: roadsieve generate --sample --out sample-data/orrowind`);
    return planFromFiles([tracks], {}, values, "out");
  },
};
