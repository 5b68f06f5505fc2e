import { mkdtemp, readFile, readdir, rm } from "node:fs/promises";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { sha256Text } from "../src/core/io.js";
import { Rng } from "../src/core/rng.js";
import { generateTraffic, type GeneratedTraffic } from "../src/synth/generateTraffic.js";
import { SAMPLE_DATA_OPTIONS, writeSampleData } from "../src/synth/sampleData.js";
import { readGroundTruth } from "../src/synth/truthFile.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const OPTS = { vehicleKm: 20, positionNoiseSd: 0.1, hardBrakingRate: 0.1, tightCutInRate: 0.1 };
let root: string;
let a: GeneratedTraffic;

beforeAll(async () => {
  root = await mkdtemp(join(tmpdir(), "synth-files-"));
  a = generateTraffic(OPTS, new Rng(5));
});
afterAll(async () => {
  await rm(root, { recursive: true, force: true });
});

async function digests(dir: string): Promise<Record<string, string>> {
  const out: Record<string, string> = {};
  for (const f of (await readdir(dir)).sort()) out[f] = sha256Text(await readFile(join(dir, f)));
  return out;
}

// Sources: reproducibility rule "same input + seed ⇒ byte-identical output" and the input table
// layout (one row per object per frame) from the project design brief (DESIGN.md §2); SHA-256 via
// node:crypto; Parquet contents checked with DuckDB as an independent reader.
describe("writeGeneratedTraffic determinism", () => {
  for (const format of ["csv", "parquet"] as const) {
    it(`same seed ⇒ byte-identical ${format} files; different seed ⇒ different tracks`, async () => {
      const b = generateTraffic(OPTS, new Rng(5));
      const c = generateTraffic(OPTS, new Rng(6));
      const [da, db, dc] = ["a", "b", "c"].map((s) => join(root, `${format}-${s}`));
      await writeGeneratedTraffic(da!, a, { format });
      await writeGeneratedTraffic(db!, b, { format });
      await writeGeneratedTraffic(dc!, c, { format });
      const [ha, hb, hc] = await Promise.all([digests(da!), digests(db!), digests(dc!)]);
      const tracks = `tracks.${format}`;
      expect(Object.keys(ha)).toEqual([tracks, "meta.json", "road.json", "truth.json"].sort());
      expect(hb).toEqual(ha);
      expect(hc[tracks]).not.toBe(ha[tracks]);
      expect(hc["truth.json"]).not.toBe(ha["truth.json"]);
      expect(hc["road.json"]).toBe(ha["road.json"]);
    });
  }

  it("the CSV is our long input table, rounded to 1e-3, and matches the in-memory recording", async () => {
    const dir = join(root, "csv-a");
    const text = await readFile(join(dir, "tracks.csv"), "utf8");
    const lines = text.trimEnd().split("\n");
    expect(lines[0]).toBe("track_id,t,x,y,vx,vy,ax,ay,lane,length,width,kind");
    expect(lines.length - 1).toBe(a.stats.rows);
    const tr = a.recording.tracks[3]!;
    let row = 1;
    for (let i = 0; i < 3; i++) row += a.recording.tracks[i]!.t.length;
    const cells = lines[row + 10]!.split(",");
    expect(Number(cells[0])).toBe(tr.id);
    expect(Number(cells[1])).toBe(tr.t[10]);
    expect(Number(cells[2])).toBe(tr.x[10]);
    expect(Number(cells[3])).toBe(tr.y[10]);
    expect(Number(cells[4])).toBe(tr.vx[10]);
    expect(Number(cells[8])).toBe(tr.lane[10]);
    expect(cells[11]).toBe(tr.kind);
    for (const line of lines.slice(1, 2000)) {
      for (const cell of line.split(",").slice(1, 8)) expect(cell).toMatch(/^-?\d+(\.\d{1,3})?$/);
    }
    const road = JSON.parse(await readFile(join(dir, "road.json"), "utf8"));
    expect(road.laneMarkings).toEqual([0, 3.75, 7.5, 11.25]);
    expect(road.frameRate).toBe(25);
    const meta = JSON.parse(await readFile(join(dir, "meta.json"), "utf8"));
    expect(meta.seed).toBe(5);
    expect(meta.options.positionNoiseSd).toBe(0.1);
    expect(meta.files.tracks.rows).toBe(a.stats.rows);
    expect(meta.files.tracks.sha256).toBe(sha256Text(await readFile(join(dir, "tracks.csv"))));
  });

  it("the fast CSV formatter prints exactly what String(value) gives for every cell (slow reference)", async () => {
    let ref = "track_id,t,x,y,vx,vy,ax,ay,lane,length,width,kind\n";
    for (const tr of a.recording.tracks)
      for (let k = 0; k < tr.t.length; k++)
        ref += `${tr.id},${tr.t[k]},${tr.x[k]},${tr.y[k]},${tr.vx[k]},${tr.vy[k]},${tr.ax[k]},${tr.ay[k]},${tr.lane[k]},${tr.length},${tr.width},${tr.kind}\n`;
    expect(await readFile(join(root, "csv-a", "tracks.csv"), "utf8")).toBe(ref);
  });

  it("writeVelocities=false leaves out vx, vy, ax, ay", async () => {
    const dir = join(root, "novel");
    await writeGeneratedTraffic(dir, a, { format: "csv", writeVelocities: false });
    const head = (await readFile(join(dir, "tracks.csv"), "utf8")).slice(0, 200).split("\n")[0];
    expect(head).toBe("track_id,t,x,y,lane,length,width,kind");
  });

  it("readGroundTruth loads truth.json back to the same labels and events", async () => {
    const truth = await readGroundTruth(join(root, "parquet-a", "truth.json"));
    expect(truth.tracks.length).toBe(a.truth.tracks.length);
    truth.tracks.forEach((t, i) => expect(t.lateral).toEqual(a.truth.tracks[i]!.lateral));
    expect(truth.planted).toEqual(a.truth.planted);
    expect(truth.planted.length).toBeGreaterThan(0);
    await expect(readGroundTruth(join(root, "missing.json"))).rejects.toThrow(InputError);
  });

  it("Parquet holds the same rows as the CSV (read back through DuckDB)", async () => {
    const { DuckDBInstance } = await import("@duckdb/node-api");
    const inst = await DuckDBInstance.create(":memory:");
    const conn = await inst.connect();
    try {
      const pq = join(root, "parquet-a", "tracks.parquet").replace(/'/g, "''");
      const r = await conn.runAndReadAll(`SELECT count(*)::INTEGER AS n, sum(x)::DOUBLE AS sx, count(DISTINCT track_id)::INTEGER AS k FROM '${pq}'`);
      const [n, sx, k] = r.getRows()[0]! as [number, number, number];
      expect(n).toBe(a.stats.rows);
      expect(k).toBe(a.recording.tracks.length);
      let ref = 0;
      for (const tr of a.recording.tracks) for (const x of tr.x) ref += x;
      expect(sx).toBeCloseTo(ref, 3);
    } finally {
      conn.closeSync();
      inst.closeSync();
    }
  });

  it("rejects an unknown format", async () => {
    await expect(writeGeneratedTraffic(join(root, "bad"), a, { format: "xlsx" as never })).rejects.toThrow(/format="xlsx" should be "csv" or "parquet"/);
  });

  it("writeSampleData reproduces the committed sample-data/orrowind byte for byte (within the 10 MB budget)", async () => {
    const dir = join(root, "sample");
    const { traffic } = await writeSampleData(dir);
    const committed = join(import.meta.dirname, "..", "sample-data", "orrowind");
    const [fresh, stored] = await Promise.all([digests(dir), digests(committed)]);
    expect(fresh).toEqual(stored);
    let bytes = 0;
    for (const f of await readdir(committed)) bytes += (await readFile(join(committed, f))).length;
    expect(bytes).toBeLessThan(10 * 2 ** 20);
    // The sample's recipe: 3 lanes, 25 Hz, 0.1 m noise, planted events, 300–400 vehicle-km.
    expect(SAMPLE_DATA_OPTIONS.traffic.positionNoiseSd).toBe(0.1);
    expect(traffic.recording.road.laneMarkings.length).toBe(4);
    expect(traffic.stats.vehicleKm).toBeGreaterThanOrEqual(300);
    expect(traffic.stats.vehicleKm).toBeLessThan(400);
    expect(traffic.truth.planted.length).toBeGreaterThan(10);
  });
});
