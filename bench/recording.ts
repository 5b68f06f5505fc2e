/**
 * Reading speed of readRecording on a large synthetic tracks file (CSV and Parquet), with the file's
 * own speeds and with speeds/accelerations derived by Savitzky–Golay smoothing.
 *
 *   npx tsx bench/main.ts recording [--tracks 2000] [--frames 600]
 *
 * The file is made by DuckDB from a seeded random() in a temporary directory and deleted afterwards.
 */
import { mkdtempSync, rmSync, statSync } from "node:fs";
import { loadavg, tmpdir } from "node:os";
import { join } from "node:path";
import { DuckDBInstance } from "@duckdb/node-api";
import { readRecording } from "../src/recording/index.js";
import type { Road } from "../src/recording/index.js";
import { scanTable } from "../src/recording/scanTable.js";

function arg(args: string[], name: string, dflt: number): number {
  const i = args.indexOf(`--${name}`);
  return i >= 0 ? Number(args[i + 1]) : dflt;
}

export async function run(args: string[]): Promise<void> {
  const nTracks = arg(args, "tracks", 2000);
  const nFrames = arg(args, "frames", 600);
  const dir = mkdtempSync(join(tmpdir(), "roadsieve-bench-recording-"));
  const road: Road = { name: "Orrowind Motorway, bench section", laneMarkings: [0, 3.5, 7, 10.5], frameRate: 25 };
  const figures: Record<string, number> = {};
  try {
    const inst = await DuckDBInstance.create(":memory:");
    const c = await inst.connect();
    await c.run("SELECT setseed(0.42)");
    // Rows ordered by frame, then track, as a recorder writes them; 0.1 m position noise.
    await c.run(`CREATE TABLE g AS SELECT tr AS track_id, f / 25.0 AS t,
        30.0 * f / 25.0 + tr * 7.0 + 0.1 * (random() - 0.5) AS x, 1.75 + 3.5 * (tr % 3) + 0.1 * (random() - 0.5) AS y,
        30.0 AS vx, 0.0 AS vy, 0.0 AS ax, 0.0 AS ay, 'car' AS kind, 4.5 AS length, 1.8 AS width
        FROM range(${nFrames}) r(f), range(${nTracks}) q(tr) ORDER BY f, tr`);
    for (const [name, cols] of [
      ["full", "*"],
      ["positions", "track_id, t, x, y, kind, length, width"],
    ] as const) {
      await c.run(`COPY (SELECT ${cols} FROM g) TO '${join(dir, `${name}.csv`)}' (HEADER)`);
      await c.run(`COPY (SELECT ${cols} FROM g) TO '${join(dir, `${name}.parquet`)}' (FORMAT parquet)`);
    }
    c.closeSync();
    inst.closeSync();
    const rows = nTracks * nFrames;
    console.log(`${rows} rows (${nTracks} tracks × ${nFrames} frames); load average ${loadavg().map((l) => l.toFixed(1)).join(" ")}`);
    for (const name of ["full", "positions"])
      for (const format of ["parquet", "csv"]) {
        const file = join(dir, `${name}.${format}`);
        await readRecording(file, { road }); // warm-up (DuckDB load, JIT)
        const times: number[] = [];
        const cpus: number[] = [];
        for (let rep = 0; rep < 3; rep++) {
          const t0 = performance.now();
          const c0 = process.cpuUsage();
          const rec = await readRecording(file, { road });
          times.push(performance.now() - t0);
          const c1 = process.cpuUsage(c0);
          cpus.push((c1.user + c1.system) / 1000);
          if (rec.tracks.length !== nTracks) throw new Error(`read ${rec.tracks.length} tracks, expected ${nTracks}`);
        }
        const best = Math.min(...times);
        const cpu = cpus[times.indexOf(best)]!;
        // The DuckDB part alone: scan into typed columns, no validation or track building.
        let scanBest = Infinity;
        for (let rep = 0; rep < 3; rep++) {
          const t0 = performance.now();
          await scanTable(file, format as "csv" | "parquet", undefined);
          scanBest = Math.min(scanBest, performance.now() - t0);
        }
        const rate = rows / (best / 1000);
        const mb = statSync(file).size / 1e6;
        const label = `${format}-${name === "full" ? "with-speeds" : "derived-speeds"}`;
        figures[`${label}_ms`] = Math.round(best);
        figures[`${label}_rows_per_s`] = Math.round(rate);
        figures[`${label}_cpu_ms`] = Math.round(cpu);
        figures[`${label}_scan_ms`] = Math.round(scanBest);
        console.log(
          `${label.padEnd(24)} ${mb.toFixed(1).padStart(6)} MB  best of 3: ${best.toFixed(0).padStart(5)} ms wall (${cpu.toFixed(0)} ms CPU, all threads; DuckDB scan alone ${scanBest.toFixed(0)} ms)  ${(rate / 1e6).toFixed(2)} M rows/s`,
        );
      }
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
  console.log(JSON.stringify({ bench: "recording", tracks: nTracks, frames: nFrames, loadavg: loadavg()[0], ...figures }));
}
