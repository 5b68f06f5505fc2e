import { open, rename, rm } from "node:fs/promises";
import { mkdir } from "node:fs/promises";
import { join } from "node:path";
import { InputError } from "../core/errors.js";
import { sha256File, sha256Text, writeFileAtomic } from "../core/io.js";
import { VERSION } from "../core/version.js";
import type { GeneratedTraffic } from "./generateTraffic.js";
import { truthToJson } from "./truthFile.js";
import { recordedOptions } from "./options.js";

export type TrafficFileFormat = "csv" | "parquet";

export interface WriteTrafficOptions {
  format: TrafficFileFormat;
  /** Write vx, vy, ax, ay; defaults to the generator option writeVelocities. */
  writeVelocities?: boolean;
}

const KIND_CODES = ["car", "truck", "motorcycle", "other"] as const;

/** The column names of the tracks table, in file order. */
export function trackColumns(writeVelocities: boolean): string[] {
  return writeVelocities
    ? ["track_id", "t", "x", "y", "vx", "vy", "ax", "ay", "lane", "length", "width", "kind"]
    : ["track_id", "t", "x", "y", "lane", "length", "width", "kind"];
}

function tmpName(dir: string, name: string): string {
  return join(dir, `.${name}.${process.pid}.${Date.now().toString(36)}.tmp`);
}

/**
 * ASCII output buffer with a fast decimal formatter for values on the 1e-3 grid. It prints the same
 * text as String(v) for such values (shortest form, no trailing zeros), without building strings.
 */
class CsvBytes {
  private buf = Buffer.allocUnsafe(1 << 22);
  pos = 0;
  private readonly digits = new Uint8Array(24);

  get full(): boolean {
    return this.pos > this.buf.length - 512;
  }
  take(): Buffer {
    const out = Buffer.from(this.buf.subarray(0, this.pos));
    this.pos = 0;
    return out;
  }
  ascii(s: string): void {
    this.pos += this.buf.write(s, this.pos, "latin1");
  }
  byte(c: number): void {
    this.buf[this.pos++] = c;
  }
  /** Non-negative integer. */
  uint(n: number): void {
    if (n === 0) {
      this.buf[this.pos++] = 48;
      return;
    }
    let k = 0;
    while (n > 0) {
      const q = Math.floor(n / 10);
      this.digits[k++] = 48 + (n - q * 10);
      n = q;
    }
    while (k > 0) this.buf[this.pos++] = this.digits[--k]!;
  }
  /** A value rounded to 1e-3. */
  milli(v: number): void {
    let m = Math.round(v * 1000);
    if (m === 0) {
      this.buf[this.pos++] = 48;
      return;
    }
    if (m < 0) {
      this.buf[this.pos++] = 45;
      m = -m;
    }
    const whole = Math.floor(m / 1000);
    let frac = m - whole * 1000;
    this.uint(whole);
    if (frac === 0) return;
    this.buf[this.pos++] = 46;
    let width = 3;
    while (frac % 10 === 0) {
      frac /= 10;
      width--;
    }
    const s = frac.toString();
    for (let i = s.length; i < width; i++) this.buf[this.pos++] = 48;
    this.ascii(s);
  }
}

/** Stream the tracks table as CSV to `path` (one row per track per frame, sorted by track then time). */
async function writeTracksCsv(path: string, traffic: GeneratedTraffic, velocities: boolean): Promise<number> {
  const fh = await open(path, "w");
  let rows = 0;
  try {
    const out = new CsvBytes();
    out.ascii(trackColumns(velocities).join(",") + "\n");
    for (const tr of traffic.recording.tracks) {
      const tail = `,${tr.length},${tr.width},${tr.kind}\n`;
      const n = tr.t.length;
      for (let k = 0; k < n; k++) {
        out.uint(tr.id);
        out.byte(44);
        out.milli(tr.t[k]!);
        out.byte(44);
        out.milli(tr.x[k]!);
        out.byte(44);
        out.milli(tr.y[k]!);
        out.byte(44);
        if (velocities) {
          out.milli(tr.vx[k]!);
          out.byte(44);
          out.milli(tr.vy[k]!);
          out.byte(44);
          out.milli(tr.ax[k]!);
          out.byte(44);
          out.milli(tr.ay[k]!);
          out.byte(44);
        }
        const lane = tr.lane[k]!;
        if (lane < 0) out.byte(45);
        out.uint(Math.abs(lane));
        out.ascii(tail);
        if (out.full) await fh.write(out.take());
      }
      rows += n;
    }
    await fh.write(out.take());
  } finally {
    await fh.close();
  }
  return rows;
}

function sqlString(s: string): string {
  return `'${s.replace(/'/g, "''")}'`;
}

/** Convert the CSV to Parquet through DuckDB (one thread so that the bytes are reproducible). */
async function csvToParquet(csvPath: string, parquetPath: string, velocities: boolean): Promise<void> {
  const { DuckDBInstance } = await import("@duckdb/node-api");
  const instance = await DuckDBInstance.create(":memory:", { threads: "1" });
  const conn = await instance.connect();
  try {
    const types: Record<string, string> = {
      track_id: "INTEGER",
      t: "DOUBLE",
      x: "DOUBLE",
      y: "DOUBLE",
      vx: "DOUBLE",
      vy: "DOUBLE",
      ax: "DOUBLE",
      ay: "DOUBLE",
      lane: "SMALLINT",
      length: "DOUBLE",
      width: "DOUBLE",
      kind: "VARCHAR",
    };
    const cols = trackColumns(velocities)
      .map((c) => `'${c}': '${types[c]}'`)
      .join(", ");
    await conn.run(
      `COPY (SELECT * FROM read_csv(${sqlString(csvPath)}, header = true, auto_detect = false, columns = {${cols}})) ` +
        `TO ${sqlString(parquetPath)} (FORMAT parquet, COMPRESSION zstd, ROW_GROUP_SIZE 1000000)`,
    );
  } finally {
    conn.closeSync();
    instance.closeSync();
  }
}

/**
 * Write a generated recording in our input format: `tracks.csv` or `tracks.parquet` (long table),
 * `road.json`, `truth.json` (labels run-length encoded) and `meta.json` (generator version, seed,
 * options, figures and file checksums). Every file is written under a temporary name and renamed.
 * Returns the written paths.
 */
export async function writeGeneratedTraffic(dir: string, traffic: GeneratedTraffic, opts: WriteTrafficOptions): Promise<string[]> {
  const format = opts?.format;
  if (format !== "csv" && format !== "parquet")
    throw new InputError(`format=${JSON.stringify(format)} should be "csv" or "parquet"`);
  const velocities = opts.writeVelocities ?? traffic.options.writeVelocities;
  if (typeof velocities !== "boolean") throw new InputError(`writeVelocities=${String(velocities)} should be true or false`);
  for (const tr of traffic.recording.tracks) {
    if (!(KIND_CODES as readonly string[]).includes(tr.kind)) throw new InputError(`track ${tr.id}: kind "${tr.kind}" is not writable`);
  }
  await mkdir(dir, { recursive: true });

  const tracksName = format === "csv" ? "tracks.csv" : "tracks.parquet";
  const tracksPath = join(dir, tracksName);
  const csvTmp = tmpName(dir, "tracks.csv");
  let rows: number;
  try {
    rows = await writeTracksCsv(csvTmp, traffic, velocities);
    if (format === "csv") {
      await rename(csvTmp, tracksPath);
    } else {
      const pqTmp = tmpName(dir, "tracks.parquet");
      try {
        await csvToParquet(csvTmp, pqTmp, velocities);
        await rename(pqTmp, tracksPath);
      } finally {
        await rm(pqTmp, { force: true });
      }
    }
  } finally {
    await rm(csvTmp, { force: true });
  }

  const roadText = JSON.stringify(traffic.recording.road, null, 2) + "\n";
  const truthText = truthToJson(traffic.truth);
  const roadPath = join(dir, "road.json");
  const truthPath = join(dir, "truth.json");
  await writeFileAtomic(roadPath, roadText);
  await writeFileAtomic(truthPath, truthText);

  const s = traffic.stats;
  const meta = {
    generator: "roadsieve synth",
    version: VERSION,
    seed: traffic.seed,
    recordingId: traffic.recording.id,
    files: {
      tracks: { name: tracksName, format, rows, columns: trackColumns(velocities), sha256: await sha256File(tracksPath) },
      road: { name: "road.json", sha256: sha256Text(roadText) },
      truth: { name: "truth.json", sha256: sha256Text(truthText) },
    },
    stats: {
      vehicleKm: Math.round(s.vehicleKm * 1000) / 1000,
      vehicleHours: Math.round(s.vehicleHours * 1e6) / 1e6,
      vehicles: s.vehicles,
      laneChanges: s.laneChanges,
      cutIns: s.cutIns,
      planted: s.planted,
      rows: s.rows,
      duration: s.duration,
    },
    options: recordedOptions(traffic.options),
    warnings: traffic.warnings,
  };
  const metaPath = join(dir, "meta.json");
  await writeFileAtomic(metaPath, JSON.stringify(meta, null, 2) + "\n");
  return [tracksPath, roadPath, truthPath, metaPath];
}
