/**
 * Helper of `bench scale streaming-memory`: the way plan worked before streaming extraction — read
 * every recording into memory, then run the whole chain on one thread — for a peak-RSS comparison.
 *   node --import tsx bench/_allInMemory.ts OUT TRACKS...
 */
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { writeOutputs } from "../src/pipeline/writeOutputs.js";
import { readRecording } from "../src/recording/readRecording.js";
import type { Recording } from "../src/recording/types.js";

const [out, ...files] = process.argv.slice(2);
const recs: Recording[] = [];
for (const f of files) recs.push(await readRecording(f));
const r = runPipeline(recs, {});
await writeOutputs(r, out!, { catalogue: false });
console.log(`timings: ${Object.entries(r.timings).map(([k, s]) => `${k} ${s.toFixed(2)} s`).join(", ")}`);
