import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { breakdown } from "../src/catalogue/breakdown.js";
import { catalogueTables } from "../src/catalogue/catalogueTables.js";
import { queryCatalogue } from "../src/catalogue/queryCatalogue.js";
import { writeCatalogue } from "../src/catalogue/writeCatalogue.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { validateConditions } from "../src/recording/conditions.js";
import { readRoad } from "../src/recording/readRoad.js";
import type { Scenario } from "../src/scenario/types.js";
import { buildReport } from "../src/report/buildReport.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const dir = mkdtempSync(join(tmpdir(), "roadsieve-breakdown-"));

function errorOf(f: () => unknown): InputError {
  try {
    f();
  } catch (e) {
    if (e instanceof InputError) return e;
    throw e;
  }
  throw new Error("no InputError");
}

describe("recording conditions", () => {
  it("reads conditions from road.json and keeps them in field order", async () => {
    const p = join(dir, "road.json");
    writeFileSync(p, JSON.stringify({ name: "Orrowind Motorway", laneMarkings: [0, 3.5, 7], frameRate: 25, conditions: { weather: "rain", site: "km 12", trafficDensity: "dense" } }));
    const warnings: string[] = [];
    const road = await readRoad(p, warnings);
    expect(road.conditions).toEqual({ site: "km 12", trafficDensity: "dense", weather: "rain" });
    expect(Object.keys(road.conditions!)).toEqual(["site", "trafficDensity", "weather"]);
    expect(warnings).toEqual([]);
  });

  it("names file, field and value for a value outside the vocabulary, an unknown field, or a non-string", async () => {
    const p = join(dir, "bad-road.json");
    writeFileSync(p, JSON.stringify({ name: "Orrowind Motorway", laneMarkings: [0, 3.5], frameRate: 25, conditions: { weather: "drizzle" } }));
    await expect(readRoad(p)).rejects.toThrow(`${p}, column "conditions.weather", value "drizzle": condition "weather" should be one of clear, cloudy, rain, heavy-rain, fog, snow, other`);
    const e = errorOf(() => validateConditions({ wether: "rain" }, "r.json"));
    expect(e.message).toBe('r.json, column "conditions.wether", value "\\"rain\\"": unknown condition field "wether" (known: site, roadType, trafficDensity, timeOfDay, weather, lighting, recordingMethod)');
    expect(errorOf(() => validateConditions({ site: 3 }, "r.json")).column).toBe("conditions.site");
    expect(errorOf(() => validateConditions(["rain"], "r.json")).column).toBe("conditions");
  });
});

/** A minimal scenario: only the fields breakdown reads. */
function sc(recording: string, km: number, seconds: number, scenarioClass: string, i: number): Scenario & { scenarioClass: string } {
  return { index: i, id: `${recording}/1/${i}`, recording, egoTrack: 1, window: i, km, seconds, scenarioClass } as unknown as Scenario & { scenarioClass: string };
}

describe("breakdown", () => {
  it("gives shares, km, hours and counts per group and class (hand-computed example)", () => {
    const s = [sc("a", 0.3, 10, "following", 0), sc("a", 0.1, 10, "cut-in", 1), sc("b", 0.2, 10, "following", 2), sc("c", 0.4, 20, "following", 3)];
    const summaries = [
      { id: "a", conditions: { weather: "clear" as const } },
      { id: "b", conditions: { weather: "rain" as const } },
      { id: "c", conditions: {} },
    ];
    const b = breakdown(s, summaries, "weather", s.map((x) => x.km));
    expect(b.categoryKind).toBe("class");
    expect(b.groups.map((g) => [g.group, g.scenarios, g.km])).toEqual([
      ["(not given)", 1, 0.4],
      ["clear", 2, 0.4],
      ["rain", 1, 0.2],
    ]);
    const clear = b.rows.filter((r) => r.group === "clear");
    // following: 0.3 of 0.4 km = 0.75; cut-in 0.1 / 0.4 = 0.25; hours 10 s / 3600.
    expect(clear.map((r) => r.category)).toEqual(["following", "cut-in"]);
    expect(clear[0]!.share).toBeCloseTo(0.75, 15);
    expect(clear[1]!.share).toBeCloseTo(0.25, 15);
    expect(clear[1]!.hours).toBeCloseTo(10 / 3600, 15);
    expect(clear[0]!.timeShare).toBeCloseTo(0.5, 15);
    expect(b.singleRecording).toEqual(["cut-in"]);
    // Coverage per group: clear has following ×1 and cut-in ×1 → f1 = 2, f2 = 0, Good–Turing f1/n = 2/2;
    // bias-corrected Chao1 (without the (n − 1)/n factor, the project's default) = S + f1(f1 − 1)/(2(f2 + 1))
    // = 2 + 2 · 1 / 2 = 3 (Chao 1987 bias-corrected form).
    const cov = b.groups.find((g) => g.group === "clear")!.coverage;
    expect(cov).toEqual({ categories: 2, singletons: 2, doubletons: 0, unseenMass: 1, chao1: 3 });
    expect(b.warnings[0]).toContain("cut-in (1 scenario, only in a)");
    // Hours as weights: the clear group's following share is 10 s of 20 s.
    expect(breakdown(s, summaries, "weather", s.map((x) => x.seconds)).rows.find((r) => r.group === "clear" && r.category === "following")!.share).toBeCloseTo(0.5, 15);
    expect(() => breakdown(s, summaries, "colour" as never, s.map((x) => x.km))).toThrow(InputError);
  });

  it("agrees with SQL over the written catalogue (DuckDB GROUP BY) on two generated recordings", async () => {
    const a = generateTraffic({ vehicleKm: 12, recordingId: "light", flowPerLane: 600 }, new Rng(3)).recording;
    const d = generateTraffic({ vehicleKm: 12, recordingId: "dense", flowPerLane: 1400 }, new Rng(4)).recording;
    a.road.conditions = { site: "Orrowind km 3", trafficDensity: "light", recordingMethod: "generated" };
    d.road.conditions = { site: "Orrowind km 9", trafficDensity: "dense", recordingMethod: "generated" };
    const r = runPipeline([a, d], { seed: 1, map: "pca", k: 3 });
    expect(r.recordings.map((x) => x.conditions.trafficDensity)).toEqual(["light", "dense"]);
    expect((r.plan.provenance.upstream.recordingConditions as Record<string, unknown>).dense).toEqual(d.road.conditions);
    const db = join(dir, "c.duckdb");
    await writeCatalogue(db, catalogueTables(r));
    const b = breakdown(r.scenarios.scenarios, r.recordings, "trafficDensity", r.weights, { typeKeys: r.typeKeys });
    // Extraction measures the scenario class (src/logical), so the categories are classes.
    expect(b.categoryKind).toBe("class");
    // Reference: DuckDB's own aggregation of the catalogue tables.
    const sql = await queryCatalogue(
      db,
      `SELECT r.traffic_density AS g, s.scenario_class AS c, count(*) AS n, sum(s.km) AS km, sum(s.duration_s) / 3600 AS h,
              sum(s.km) / sum(sum(s.km)) OVER (PARTITION BY r.traffic_density) AS share
       FROM scenarios s JOIN recordings r ON s.recording = r.id GROUP BY 1, 2 ORDER BY 1, 2`,
    );
    const ours = [...b.rows].sort((x, y) => (x.group + "\u0000" + x.category < y.group + "\u0000" + y.category ? -1 : 1));
    expect(ours.length).toBe(sql.length);
    ours.forEach((row, i) => {
      const q = sql[i]!;
      expect([row.group, row.category, row.scenarios]).toEqual([q.g, q.c, q.n]);
      expect(row.km).toBeCloseTo(q.km as number, 10);
      expect(row.hours).toBeCloseTo(q.h as number, 10);
      expect(row.share).toBeCloseTo(q.share as number, 10);
    });
    const single = await queryCatalogue(db, "SELECT scenario_class FROM scenarios GROUP BY 1 HAVING count(DISTINCT recording) = 1 ORDER BY 1");
    expect([...b.singleRecording].sort()).toEqual(single.map((x) => x.scenario_class));
    // Given type keys instead of classes (scenarios without scenarioClass), the same agreement on type_key.
    const plain = r.scenarios.scenarios.map((x) => ({ ...x, scenarioClass: undefined }));
    const bt = breakdown(plain, r.recordings, "trafficDensity", r.weights, { typeKeys: r.typeKeys });
    expect(bt.categoryKind).toBe("type key");
    const sqlT = await queryCatalogue(db, "SELECT r.traffic_density AS g, s.type_key AS c, count(*) AS n FROM scenarios s JOIN recordings r ON s.recording = r.id GROUP BY 1, 2 ORDER BY 1, 2");
    const oursT = [...bt.rows].sort((x, y) => (x.group + "\u0000" + x.category < y.group + "\u0000" + y.category ? -1 : 1));
    expect(oursT.map((x) => [x.group, x.category, x.scenarios])).toEqual(sqlT.map((q) => [q.g, q.c, q.n]));
    // The catalogue's recordings table carries the conditions.
    expect(await queryCatalogue(db, "SELECT id, site, traffic_density, weather FROM recordings ORDER BY id")).toEqual([
      { id: "dense", site: "Orrowind km 9", traffic_density: "dense", weather: null },
      { id: "light", site: "Orrowind km 3", traffic_density: "light", weather: null },
    ]);
    // The report lists the conditions and breaks the shares down by recording and by each condition with two values.
    const rep = buildReport(r);
    const recs = rep.sections.find((x) => x.id === "recordings")!;
    expect(recs.tables!.at(-1)!.columns).toEqual(["recording", "site", "trafficDensity", "recordingMethod"]);
    const bd = rep.sections.find((x) => x.id === "breakdown")!;
    expect(bd.tables!.map((t) => t.caption!.split(" (")[0])).toEqual(["Share of km by recording", "Coverage of each recording's own classes", "Share of km by site", "Share of km by trafficDensity"]);
    expect(bd.bullets![0]).toContain("rest on one recording only");
  }, 60_000);
});

describe("conditions on the command line", () => {
  it("check prints a recording's conditions; a value outside the vocabulary exits 2 with one line naming file, field and value", async () => {
    const root = join(import.meta.dirname, "..");
    const cli = (args: string[]) => spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 120_000 });
    const d = join(dir, "cli-rec");
    await writeGeneratedTraffic(d, generateTraffic({ vehicleKm: 3, recordingId: "cond" }, new Rng(8)), { format: "csv" });
    const roadPath = join(d, "road.json");
    const road = JSON.parse(readFileSync(roadPath, "utf8")) as Record<string, unknown>;
    writeFileSync(roadPath, JSON.stringify({ ...road, conditions: { trafficDensity: "dense", weather: "rain" } }));
    const ok = cli(["check", join(d, "tracks.csv")]);
    expect(ok.status).toBe(0);
    expect(ok.stdout).toContain("conditions: trafficDensity dense, weather rain");
    writeFileSync(roadPath, JSON.stringify({ ...road, conditions: { trafficDensity: "busy" } }));
    const bad = cli(["check", join(d, "tracks.csv")]);
    expect(bad.status).toBe(2);
    expect(bad.stderr.trim().split("\n")).toHaveLength(1);
    expect(bad.stderr).toContain(`${roadPath}, column "conditions.trafficDensity", value "busy": condition "trafficDensity" should be one of free-flow, light, moderate, dense, congested`);
  }, 60_000);
});
