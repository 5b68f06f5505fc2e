/**
 * Traffic generator benchmark and sample regeneration.
 *
 *   npx tsx bench/main.ts synth [--vkm 300] [--seed 1] [--out DIR] [--format csv|parquet]
 *   npx tsx bench/main.ts synth --large [--out DIR]          (10,000 vehicle-km)
 *   npx tsx bench/main.ts synth --sample [DIR]               (regenerate sample-data/orrowind)
 *
 * Prints a readable log and, as the last line, one JSON object with the figures.
 */
import { stat } from "node:fs/promises";
import { Rng } from "../src/core/rng.js";
import { generateTraffic, SAMPLE_DATA_OPTIONS, writeGeneratedTraffic, writeSampleData } from "../src/synth/index.js";

function arg(args: string[], name: string): string | undefined {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
}

async function sizes(files: string[]): Promise<Record<string, number>> {
  const out: Record<string, number> = {};
  for (const f of files) out[f] = (await stat(f)).size;
  return out;
}

export async function run(args: string[]): Promise<void> {
  const mem = () => Math.round(process.memoryUsage().rss / 2 ** 20);
  if (args.includes("--sample")) {
    const dir = args[args.indexOf("--sample") + 1] ?? "sample-data/orrowind";
    const t0 = performance.now();
    const { files, traffic } = await writeSampleData(dir.startsWith("--") ? "sample-data/orrowind" : dir);
    const seconds = (performance.now() - t0) / 1000;
    const sz = await sizes(files);
    const total = Object.values(sz).reduce((a, b) => a + b, 0);
    console.log(`sample (seed ${SAMPLE_DATA_OPTIONS.seed}) written in ${seconds.toFixed(1)} s:`);
    for (const [f, s] of Object.entries(sz)) console.log(`  ${f}  ${(s / 1024).toFixed(0)} KiB`);
    console.log(`  total ${(total / 2 ** 20).toFixed(2)} MiB; ${traffic.stats.rows} rows, ${traffic.stats.vehicleKm.toFixed(1)} vehicle-km`);
    console.log(JSON.stringify({ bench: "synth-sample", seconds, bytes: total, ...traffic.stats, warnings: traffic.warnings }));
    return;
  }
  const vkm = args.includes("--large") ? 10000 : Number(arg(args, "--vkm") ?? 300);
  const seed = Number(arg(args, "--seed") ?? 1);
  const out = arg(args, "--out");
  const format = (arg(args, "--format") ?? "parquet") as "csv" | "parquet";
  const t0 = performance.now();
  let lastLog = 0;
  const traffic = generateTraffic({ vehicleKm: vkm }, new Rng(seed), (e) => {
    const now = performance.now();
    if (now - lastLog > 5000) {
      lastLog = now;
      console.log(`  ${e.done.toFixed(0)} / ${e.total} vehicle-km, ${((now - t0) / 1000).toFixed(0)} s, rss ${mem()} MiB`);
    }
  });
  const genS = (performance.now() - t0) / 1000;
  const s = traffic.stats;
  console.log(
    `generated ${s.vehicleKm.toFixed(1)} vehicle-km (${s.vehicleHours.toFixed(1)} vehicle-h, ${s.rows} rows, ${s.vehicles} tracks, ` +
      `${s.laneChanges} lane changes, ${s.cutIns} cut-ins, ${s.planted} planted) in ${genS.toFixed(2)} s; ` +
      `${(s.rows / genS / 1e6).toFixed(2)} M rows/s; rss ${mem()} MiB`,
  );
  let writeS = 0;
  let bytes = 0;
  if (out) {
    const t1 = performance.now();
    const files = await writeGeneratedTraffic(out, traffic, { format });
    writeS = (performance.now() - t1) / 1000;
    bytes = Object.values(await sizes(files)).reduce((a, b) => a + b, 0);
    console.log(`wrote ${format} to ${out} in ${writeS.toFixed(2)} s, ${(bytes / 2 ** 20).toFixed(1)} MiB`);
  }
  console.log(
    JSON.stringify({
      bench: "synth",
      vehicleKm: s.vehicleKm,
      rows: s.rows,
      tracks: s.vehicles,
      generateSeconds: genS,
      writeSeconds: writeS,
      format: out ? format : null,
      bytes,
      rssMiB: mem(),
      warnings: traffic.warnings,
    }),
  );
}
