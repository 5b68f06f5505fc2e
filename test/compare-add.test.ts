import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { addRecordings } from "../src/compare/addRecordings.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { runPipeline, type PipelineResult } from "../src/pipeline/runPipeline.js";
import { writeOutputs } from "../src/pipeline/writeOutputs.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const root = join(import.meta.dirname, "..");
const dir = mkdtempSync(join(tmpdir(), "roadsieve-add-"));
const planDir = join(dir, "plan");
const base = () => generateTraffic({ vehicleKm: 20, recordingId: "base" }, new Rng(31));
// Slow traffic: every desired speed in [6, 14] m/s, where the plan's recording has cars in [22, 45] and
// trucks in [20, 25] m/s (the generator truncates desired speeds by redrawing: docs/synth.md).
const slow = { vehicleKm: 10, carSpeedMean: 10, carSpeedSd: 1, carSpeedMin: 6, carSpeedMax: 14, truckSpeedMean: 8, truckSpeedSd: 0.5, truckSpeedMin: 6, truckSpeedMax: 10 };
let plan: PipelineResult;

beforeAll(async () => {
  plan = runPipeline([base().recording], { seed: 1, map: "pca" });
  await writeOutputs(plan, planDir);
}, 120_000);

describe("addRecordings (no refit)", () => {
  it("adding the plan's own recording again (same generator seed, new id) reproduces its labels, shares and categories", async () => {
    const again = generateTraffic({ vehicleKm: 20, recordingId: "again" }, new Rng(31)).recording;
    const r = await addRecordings(planDir, [again], { compare: { permutations: 49, bootstrap: 49 } });
    // Ground truth: the same tracks, so the same scenarios in the same order.
    expect(r.assignments.map((a) => a.label)).toEqual(Array.from(plan.labels));
    expect(r.novel.length).toBe(Array.from(plan.labels).filter((l) => l === -1).length);
    for (const c of r.clusters) {
      expect(c.batch.scenarios).toBe(c.catalogue.scenarios);
      expect(Math.abs(c.batch.share - c.catalogue.share)).toBeLessThan(1e-12);
      expect(Math.abs(c.updated.share - c.catalogue.share)).toBeLessThan(1e-12);
    }
    expect(r.newCategories).toEqual([]);
    expect(r.comparison.frequency.chiSquare.statistic).toBe(0);
    expect(r.comparison.embedding!.statistic).toBeLessThan(1e-9);
    // Doubling every count keeps the category set; Chao1 can only stay or fall (f1 → 0).
    expect(r.coverage.after.categories).toBe(r.coverage.before.categories);
    expect(r.coverage.after.singletons).toBe(0);
  }, 120_000);

  it("a batch of slow traffic, never recorded in the plan, comes out far from the clusters, with new categories, and unlike the catalogue", async () => {
    const rec = generateTraffic({ ...slow, recordingId: "slow" }, new Rng(32)).recording;
    const r = await addRecordings(planDir, [rec], { compare: { permutations: 199, bootstrap: 49 } });
    // About 5 % of scenarios like the plan's lie beyond their cluster's 95th-percentile radius; here most do.
    expect(r.farFromClusters.share).toBeGreaterThan(0.5);
    // A class never recorded before is reported as new: the plan's recording (desired speeds >= 20 m/s)
    // has no slow-traffic scenario; at 6–14 m/s most of the batch is slow traffic (src/logical's definition).
    expect(r.categoryKind).toBe("class");
    expect(plan.scenarios.scenarios.some((x) => (x as { scenarioClass?: string }).scenarioClass === "slow-traffic")).toBe(false);
    expect(r.newCategories.map((c) => c.category)).toContain("slow-traffic");
    expect(r.comparison.frequency.permutation.p).toBeLessThan(0.05);
    expect(r.comparison.embedding!.p).toBeLessThan(0.05);
    const sum = r.clusters.reduce((s, c) => s + c.updated.share, 0);
    expect(sum).toBeCloseTo(1, 12);
  }, 120_000);

  it("refuses a recording id the plan already has", async () => {
    await expect(addRecordings(planDir, [base().recording])).rejects.toThrow(InputError);
    await expect(addRecordings(planDir, [base().recording])).rejects.toThrow('recording id "base" is already in the plan');
  }, 60_000);

  it("CLI: add prints the updated shares and candidates (exit 0); a model whose features do not match is exit 2 with one line", async () => {
    await writeGeneratedTraffic(join(dir, "slow"), generateTraffic({ ...slow, recordingId: "slow" }, new Rng(32)), { format: "csv" });
    const cli = (args: string[]) => spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 120_000 });
    const ok = cli(["add", planDir, join(dir, "slow", "tracks.csv"), "--permutations", "49", "--out", join(dir, "added.json"), "--quiet"]);
    expect(ok.status).toBe(0);
    expect(ok.stdout).toContain("New candidates:");
    expect(ok.stdout).toMatch(/farther from their cluster than 95 % of its own scenarios/);
    const json = JSON.parse(readFileSync(join(dir, "added.json"), "utf8")) as { assignments: unknown[] };
    expect(json.assignments.length).toBeGreaterThan(0);
    const model = JSON.parse(readFileSync(join(planDir, "model.json"), "utf8")) as { features: string[] };
    model.features[0] = "not.a.feature";
    const badDir = join(dir, "bad-plan");
    await writeOutputs(plan, badDir);
    writeFileSync(join(badDir, "model.json"), JSON.stringify(model));
    const bad = cli(["add", badDir, join(dir, "slow", "tracks.csv"), "--quiet"]);
    expect(bad.status).toBe(2);
    expect(bad.stderr.trim().split("\n")).toHaveLength(1);
    expect(bad.stderr).toContain("not.a.feature");
  }, 180_000);
});
