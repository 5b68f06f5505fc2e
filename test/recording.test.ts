import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync, mkdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { DuckDBInstance } from "@duckdb/node-api";
import { afterAll, describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import {
  readRecording,
  readRoad,
  writeRoad,
  writeTracks,
  type Recording,
  type Road,
  type Track,
} from "../src/recording/index.js";

const FIX = join(import.meta.dirname, "fixtures", "recording");
const tmp = mkdtempSync(join(tmpdir(), "roadsieve-recording-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const ROAD: Road = { name: "Orrowind Motorway, km 12", laneMarkings: [0, 3.5, 7, 10.5], frameRate: 25, speedLimit: 36.11 };

function dir(name: string): string {
  const d = join(tmp, name);
  mkdirSync(d, { recursive: true });
  return d;
}

/** Run SQL in a throwaway DuckDB (used to make Parquet fixtures). */
async function duck(sql: string): Promise<void> {
  const inst = await DuckDBInstance.create(":memory:");
  const c = await inst.connect();
  try {
    await c.run(sql);
  } finally {
    c.closeSync();
    inst.closeSync();
  }
}

/** Capture the InputError a promise rejects with. */
async function inputError(p: Promise<unknown>): Promise<InputError> {
  try {
    await p;
  } catch (e) {
    expect(e).toBeInstanceOf(InputError);
    return e as InputError;
  }
  throw new Error("expected an InputError, got none");
}

function syntheticRecording(): Recording {
  const mk = (id: number, kind: Track["kind"], n: number, x0: number, v: number, a: number, y0: number, lane: number): Track => {
    const t = Float64Array.from({ length: n }, (_, i) => 3 + i / 25);
    const s = t.map((ti) => ti - 3);
    return {
      id,
      recording: "rt",
      kind,
      length: kind === "truck" ? 16.5 : 4.21,
      width: kind === "truck" ? 2.55 : 1.83,
      t,
      x: s.map((si) => x0 + v * si + 0.5 * a * si * si),
      y: s.map((si) => y0 + 0.013 * si),
      vx: s.map((si) => v + a * si),
      vy: new Float64Array(n).fill(0.013),
      ax: new Float64Array(n).fill(a),
      ay: new Float64Array(n),
      lane: new Int32Array(n).fill(lane),
    };
  };
  return {
    id: "rt",
    source: "generated",
    checksum: "",
    road: { ...ROAD, direction: "+x" },
    tracks: [mk(3, "car", 40, 12.3, 31.7, -0.4, 1.75, 0), mk(7, "truck", 55, 0.1, 23.1, 0.2, 5.2, 1), mk(11, "motorcycle", 30, 50, 38.2, 1.1, 8.6, 2)],
    rejected: [],
    warnings: [],
  };
}

describe("writeTracks / readRecording round trip", () => {
  for (const format of ["csv", "parquet"] as const) {
    it(`reads back exactly what writeTracks wrote (${format})`, async () => {
      const rec = syntheticRecording();
      const d = dir(`rt-${format}`);
      const path = join(d, `tracks.${format}`);
      await writeTracks(rec, path, format);
      await writeRoad(rec.road, join(d, "road.json"));
      const back = await readRecording(path);
      expect(back.id).toBe(`rt-${format}`); // stem "tracks" → directory name
      expect(back.road).toEqual(rec.road);
      expect(back.rejected).toEqual([]);
      expect(back.warnings).toEqual([]);
      expect(back.tracks.length).toBe(3);
      back.tracks.forEach((tr, k) => {
        const want = rec.tracks[k]!;
        expect(tr.id).toBe(want.id);
        expect(tr.kind).toBe(want.kind);
        expect(tr.length).toBe(want.length);
        expect(tr.width).toBe(want.width);
        for (const c of ["t", "x", "y", "vx", "vy", "ax", "ay", "lane"] as const) expect(Array.from(tr[c])).toEqual(Array.from(want[c]));
        expect(tr.recording).toBe(`rt-${format}`);
      });
      // Provenance: SHA-256 of the file bytes, checked against coreutils' sha256sum.
      const ref = execFileSync("sha256sum", [path]).toString().split(" ")[0];
      expect(back.checksum).toBe(ref);
    });
  }

  it("reports progress for reading and for building tracks", async () => {
    const d = dir("progress");
    await writeTracks(syntheticRecording(), join(d, "p.parquet"), "parquet");
    const events: string[] = [];
    await readRecording(join(d, "p.parquet"), { road: ROAD, progress: (e) => events.push(`${e.stage} ${e.done}/${e.total}`) });
    expect(events[0]).toBe("read 0/1");
    expect(events).toContain("read 1/1");
    expect(events.at(-1)).toBe("tracks 3/3");
  });

  it("uses the given id, and the file stem when it is not 'tracks'", async () => {
    const d = dir("ids");
    await writeTracks(syntheticRecording(), join(d, "drive_0042.csv"), "csv");
    await writeRoad(ROAD, join(d, "road.json"));
    expect((await readRecording(join(d, "drive_0042.csv"))).id).toBe("drive_0042");
    expect((await readRecording(join(d, "drive_0042.csv"), { id: "A7" })).id).toBe("A7");
  });
});

describe("readRecording column and unit mapping", () => {
  it("maps other column names and converts cm, ms, km/h and ft/s² to SI (exact definitions)", async () => {
    const d = dir("mapping");
    // SI / exact definitions: 1 cm = 0.01 m; 1 ms = 0.001 s; 1 km/h = 1/3.6 m/s; 1 ft = 0.3048 m.
    const lines = ["veh;time_ms;px_cm;py_cm;spd_x;spd_y;acc_x;acc_y;class"];
    for (let i = 0; i < 10; i++) lines.push(`5;${1000 + 40 * i};${7200 + 120 * i};175;108;-3.6;3.28084;0;Lorry`);
    writeFileSync(join(d, "drive.csv"), lines.join("\n") + "\n");
    const rec = await readRecording(join(d, "drive.csv"), {
      road: ROAD,
      mapping: { track_id: "veh", t: "time_ms", x: "px_cm", y: "py_cm", vx: "spd_x", vy: "spd_y", ax: "acc_x", ay: "acc_y", kind: "class" },
      units: { time: "ms", position: "cm", speed: "km/h", acceleration: "ft/s2" },
    });
    const tr = rec.tracks[0]!;
    expect(tr.kind).toBe("truck"); // "lorry" is a documented synonym
    expect(tr.t[0]).toBeCloseTo(1.0, 12);
    expect(tr.t[9]).toBeCloseTo(1.36, 12);
    expect(tr.x[0]).toBeCloseTo(72, 12);
    expect(tr.x[1]).toBeCloseTo(73.2, 12);
    expect(tr.y[0]).toBeCloseTo(1.75, 12);
    expect(tr.vx[0]).toBeCloseTo(30, 12); // 108 km/h = 30 m/s
    expect(tr.vy[0]).toBeCloseTo(-1, 12);
    expect(tr.ax[0]).toBeCloseTo(3.28084 * 0.3048, 12);
    expect(tr.lane[0]).toBe(0);
    // no size columns: defaults per kind, with a warning
    expect(tr.length).toBe(12);
    expect(rec.warnings.some((w) => w.includes("default sizes per kind used for 1 of 1 tracks"))).toBe(true);
  });

  it("converts mph (1 mile = 1609.344 m exactly) and feet", async () => {
    const d = dir("mph");
    writeFileSync(join(d, "a.csv"), "track_id,t,x,y,vx,vy\n1,0,100,5,60,0\n1,0.04,101,5,60,0\n");
    const rec = await readRecording(join(d, "a.csv"), { road: ROAD, units: { position: "ft", speed: "mph" } });
    expect(rec.tracks[0]!.x[0]).toBeCloseTo(30.48, 12);
    expect(rec.tracks[0]!.y[0]).toBeCloseTo(1.524, 12);
    expect(rec.tracks[0]!.vx[0]).toBeCloseTo(26.8224, 12);
  });

  it("turns frame numbers into seconds with the road's frame rate or units.frameRate", async () => {
    const d = dir("frames");
    writeFileSync(join(d, "f.csv"), "track_id,frame,x,y\n1,50,0,1\n1,51,1,1\n1,52,2,1\n");
    const a = await readRecording(join(d, "f.csv"), { road: ROAD });
    expect(Array.from(a.tracks[0]!.t)).toEqual([2, 2.04, 2.08]);
    expect(a.tracks[0]!.vx[1]).toBeCloseTo(25, 9);
    const b = await readRecording(join(d, "f.csv"), { road: ROAD, units: { frameRate: 10 } });
    expect(Array.from(b.tracks[0]!.t)).toEqual([5, 5.1, 5.2]);
  });

  it("names the file, the missing column and the columns that are there", async () => {
    const f = join(FIX, "bad-missing-y.csv");
    const e = await inputError(readRecording(f));
    expect(e.message).toBe(
      `${f}, column "y": missing required column "y"; the file has columns: "track_id", "t", "x", "kind", "length", "width". Give a mapping such as { mapping: { x: "<their column>" } }`,
    );
    expect(e.file).toBe(f);
    expect(e.column).toBe("y");
  });

  it("rejects a mapping to a column the file does not have, and unknown mapping keys", async () => {
    const f = join(FIX, "good.csv");
    const e = await inputError(readRecording(f, { mapping: { x: "pos_x" } }));
    expect(e.message).toBe(
      `${f}, column "pos_x": mapping.x names column "pos_x", which the file does not have; the file has columns: "track_id", "t", "x", "y", "kind", "length", "width"`,
    );
    const e2 = await inputError(readRecording(f, { mapping: { speed: "v" } as never }));
    expect(e2.message).toContain(`mapping key "speed" is not one of our columns`);
  });

  it("rejects unknown units quoting the value and the choices", async () => {
    const e = await inputError(readRecording(join(FIX, "good.csv"), { units: { speed: "knots" as never } }));
    expect(e.message).toBe(`units.speed="knots" should be one of "m/s", "km/h", "mph", "ft/s"`);
  });
});

describe("readRecording direction", () => {
  it('rotates a "-x" recording into the road frame (x\' = -x, y\' = -y, markings mirrored)', async () => {
    const d = dir("minus-x");
    // Traffic moves towards -x at 25 m/s. In file coordinates the driver's left is -y, so the lane
    // nearest y = 0 is the leftmost (fast) lane.
    writeFileSync(join(d, "tracks.csv"), "track_id,t,x,y\n1,0,300,1.75\n1,0.04,299,1.75\n1,0.08,298,1.75\n2,0,250,5.25\n2,0.04,249.2,5.25\n2,0.08,248.4,5.25\n");
    writeFileSync(join(d, "road.json"), JSON.stringify({ name: "Orrowind Motorway, westbound", laneMarkings: [0, 3.5, 7], frameRate: 25, xRange: [0, 400], direction: "-x" }));
    const rec = await readRecording(join(d, "tracks.csv"));
    expect(rec.road.laneMarkings).toEqual([-7, -3.5, 0]);
    expect(rec.road.xRange).toEqual([-400, 0]);
    expect(rec.road.direction).toBe("+x");
    const [a, b] = rec.tracks as [Track, Track];
    expect(Array.from(a.x)).toEqual([-300, -299, -298]);
    expect(Array.from(a.y)).toEqual([-1.75, -1.75, -1.75]);
    expect(a.vx[1]).toBeCloseTo(25, 9);
    expect(a.lane[0]).toBe(1); // leftmost of two lanes
    expect(b.vx[1]).toBeCloseTo(20, 9);
    expect(b.lane[0]).toBe(0); // rightmost
  });

  it("negates the file's speeds and accelerations for direction -x", async () => {
    const d = dir("minus-x-speeds");
    writeFileSync(join(d, "tracks.csv"), "track_id,t,x,y,vx,vy,ax,ay\n1,0,300,1.75,-25,0.5,-1,0\n1,0.04,299,1.77,-25,0.5,-1,0\n");
    const rec = await readRecording(join(d, "tracks.csv"), { road: { ...ROAD, direction: "-x" } });
    expect(rec.tracks[0]!.vx[0]).toBe(25);
    expect(rec.tracks[0]!.vy[0]).toBe(-0.5);
    expect(rec.tracks[0]!.ax[0]).toBe(1);
  });
});

describe("readRecording validation", () => {
  const hint = `Fix the file, or leave such tracks out (CLI --on-bad-track reject, API onBadTrack: "reject"; they are then listed as rejected)`;
  const sortHint = `Sort each track's rows by time (CLI --sort-rows, API sortWithinTracks: true), fix the file, or leave such tracks out (CLI --on-bad-track reject, API onBadTrack: "reject"; they are then listed as rejected)`;
  // Rows count data records: the header is row 0, so row k is line k + 1 of the file.
  it("reports a non-numeric value with file, row, column and value (CSV)", async () => {
    const f = join(FIX, "bad-nonnumeric.csv");
    const e = await inputError(readRecording(f, { onBadTrack: "reject" })); // structural: throws in either mode
    expect(e.message).toBe(`${f}, row 5, column "x", value "abc": value is not a number`);
    expect([e.file, e.row, e.column, e.value]).toEqual([f, 5, "x", "abc"]);
  });

  it("reports a non-numeric value in a Parquet text column by its row in file order", async () => {
    const d = dir("pq-bad");
    const f = join(d, "tracks.parquet");
    await duck(
      `COPY (SELECT * FROM (VALUES (1, 0.0, '10.0', 1.75), (1, 0.04, '10.8', 1.75), (1, 0.08, '11,6', 1.75)) v(track_id, t, x, y)) TO '${f}' (FORMAT parquet)`,
    );
    const e = await inputError(readRecording(f, { road: ROAD }));
    expect(e.message).toBe(`${f}, row 3, column "x", value "11,6": value is not a number`);
  });

  it("reports NaN in a typed Parquet column by its row in file order (file_row_number + 1)", async () => {
    const d = dir("pq-nan");
    const f = join(d, "tracks.parquet");
    await duck(
      `COPY (SELECT * FROM (VALUES (1, 0.0, 10.0, 1.75), (2, 0.0, 20.0, 1.75), (1, 0.04, 10.8, 1.75), (2, 0.04, 'NaN'::DOUBLE, 1.75)) v(track_id, t, x, y)) TO '${f}' (FORMAT parquet)`,
    );
    const e = await inputError(readRecording(f, { road: ROAD }));
    expect([e.row, e.column, e.value]).toEqual([4, "x", NaN]);
    expect(e.message).toBe(`${f}, row 4, column "x", value "NaN": track 2: x is not a finite number. ${hint}`);
  });

  it("fails on NaN in a track, naming file, row, column and value", async () => {
    const f = join(FIX, "bad-nan.csv");
    const e = await inputError(readRecording(f));
    expect(e.message).toBe(`${f}, row 4, column "x", value "NaN": track 2: x is not a finite number. ${hint}`);
  });

  it("fails on an empty cell", async () => {
    const f = join(FIX, "bad-empty.csv");
    const e = await inputError(readRecording(f));
    expect(e.message).toBe(`${f}, row 6, column "y", value "": track 2: y is empty. ${hint}`);
  });

  it("fails when time goes backwards inside a track", async () => {
    const f = join(FIX, "bad-backwards.csv");
    const e = await inputError(readRecording(f));
    expect(e.message).toBe(`${f}, row 5, column "t", value "0.02": track 1: time goes backwards: t=0.02 after t=0.04 at row 3. ${sortHint}`);
  });

  it("fails on a duplicate (track, time)", async () => {
    const f = join(FIX, "bad-duplicate.csv");
    const e = await inputError(readRecording(f));
    expect(e.message).toBe(`${f}, row 7, column "t", value "0.08": track 1: duplicate time: t=0.08 also at row 5. ${hint}`);
  });

  it("with onBadTrack: 'reject' leaves bad tracks out, lists them with reason and row, and warns", async () => {
    const rec = await readRecording(join(FIX, "bad-backwards.csv"), { onBadTrack: "reject" });
    expect(rec.tracks.map((t) => t.id)).toEqual([2]);
    expect(rec.rejected).toEqual([{ trackId: 1, reason: "time goes backwards: t=0.02 after t=0.04 at row 3", row: 5, rows: 4 }]);
    expect(rec.warnings).toContain(
      "REJECTED 1 of 2 tracks (4 rows) that failed validation; first: track 1, row 5: time goes backwards: t=0.02 after t=0.04 at row 3. See Recording.rejected",
    );
  });

  it("counts every bad track when several fail, and fails on the earliest row", async () => {
    const d = dir("several");
    writeFileSync(join(d, "s.csv"), "track_id,t,x,y\n1,0,0,1\n2,0,0,1\n1,0,1,1\n3,0,0,1\n3,0.04,inf,1\n2,0.04,1,1\n");
    const f = join(d, "s.csv");
    const e = await inputError(readRecording(f, { road: ROAD }));
    expect(e.message).toBe(`${f}, row 3, column "t", value "0": track 1: duplicate time: t=0 also at row 1; 2 tracks have problems in all. ${hint}`);
    const rec = await readRecording(f, { road: ROAD, onBadTrack: "reject" });
    expect(rec.rejected.map((r) => [r.trackId, r.row, r.reason])).toEqual([
      [1, 3, "duplicate time: t=0 also at row 1"],
      [3, 5, "x is not a finite number"],
    ]);
    expect(rec.tracks.map((t) => t.id)).toEqual([2]);
  });

  it("sortWithinTracks accepts rows out of time order but still rejects duplicates", async () => {
    const d = dir("unsorted");
    writeFileSync(join(d, "u.csv"), "track_id,t,x,y\n1,0.08,2,1\n1,0,0,1\n1,0.04,1,1\n");
    const rec = await readRecording(join(d, "u.csv"), { road: ROAD, sortWithinTracks: true });
    expect(Array.from(rec.tracks[0]!.t)).toEqual([0, 0.04, 0.08]);
    expect(Array.from(rec.tracks[0]!.x)).toEqual([0, 1, 2]);
    const e = await inputError(readRecording(join(FIX, "bad-duplicate.csv"), { sortWithinTracks: true }));
    expect(e.row).toBe(7);
  });

  it("rejects a track id that is not an integer (structural)", async () => {
    const d = dir("ids-bad");
    writeFileSync(join(d, "i.csv"), "track_id,t,x,y\n1,0,0,1\n1.5,0,0,1\n");
    const f = join(d, "i.csv");
    const e = await inputError(readRecording(f, { road: ROAD, onBadTrack: "reject" }));
    expect(e.message).toBe(`${f}, row 2, column "track_id", value "1.5": track id should be an integer`);
  });

  it("rejects a lone sample whose speed cannot be derived", async () => {
    const d = dir("lone");
    writeFileSync(join(d, "l.csv"), "track_id,t,x,y\n1,0,0,1\n1,0.04,1,1\n2,0,5,1\n");
    const rec = await readRecording(join(d, "l.csv"), { road: ROAD, onBadTrack: "reject" });
    expect(rec.rejected).toEqual([{ trackId: 2, reason: "only one sample: speed and acceleration cannot be derived", row: 3, rows: 1 }]);
  });

  it("rejects a file without data rows and a Parquet column of a non-numeric type", async () => {
    const d = dir("empty");
    const f = join(d, "e.csv");
    writeFileSync(f, "track_id,t,x,y\n");
    expect((await inputError(readRecording(f, { road: ROAD }))).message).toBe(`${f}: the file has no data rows`);
    const g = join(d, "b.parquet");
    await duck(`COPY (SELECT 1 AS track_id, 0.0 AS t, true AS x, 1.0 AS y) TO '${g}' (FORMAT parquet)`);
    expect((await inputError(readRecording(g, { road: ROAD }))).message).toBe(`${g}, column "x": column has type BOOLEAN; expected numbers`);
  });

  it("names the file when it does not exist or is not CSV", async () => {
    const f = join(tmp, "nope.csv");
    const e = await inputError(readRecording(f, { road: ROAD }));
    expect(e.message).toMatch(new RegExp(`^${f.replace(/[.*+?^${}()|[\]\\]/g, "\\$&")}: the tracks file does not exist`));
    const d = dir("noroad");
    writeFileSync(join(d, "x.csv"), "track_id,t,x,y\n1,0,0,1\n");
    const e2 = await inputError(readRecording(join(d, "x.csv")));
    expect(e2.message).toBe(`${join(d, "x.csv")}: no road description: expected ${join(d, "road.json")} beside the tracks file, or give one (CLI --road FILE, API { road })`);
    writeFileSync(join(d, "x.parquet"), "this is not parquet");
    const e3 = await inputError(readRecording(join(d, "x.parquet"), { road: ROAD }));
    expect(e3.message).toMatch(/x\.parquet: cannot read as Parquet: /);
  });
});

describe("readRecording derived motion, lanes, kinds", () => {
  it("derives vx ≈ 20 + 1.5 t and ax ≈ 1.5 from x = 20 t + 0.5·1.5 t² (exact kinematics)", async () => {
    const d = dir("derive");
    const lines = ["track_id,t,x,y"];
    for (let i = 0; i < 150; i++) {
      const t = i / 25;
      lines.push(`4,${t},${20 * t + 0.5 * 1.5 * t * t},5.25`);
    }
    writeFileSync(join(d, "d.csv"), lines.join("\n"));
    const rec = await readRecording(join(d, "d.csv"), { road: ROAD });
    // 150 samples ≥ the 51-sample window: no short-stretch warning, only the defaults used.
    expect(rec.warnings).toEqual([
      expect.stringContaining("default sizes per kind used for 1 of 1 tracks"),
      'the file has no kind column: all 1 tracks are kind "other"',
    ]);
    const tr = rec.tracks[0]!;
    for (let i = 0; i < tr.t.length; i++) {
      expect(tr.vx[i]).toBeCloseTo(20 + 1.5 * tr.t[i]!, 6);
      expect(tr.ax[i]).toBeCloseTo(1.5, 5);
      expect(tr.vy[i]).toBeCloseTo(0, 9);
    }
    expect(tr.lane[0]).toBe(1);
  });

  it("derives only the quantities missing for a track, with a warning", async () => {
    const d = dir("partial");
    writeFileSync(join(d, "p.csv"), "track_id,t,x,y,vx\n1,0,0,1,10\n1,0.04,0.4,1,10\n1,0.08,0.8,1,10\n2,0,0,5,\n2,0.04,0.8,5,\n2,0.08,1.6,5,\n");
    const rec = await readRecording(join(d, "p.csv"), { road: ROAD });
    expect(Array.from(rec.tracks[0]!.vx)).toEqual([10, 10, 10]);
    expect(rec.tracks[1]!.vx[1]).toBeCloseTo(20, 9);
    expect(rec.warnings).toContain("vx: empty or non-finite values in 1 tracks; vx derived from positions for those tracks");
    // 3 samples each, far below the 51-sample (2 s at 25 Hz) acceleration window.
    expect(rec.warnings).toContain(
      "2 tracks have a stretch shorter than the acceleration smoothing window (2 s); their derived acceleration there comes from a shorter window and is noisier",
    );
  });

  it("assigns lanes from the markings and ignores a lane column unless lanes: 'file' (warning when they differ)", async () => {
    const d = dir("lanes");
    writeFileSync(join(d, "l.csv"), "track_id,t,x,y,lane\n1,0,0,1,7\n1,0.04,1,4,7\n1,0.08,2,12,7\n");
    // y steps of 3 and 8 m in 0.04 s are implausible on purpose here (lanes only): accepted.
    const accept = { accept: ["speed", "jump"] as const };
    const rec = await readRecording(join(d, "l.csv"), { road: ROAD, plausibility: { accept: [...accept.accept] } });
    expect(Array.from(rec.tracks[0]!.lane)).toEqual([0, 1, -1]);
    expect(rec.warnings).toContain(
      `column "lane" ignored: lanes are assigned from road.laneMarkings, and the file's lane ids differ from them in 3 of 3 rows (option lanes: "file" uses the file's ids)`,
    );
    const rec2 = await readRecording(join(d, "l.csv"), { road: ROAD, lanes: "file", plausibility: { accept: [...accept.accept] } });
    expect(Array.from(rec2.tracks[0]!.lane)).toEqual([7, 7, 7]);
  });

  it("maps kinds (case-insensitive, synonyms) and lists unrecognised ones", async () => {
    const d = dir("kinds");
    writeFileSync(join(d, "k.csv"), "track_id,t,x,y,kind\n1,0,0,1, Car\n1,0.04,1,1,Car\n2,0,0,1,BUS\n2,0.04,1,1,BUS\n3,0,0,1,tractor\n3,0.04,1,1,tractor\n");
    const rec = await readRecording(join(d, "k.csv"), { road: ROAD });
    expect(rec.tracks.map((t) => t.kind)).toEqual(["car", "truck", "other"]);
    expect(rec.warnings).toContain(`kind: unrecognised kind for 1 tracks, taken as "other" (values: "tractor")`);
  });
});

describe("readRoad", () => {
  it("reads and validates a road description", async () => {
    const road = await readRoad(join(FIX, "road.json"));
    expect(road).toEqual({ name: "Orrowind Motorway, test section A", laneMarkings: [0, 3.5, 7], frameRate: 25, speedLimit: 33.33, xRange: [0, 400] });
  });
  it("names the file and field of a bad value", async () => {
    const f = join(FIX, "bad-road.json");
    const e = await inputError(readRoad(f));
    expect(e.message).toBe(`${f}, column "laneMarkings": laneMarkings[2]=3.5 should be greater than laneMarkings[1]=3.5 (strictly ascending, right edge first)`);
    const d = dir("roads");
    const g = join(d, "r.json");
    writeFileSync(g, JSON.stringify({ name: "x", laneMarkings: [0, 3.5], frameRate: 0 }));
    expect((await inputError(readRoad(g))).message).toBe(`${g}, column "frameRate", value "0": field "frameRate" should be a finite number > 0 (Hz)`);
    writeFileSync(g, JSON.stringify({ name: "x", laneMarkings: [0, 3.5], frameRate: 25, direction: "west" }));
    expect((await inputError(readRoad(g))).message).toBe(`${g}, column "direction", value "\\"west\\"": field "direction" should be "+x" or "-x"`);
    writeFileSync(g, "{ not json");
    expect((await inputError(readRoad(g))).message).toMatch(/r\.json: road description is not valid JSON/);
  });
  it("warns about unknown fields when asked", async () => {
    const d = dir("roads2");
    const g = join(d, "r.json");
    writeFileSync(g, JSON.stringify({ name: "x", laneMarkings: [0, 3.5], frameRate: 25, speedlimit: 30 }));
    const w: string[] = [];
    await readRoad(g, w);
    expect(w).toEqual([`${g}: unknown field "speedlimit" ignored (known: name, laneMarkings, frameRate, speedLimit, xRange, direction, conditions)`]);
  });
});
