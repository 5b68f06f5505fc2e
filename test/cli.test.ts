import { spawnSync } from "node:child_process";
import { copyFileSync, existsSync, mkdirSync, mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { queryCatalogue } from "../src/catalogue/queryCatalogue.js";
import { Rng } from "../src/core/rng.js";
import { VERSION } from "../src/core/version.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { readRecording } from "../src/recording/readRecording.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

// The CLI runs from source through tsx, exactly as `node dist/cli/main.js` runs it after the build.
const root = join(import.meta.dirname, "..");
function cli(args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

let dir = "";
let tracks = "";
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "roadsieve-cli-"));
  const traffic = generateTraffic({ vehicleKm: 25, recordingId: "cli-test", hardBrakingRate: 0.1, tightCutInRate: 0.1 }, new Rng(3));
  await writeGeneratedTraffic(join(dir, "rec"), traffic, { format: "csv" });
  tracks = join(dir, "rec", "tracks.csv");
});

describe("roadsieve command line", () => {
  it("--version prints the version recorded in every output, which matches package.json", () => {
    const pkg = JSON.parse(readFileSync(join(root, "package.json"), "utf8")) as { version: string };
    expect(VERSION).toBe(pkg.version);
    expect(cli(["--version"]).stdout.trim()).toBe(pkg.version);
  });

  it("--help lists the commands and exits 0", () => {
    const r = cli(["--help"]);
    expect(r.code).toBe(0);
    for (const c of ["demo", "plan", "assign", "check", "generate"]) expect(r.stdout).toContain(`  ${c}`);
    expect(cli(["plan", "--help"]).stdout).toContain("--budget N");
  });

  it("plan on a file with a non-numeric value exits 2 with one line naming file, row, column and value", () => {
    const lines = readFileSync(tracks, "utf8").split("\n");
    const header = lines[0]!.split(",");
    const xCol = header.indexOf("x");
    const cells = lines[5]!.split(",");
    cells[xCol] = "12,5m".replace(",", ";"); // a value a spreadsheet export might leave behind
    lines[5] = cells.join(",");
    const bad = join(dir, "bad", "tracks.csv");
    mkdirSync(join(dir, "bad"), { recursive: true });
    writeFileSync(bad, lines.join("\n"));
    copyFileSync(join(dir, "rec", "road.json"), join(dir, "bad", "road.json"));
    const r = cli(["plan", bad, "--out", join(dir, "out-bad"), "--quiet"]);
    expect(r.code).toBe(2);
    const msg = r.stderr.trim().split("\n").pop()!;
    expect(msg).toContain(bad);
    expect(msg).toContain("row 5");
    expect(msg).toContain('column "x"');
    expect(msg).toContain('"12;5m"');
    expect(existsSync(join(dir, "out-bad", "plan.json"))).toBe(false);
  });

  it("plan with a missing column exits 2 and names the column", () => {
    const lines = readFileSync(tracks, "utf8").split("\n");
    const header = lines[0]!.split(",");
    const yCol = header.indexOf("y");
    const cut = lines.map((l) => l.split(",").filter((_, j) => j !== yCol).join(","));
    mkdirSync(join(dir, "noy"), { recursive: true });
    writeFileSync(join(dir, "noy", "tracks.csv"), cut.join("\n"));
    copyFileSync(join(dir, "rec", "road.json"), join(dir, "noy", "road.json"));
    const r = cli(["plan", join(dir, "noy", "tracks.csv"), "--quiet"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/"y"/);
  });

  it("bad options exit 2 with the option and the expected value", () => {
    const r = cli(["plan", tracks, "--budget", "zero"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain('--budget="zero" should be an integer >= 1');
    expect(cli(["plan", tracks, "--no-such-option"]).code).toBe(2);
    // An unknown scenario class id names itself and the known ones (exit 2, one line).
    const c = cli(["plan", tracks, "--classes", "following,tailgating", "--quiet"]);
    expect(c.code).toBe(2);
    expect(c.stderr.trim().split("\n").pop()).toMatch(/unknown scenario class "tailgating"; known: free-driving, following/);
    expect(cli(["frobnicate"]).code).toBe(2);
  });

  it("two runs with the same seed write byte-identical plan.json, plan.csv, model.json, report.html and Parquet tables", async () => {
    const outs = [join(dir, "run1"), join(dir, "run2")];
    for (const out of outs) {
      const r = cli(["plan", tracks, "--out", out, "--seed", "9", "--parquet", "--quiet"]);
      expect(r.code, r.stderr).toBe(0);
      expect(r.stdout).toContain("logical scenarios with a test case stand for");
    }
    const parquet = ["recordings", "scenarios", "features", "feature_info", "maneuvers", "test_cases", "logical_scenarios", "concrete_test_cases"].map((t) => `catalogue/${t}.parquet`);
    for (const f of ["plan.json", "plan.csv", "logical-scenarios.csv", "model.json", "report.html", ...parquet]) {
      const a = readFileSync(join(outs[0]!, f));
      const b = readFileSync(join(outs[1]!, f));
      expect(a.equals(b), `${f} differs between runs`).toBe(true);
    }
    // The DuckDB file format does not promise identical bytes (free space inside its blocks is not
    // cleared), so for catalogue.duckdb the promise is identical content: every query agrees.
    const q = "SELECT * FROM scenarios ORDER BY idx";
    expect(await queryCatalogue(join(outs[0]!, "catalogue.duckdb"), q)).toEqual(await queryCatalogue(join(outs[1]!, "catalogue.duckdb"), q));
    const plan = JSON.parse(readFileSync(join(outs[0]!, "plan.json"), "utf8")) as { testCases: { weight: number }[]; logicalScenarios: { share: number }[] };
    expect(plan.testCases.length).toBeGreaterThan(0);
    for (const t of plan.testCases) expect(t.weight).toBeGreaterThan(0);
    for (const l of plan.logicalScenarios) expect(l.share).toBeGreaterThanOrEqual(0);
    // plan.csv: one row per concrete test case (plus the header).
    expect(readFileSync(join(outs[0]!, "plan.csv"), "utf8").trim().split("\n").length).toBe(plan.testCases.length + 1);
  });
});

describe("roadsieve assign", () => {
  let planDir = "";
  let other = "";
  beforeAll(async () => {
    planDir = join(dir, "assign-plan");
    const r = cli(["plan", tracks, "--out", planDir, "--seed", "9", "--map", "pca", "--no-catalogue", "--quiet"]);
    expect(r.code, r.stderr).toBe(0);
    // Another day on the same fictional motorway: denser traffic, another generator seed.
    const traffic = generateTraffic({ vehicleKm: 10, recordingId: "cli-other", flowPerLane: 1400 }, new Rng(4));
    await writeGeneratedTraffic(join(dir, "other"), traffic, { format: "csv" });
    other = join(dir, "other", "tracks.csv");
  });

  it("puts the plan's own recording back into the plan's clusters, scenario by scenario", async () => {
    const csv = join(dir, "assigned-self.csv");
    const r = cli(["assign", planDir, tracks, "--out", csv, "--quiet"]);
    expect(r.code, r.stderr).toBe(0);
    // Reference: the labels of the fit itself (the same run in-process; k-means nearest centre and
    // DBSCAN's border rule, Ester et al. 1996, reproduce them).
    const fit = runPipeline([await readRecording(tracks)], { seed: 9, map: "pca" });
    const rows = readFileSync(csv, "utf8").trim().split("\n").slice(1).map((l) => l.split(","));
    expect(rows.length).toBe(fit.scenarios.scenarios.length);
    const byId = new Map(rows.map((c) => [c[0]!, Number(c[6])]));
    fit.scenarios.scenarios.forEach((s, i) => expect(byId.get(s.id), s.id).toBe(fit.labels[i]));
    const noise = Array.from(fit.labels).filter((l) => l === -1).length;
    expect(r.stdout).toContain(`${noise} novel scenario(s)`);
  });

  it("assigns a new recording: per-cluster counts add up to its scenarios, novel ones listed", () => {
    const r = cli(["assign", planDir, other, "--list", "3", "--quiet"]);
    expect(r.code, r.stderr).toBe(0);
    const m = /assigned (\d+) scenarios/.exec(r.stdout);
    expect(m).not.toBeNull();
    const table = r.stdout.split("\n").filter((l) => /^(\d+|novel \(noise\))\s+\d+\s/.test(l));
    const counts = table.map((l) => Number(l.replace(/^novel \(noise\)/, "x").trim().split(/\s+/)[1]));
    expect(counts.reduce((a, b) => a + b, 0)).toBe(Number(m![1]));
    expect(r.stdout).toMatch(/\d+ novel scenario\(s\)/);
  });

  it("a model that does not match the recordings exits 2 with one line naming the feature", () => {
    const model = JSON.parse(readFileSync(join(planDir, "model.json"), "utf8")) as { features: string[] };
    const renamed = model.features[0]!;
    model.features[0] = "not.a.feature";
    const bad = join(dir, "bad-model.json");
    writeFileSync(bad, JSON.stringify(model));
    const r = cli(["assign", bad, other, "--quiet"]);
    expect(r.code).toBe(2);
    const line = r.stderr.trim().split("\n").pop()!;
    expect(line).toContain("does not match");
    expect(line).toContain(`"${renamed}"`);
    expect(line).toContain(bad);
    const v2 = join(dir, "v99-model.json");
    writeFileSync(v2, JSON.stringify({ ...model, formatVersion: 99 }));
    const r2 = cli(["assign", v2, other, "--quiet"]);
    expect(r2.code).toBe(2);
    expect(r2.stderr).toContain(`column "formatVersion"`);
    expect(cli(["assign", join(dir, "no-such-plan"), other, "--quiet"]).code).toBe(2);
  });
});
