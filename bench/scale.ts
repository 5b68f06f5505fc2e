/**
 * Scale benchmarks (not timed tests; the machine is shared, so read figures with that in mind):
 *
 *   npm run bench -- scale throughput [--recordings 4] [--vkm 100] [--dir DIR]
 *       extraction rows/s on 1 and on 2 worker threads in the same run (each thread warmed up
 *       first), and the speed-up from 1 to 2
 *   npm run bench -- scale end-to-end [--sizes 1000,3000,10000] [--dir DIR]
 *       for each size: `node dist/cli/main.js generate --vehicle-km N --seed 7 --out DIR/vkm-N`
 *       (once; kept for later runs), then `/usr/bin/time -v node dist/cli/main.js plan
 *       DIR/vkm-N/tracks.parquet --out DIR/out-N --quiet`: wall time, peak RSS, the plan's own
 *       stage timings; and the exponent b of time ∝ km^b between the smallest and largest size
 *
 *   npm run bench -- scale choose-k [--vkm 10000] [--dir DIR]
 *       the k sweep (k = 2..12, 4 restarts, as the pipeline runs it) on the real embedding of the
 *       generated corpus of that size (extracted once into DIR/shards-N and read back), with the
 *       previous settings (every fit on all rows, silhouette on 5,000) and the sampled defaults,
 *       back to back in one process: seconds, chosen k, silhouettes and their standard errors
 *
 *   npm run bench -- scale streaming-memory [--recordings 10] [--vkm 1000] [--dir DIR]
 *       peak RSS and wall time of planning many recordings: all read into memory first, then the
 *       chain on one thread (bench/_allInMemory.ts, as plan worked before), against `plan` with
 *       streaming extraction on 2 worker threads; both from the sources through tsx, one after the
 *       other; checks that both wrote the same plan.json
 *
 * Heavy steps run one after the other, never at the same time. Last line: one JSON object.
 */
import { spawnSync } from "node:child_process";
import { existsSync, mkdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { Rng } from "../src/core/rng.js";
import { sweepK } from "../src/cluster/sweepK.js";
import { embedScenarios } from "../src/embed/features.js";
import { scenarioWeights } from "../src/exposure/sampleWeights.js";
import { ExtractPool } from "../src/extract/extractPool.js";
import { extractionOptions } from "../src/extract/extractionOptions.js";
import { mergeScenarioSets } from "../src/pipeline/mergeScenarioSets.js";
import { manifestName } from "../src/shard/shardNames.js";
import { readShard } from "../src/shard/readShard.js";
import { resolvePipelineOptions } from "../src/pipeline/options.js";
import { generateTraffic, writeGeneratedTraffic } from "../src/synth/index.js";

function arg(args: string[], name: string): string | undefined {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
}

async function throughput(args: string[]): Promise<void> {
  const count = Number(arg(args, "--recordings") ?? 4);
  const vkm = Number(arg(args, "--vkm") ?? 100);
  const dir = resolve(arg(args, "--dir") ?? join(tmpdir(), "roadsieve-bench-scale"));
  const paths: string[] = [];
  let rows = 0;
  for (let i = 0; i < count; i++) {
    const id = `bench-${vkm}-${i + 1}`;
    const p = join(dir, id, "tracks.parquet");
    if (!existsSync(p)) {
      const t = generateTraffic({ vehicleKm: vkm, recordingId: id }, new Rng(100 + i));
      await writeGeneratedTraffic(join(dir, id), t, { format: "parquet" });
    }
    paths.push(p);
  }
  const o = resolvePipelineOptions({});
  const warm = join(dir, "warm", "tracks.parquet");
  if (!existsSync(warm)) await writeGeneratedTraffic(join(dir, "warm"), generateTraffic({ vehicleKm: 5, recordingId: "warm" }, new Rng(99)), { format: "parquet" });
  const result: Record<string, number> = {};
  for (const threads of [1, 2]) {
    const pool = new ExtractPool(threads);
    try {
      // One warm-up job per thread: thread start-up and JIT are paid before the clock starts.
      await Promise.all(Array.from({ length: threads }, () => pool.extract(warm, {}, o)));
      const t0 = performance.now();
      const res = await Promise.all(paths.map((p) => pool.extract(p, {}, o)));
      const seconds = (performance.now() - t0) / 1000;
      rows = res.reduce((a, r) => a + r.summary.rows, 0);
      result[`seconds${threads}`] = seconds;
      result[`rowsPerSecond${threads}`] = rows / seconds;
      console.log(`${threads} worker thread(s): ${count} recordings, ${rows.toLocaleString("en")} rows in ${seconds.toFixed(1)} s = ${Math.round(rows / seconds).toLocaleString("en")} rows/s (${Math.round(rows / seconds / threads).toLocaleString("en")} per worker)`);
    } finally {
      await pool.close();
    }
  }
  const speedUp = result.seconds1! / result.seconds2!;
  console.log(`speed-up 1 → 2 workers: ${speedUp.toFixed(2)}× (shared machine: other sessions were running)`);
  console.log(JSON.stringify({ bench: "scale-throughput", recordings: count, vkm, rows, ...result, speedUp }));
}

function timeV(cmd: string[]): { code: number | null; wall: number; rssMiB: number; stdout: string; stderr: string } {
  const r = spawnSync("/usr/bin/time", ["-v", ...cmd], { encoding: "utf8", maxBuffer: 1 << 28 });
  const wallText = /Elapsed \(wall clock\) time \(h:mm:ss or m:ss\): (.+)/.exec(r.stderr)?.[1] ?? "";
  const parts = wallText.trim().split(":").map(Number);
  const wall = parts.reduce((a, p) => a * 60 + p, 0);
  const rss = Number(/Maximum resident set size \(kbytes\): (\d+)/.exec(r.stderr)?.[1] ?? NaN) / 1024;
  return { code: r.status, wall, rssMiB: rss, stdout: r.stdout, stderr: r.stderr };
}

async function endToEnd(args: string[]): Promise<void> {
  const sizes = (arg(args, "--sizes") ?? "1000,3000,10000").split(",").map(Number);
  const dir = resolve(arg(args, "--dir") ?? join(tmpdir(), "roadsieve-bench-scale"));
  mkdirSync(dir, { recursive: true });
  const cli = resolve("dist/cli/main.js");
  const rows: Record<string, unknown>[] = [];
  for (const n of sizes) {
    const data = join(dir, `vkm-${n}`);
    if (!existsSync(join(data, "tracks.parquet"))) {
      console.log(`generating ${n} vehicle-km …`);
      const g = spawnSync("node", [cli, "generate", "--vehicle-km", String(n), "--seed", "7", "--out", data, "--quiet"], { encoding: "utf8" });
      if (g.status !== 0) throw new Error(`generate failed: ${g.stderr}`);
    }
    const r = timeV(["node", cli, "plan", join(data, "tracks.parquet"), "--out", join(dir, `out-${n}`), "--quiet"]);
    if (r.code !== 0) throw new Error(`plan failed for ${n} km: ${r.stderr.slice(-2000)}`);
    const timings = /^timings: (.*)$/m.exec(r.stdout)?.[1] ?? "";
    const row = { vehicleKm: n, wallSeconds: r.wall, peakRssMiB: Math.round(r.rssMiB), secondsPerKm: r.wall / n, timings };
    rows.push(row);
    console.log(`${n} vehicle-km: ${r.wall.toFixed(1)} s, peak RSS ${Math.round(r.rssMiB)} MiB (shared machine); ${timings}`);
  }
  let exponent: number | null = null;
  if (rows.length >= 2) {
    const a = rows[0]!;
    const b = rows[rows.length - 1]!;
    exponent = Math.log((b.wallSeconds as number) / (a.wallSeconds as number)) / Math.log((b.vehicleKm as number) / (a.vehicleKm as number));
    console.log(`time ∝ km^${exponent.toFixed(2)} from ${a.vehicleKm} to ${b.vehicleKm} vehicle-km`);
  }
  console.log(JSON.stringify({ bench: "scale-end-to-end", rows, exponent }));
}

async function chooseK(args: string[]): Promise<void> {
  const vkm = Number(arg(args, "--vkm") ?? 10000);
  const dir = resolve(arg(args, "--dir") ?? join(tmpdir(), "roadsieve-bench-scale"));
  const data = join(dir, `vkm-${vkm}`, "tracks.parquet");
  const cli = resolve("dist/cli/main.js");
  if (!existsSync(data)) {
    const g = spawnSync("node", [cli, "generate", "--vehicle-km", String(vkm), "--seed", "7", "--out", join(dir, `vkm-${vkm}`), "--quiet"], { encoding: "utf8" });
    if (g.status !== 0) throw new Error(`generate failed: ${g.stderr}`);
  }
  const shards = join(dir, `shards-${vkm}`);
  const o = resolvePipelineOptions({});
  // The recording id of a generated corpus is its folder name.
  const manifest = join(shards, manifestName(`vkm-${vkm}`));
  if (!existsSync(manifest)) {
    const e = spawnSync("node", [cli, "extract", data, "--out", shards, "--quiet"], { encoding: "utf8" });
    if (e.status !== 0) throw new Error(`extract failed: ${e.stderr}`);
  }
  const ex = await readShard(manifest, { options: extractionOptions({}, o) });
  const set = mergeScenarioSets([ex.set]);
  const X = embedScenarios(set, o.embedding).matrix;
  const weights = scenarioWeights(set.scenarios, o.weightBy);
  const n = X.rows;
  const kMax = Math.min(o.kRange[1], n - 1);
  const out: Record<string, unknown> = { bench: "scale-choose-k", vkm, scenarios: n, dims: X.cols };
  for (const [name, extra] of [
    ["previous (all rows, silhouette on 5000)", { fitSampleSize: n, silhouetteSampleSize: 5000 }],
    ["sampled (defaults)", {}],
  ] as const) {
    const t0 = performance.now();
    const r = sweepK(X, { kMin: o.kRange[0], kMax, rng: new Rng(o.seed).fork("sweep"), weights, nInit: o.nInit, ...extra });
    const seconds = (performance.now() - t0) / 1000;
    const at = r.rows.find((x) => x.k === r.suggestedK)!;
    console.log(`${name}: ${seconds.toFixed(1)} s, k = ${r.suggestedK}, silhouette ${at.silhouette.toFixed(4)} ± ${at.silhouetteSe.toFixed(4)} (fit rows ${r.fitSample}, silhouette rows ${r.silhouetteSample} of ${n}) (shared machine)`);
    console.log(`   silhouette by k: ${r.rows.map((x) => `${x.k}:${x.silhouette.toFixed(3)}`).join(" ")}`);
    out[name.startsWith("previous") ? "previous" : "sampled"] = { seconds, k: r.suggestedK, silhouette: at.silhouette, se: at.silhouetteSe, fitSample: r.fitSample, silhouetteSample: r.silhouetteSample, byK: r.rows.map((x) => [x.k, x.silhouette, x.silhouetteSe]) };
  }
  console.log(JSON.stringify(out));
}

async function streamingMemory(args: string[]): Promise<void> {
  const count = Number(arg(args, "--recordings") ?? 10);
  const vkm = Number(arg(args, "--vkm") ?? 1000);
  const dir = resolve(arg(args, "--dir") ?? join(tmpdir(), "roadsieve-bench-scale"));
  const paths: string[] = [];
  for (let i = 0; i < count; i++) {
    const id = `stream-${vkm}-${i + 1}`;
    const p = join(dir, id, "tracks.parquet");
    if (!existsSync(p)) {
      console.log(`generating ${id} …`);
      const t = generateTraffic({ vehicleKm: vkm, recordingId: id }, new Rng(200 + i));
      await writeGeneratedTraffic(join(dir, id), t, { format: "parquet" });
    }
    paths.push(p);
  }
  const tsx = ["node", "--import", "tsx"];
  const before = timeV([...tsx, "bench/_allInMemory.ts", join(dir, "mem-all"), ...paths]);
  if (before.code !== 0) throw new Error(`all-in-memory run failed: ${before.stderr.slice(-2000)}`);
  console.log(`all in memory, one thread: ${before.wall.toFixed(1)} s, peak RSS ${Math.round(before.rssMiB)} MiB (shared machine)`);
  const after = timeV([...tsx, "src/cli/main.ts", "plan", ...paths, "--workers", "2", "--out", join(dir, "mem-stream"), "--no-catalogue", "--quiet"]);
  if (after.code !== 0) throw new Error(`streaming plan failed: ${after.stderr.slice(-2000)}`);
  console.log(`streaming, 2 worker threads: ${after.wall.toFixed(1)} s, peak RSS ${Math.round(after.rssMiB)} MiB (shared machine)`);
  const same = spawnSync("cmp", [join(dir, "mem-all", "plan.json"), join(dir, "mem-stream", "plan.json")]).status === 0;
  console.log(`same plan.json: ${same}`);
  console.log(JSON.stringify({ bench: "scale-streaming-memory", recordings: count, vkm, before: { wall: before.wall, rssMiB: Math.round(before.rssMiB) }, after: { wall: after.wall, rssMiB: Math.round(after.rssMiB) }, samePlan: same }));
}

export async function run(args: string[]): Promise<void> {
  const [mode, ...rest] = args;
  if (mode === "streaming-memory") return streamingMemory(rest);
  if (mode === "choose-k") return chooseK(rest);
  if (mode === "throughput") return throughput(rest);
  if (mode === "end-to-end") return endToEnd(rest);
  console.error("usage: npm run bench -- scale <throughput|end-to-end|choose-k|streaming-memory> [options]");
  process.exitCode = 2;
}
