/**
 * Time to write the sample plan's OpenSCENARIO / OpenDRIVE exports and to re-simulate them, in one
 * process, beside the time of the pipeline itself (ratios in one run are what count on a shared machine).
 *
 *   npx tsx bench/main.ts exports [--no-closed-loop]
 */
import { mkdtempSync, rmSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { scenarioExportFiles, writeExportFiles } from "../src/exports/index.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { writeOutputs } from "../src/pipeline/writeOutputs.js";
import { readRecording } from "../src/recording/index.js";
import { resimPlanFolder } from "../src/resim/index.js";

export async function run(args: string[]): Promise<void> {
  const sample = fileURLToPath(new URL("../sample-data/orrowind/tracks.parquet", import.meta.url));
  const dir = mkdtempSync(join(tmpdir(), "roadsieve-bench-exports-"));
  const closedLoop = !args.includes("--no-closed-loop");
  const s = (t0: number): number => (performance.now() - t0) / 1000;
  try {
    let t = performance.now();
    const rec = await readRecording(sample);
    const read = s(t);
    t = performance.now();
    const result = runPipeline([rec], { map: "pca" });
    const pipeline = s(t);
    await writeOutputs(result, dir, { catalogue: false });
    t = performance.now();
    const files = scenarioExportFiles(result.plan, result.scenarios.scenarios, [rec]);
    const build = s(t);
    t = performance.now();
    await writeExportFiles(files.files, join(dir, "openscenario"));
    const write = s(t);
    const bytes = files.files.reduce((a, f) => a + Buffer.byteLength(f.text), 0);
    t = performance.now();
    const res = await resimPlanFolder(dir, [rec], { closedLoop });
    const resim = s(t);
    const within = res.rows.filter((r) => r.withinTargets === true).length;
    console.log(`sample: ${result.plan.testCases.length} test cases; read ${read.toFixed(1)} s, pipeline ${pipeline.toFixed(1)} s`);
    console.log(`export: build ${build.toFixed(1)} s + write ${write.toFixed(1)} s (${(bytes / 1e6).toFixed(0)} MB, ${files.files.length} files)`);
    console.log(`resim (${closedLoop ? "replay + closed loop" : "replay"}): ${resim.toFixed(1)} s, ${within}/${res.rows.length} within the fidelity targets; load average ${loadavg()[0]!.toFixed(1)}`);
    console.log(JSON.stringify({ testCases: result.plan.testCases.length, readS: read, pipelineS: pipeline, exportBuildS: build, exportWriteS: write, exportMB: bytes / 1e6, resimS: resim, withinTargets: within, loadAverage: loadavg()[0] }));
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
