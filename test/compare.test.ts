import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { splitByCondition, sampleFromResult } from "../src/compare/catalogueSample.js";
import { compareCatalogues } from "../src/compare/compareCatalogues.js";
import { diffPlans } from "../src/compare/diffPlans.js";
import { readPlanFolder } from "../src/compare/readPlanFolder.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { runPipeline, type PipelineResult } from "../src/pipeline/runPipeline.js";
import { writeOutputs } from "../src/pipeline/writeOutputs.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { generatedSample } from "./compare-fixtures.js";

const root = join(import.meta.dirname, "..");
function cli(args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe("the frequency and energy tests on generated recordings (ground truth: the generator's settings)", () => {
  // A small version of bench/compare.ts --categories type-key: its first 6 seeded pairs of 30
  // vehicle-km recordings, with the same options, so that each outcome here is one row of the bench log. Bench (20 pairs,
  // docs/catalogue-over-time.md): a planted change of flow (800 → 1600 veh/h per lane) was rejected by
  // the drive-permutation chi-square in 18 of 20 pairs and by the energy test in 20 of 20; with the
  // same settings the drive-permutation test rejected in 4 of 20 (recordings differ beyond their
  // drives: the 90 % non-rejection is not met, see the doc). Expectations for 6 pairs:
  // planted change rejected by the permutation chi-square in >= 5 and by the energy test in 6; same
  // settings rejected by the permutation chi-square in <= 2.
  const pairs = 6;
  const run = (flowB: number) =>
    Array.from({ length: pairs }, (_, k) => {
      const a = generatedSample({ vehicleKm: 30, flowPerLane: 800 }, 1000 + 2 * k, "a", "type key");
      const b = generatedSample({ vehicleKm: 30, flowPerLane: flowB }, 1001 + 2 * k, "b", "type key");
      return compareCatalogues(a, b, { permutations: 199, bootstrap: 99, seed: k });
    });
  it("rejects a planted change of flow", () => {
    const r = run(1600);
    expect(r.filter((c) => c.frequency.permutation.p < 0.05).length).toBeGreaterThanOrEqual(5);
    expect(r.filter((c) => c.embedding!.p < 0.05).length).toBe(pairs);
  }, 120_000);
  it("rejects in at most 2 of 6 pairs with the same settings (drive permutation)", () => {
    const r = run(800);
    expect(r.filter((c) => c.frequency.permutation.p < 0.05).length).toBeLessThanOrEqual(2);
    // Every column of the category table reaches the minimum expected count (after merging and pooling).
    for (const c of r) expect(c.frequency.minExpected).toBeGreaterThanOrEqual(c.options.minExpected);
  }, 120_000);
});

describe("compareCatalogues, plan folders, condition groups and the CLI", () => {
  let dir = "";
  let result: PipelineResult;
  beforeAll(async () => {
    dir = mkdtempSync(join(tmpdir(), "roadsieve-compare-"));
    const a = generateTraffic({ vehicleKm: 15, recordingId: "light", flowPerLane: 700 }, new Rng(21)).recording;
    const b = generateTraffic({ vehicleKm: 15, recordingId: "dense", flowPerLane: 1500 }, new Rng(22)).recording;
    a.road.conditions = { trafficDensity: "light", recordingMethod: "generated" };
    b.road.conditions = { trafficDensity: "dense", recordingMethod: "generated" };
    result = runPipeline([a, b], { seed: 1, map: "pca", k: 3 });
    await writeOutputs(result, join(dir, "both"));
    await writeOutputs(runPipeline([a], { seed: 1, map: "pca", k: 3 }), join(dir, "light"));
    await writeOutputs(runPipeline([b], { seed: 1, map: "pca", k: 3 }), join(dir, "dense"));
    await writeOutputs(runPipeline([b], { seed: 1, map: "pca", k: 3, scenario: { window: { mode: "fixed", lengthS: 8 } } }), join(dir, "dense-8s"));
  }, 120_000);

  it("reads the same sides back from plan folders as from the pipeline result", async () => {
    const folder = await readPlanFolder(join(dir, "both"), "both");
    const [fa, fb] = splitByCondition(folder.sample, folder.recordings, "trafficDensity", "light", "dense");
    const [ma, mb] = splitByCondition(sampleFromResult(result, "mem"), result.recordings, "trafficDensity", "light", "dense");
    expect(fa.categories).toEqual(ma.categories);
    expect(fb.drives).toEqual(mb.drives);
    expect(fa.km).toEqual(ma.km);
    expect(fb.featureNames).toEqual(mb.featureNames);
    // Features stored in the catalogue round-trip exactly (DOUBLE), non-finite values as NULL → NaN → 0 in the test.
    const c1 = compareCatalogues(fa, fb, { permutations: 49, bootstrap: 49 });
    const c2 = compareCatalogues(ma, mb, { permutations: 49, bootstrap: 49 });
    expect(c1.frequency).toEqual(c2.frequency);
    expect(c1.embedding!.statistic).toBeCloseTo(c2.embedding!.statistic, 9);
    // Shares in each side add up to 1; the difference is b − a.
    const sumA = c1.categories.reduce((s, c) => s + c.a.share, 0);
    expect(sumA).toBeCloseTo(1, 12);
    for (const c of c1.categories) {
      expect(c.difference).toBeCloseTo(c.b.share - c.a.share, 15);
      expect(c.interval.lower).toBeLessThanOrEqual(c.interval.upper);
    }
    expect(c1.onlyInA.length + c1.onlyInB.length).toBe(c1.categories.filter((c) => c.seenIn !== "both").length);
  });

  it("refuses catalogues made with different windows or tool versions, naming what differs", async () => {
    const light = (await readPlanFolder(join(dir, "light"))).sample;
    const d8 = (await readPlanFolder(join(dir, "dense-8s"))).sample;
    expect(() => compareCatalogues(light, d8)).toThrow(InputError);
    expect(() => compareCatalogues(light, d8)).toThrow(/different scenario windows \(scenario\.window\.lengthS 10 vs 8\)/);
    const older = { ...d8, making: { ...d8.making!, tool: "roadsieve 0.0.9", scenario: light.making!.scenario } };
    expect(() => compareCatalogues(light, older)).toThrow(/different tool versions \(roadsieve 0\.1\.0 vs roadsieve 0\.0\.9\)/);
    const otherScene = { ...light, name: "other scene", making: { ...light.making!, scene: { ...(light.making!.scene as Record<string, unknown>), ttcThreshold: 2.5 } } };
    expect(() => compareCatalogues(light, otherScene)).toThrow(/different scene options \(neighbours, criticality thresholds\) \(scene\.ttcThreshold .* vs 2\.5\)/);
    const fewer = { ...light, featureNames: light.featureNames.slice(1), features: { ...light.features!, cols: light.features!.cols - 1 } };
    expect(() => compareCatalogues(light, fewer)).toThrow(/different feature sets \(128 vs 127 features/);
  });

  it("CLI: compare two folders and two condition groups (exit 0), incompatible folders (exit 2, one line), diff-plans", () => {
    const ok = cli(["compare", join(dir, "light"), join(dir, "dense"), "--permutations", "49", "--bootstrap", "49", "--out", join(dir, "cmp.json")]);
    expect(ok.code).toBe(0);
    expect(ok.stdout).toContain("chi-square");
    expect(ok.stdout).toContain("G-test");
    const json = JSON.parse(readFileSync(join(dir, "cmp.json"), "utf8")) as { frequency: { chiSquare: { p: number } } };
    expect(json.frequency.chiSquare.p).toBeGreaterThanOrEqual(0);
    const groups = cli(["compare", join(dir, "both"), "--by", "trafficDensity", "--groups", "light,dense", "--permutations", "49", "--no-embedding"]);
    expect(groups.code).toBe(0);
    expect(groups.stdout).toContain("trafficDensity=light");
    const bad = cli(["compare", join(dir, "light"), join(dir, "dense-8s")]);
    expect(bad.code).toBe(2);
    expect(bad.stderr.trim().split("\n")).toHaveLength(1);
    expect(bad.stderr).toContain("different scenario windows");
    const noGroup = cli(["compare", join(dir, "both"), "--by", "weather", "--groups", "rain,clear"]);
    expect(noGroup.code).toBe(2);
    expect(noGroup.stderr).toContain('no recording has weather = "rain" (values present: (not given))');
    const diff = cli(["diff-plans", join(dir, "light"), join(dir, "both")]);
    expect(diff.code).toBe(0);
    expect(diff.stdout).toMatch(/^Test cases: \d+ kept, \d+ added, \d+ dropped/);
  }, 120_000);
});

describe("diffPlans", () => {
  it("lists added, dropped and kept test cases with the change of share (hand-made plans)", () => {
    const d = diffPlans(
      { testCases: [{ id: "t1", share: 0.5, scenarioId: "r/1/0" }, { id: "t2", share: 0.3, scenarioId: "r/2/0" }, { id: "t3", share: 0.2, scenarioId: "r/3/4" }] },
      { testCases: [{ id: "t1", share: 0.4, scenarioId: "r/1/0" }, { id: "t4", share: 0.35, scenarioId: "q/7/1" }, { id: "t5", share: 0.25, scenarioId: "r/3/4" }] },
    );
    expect(d.testCases.added).toEqual(["t4", "t5"]);
    expect(d.testCases.dropped).toEqual(["t2", "t3"]);
    expect(d.testCases.kept).toHaveLength(1);
    expect(d.testCases.kept[0]!.change).toBeCloseTo(-0.1, 15);
    expect(d.testCases.sameScenario).toEqual([{ oldId: "t3", newId: "t5", scenarioId: "r/3/4" }]);
    expect(d.testCases.reused).toEqual([]);
    expect(d.keptShareOfOld).toBeCloseTo(1 / 3, 15);
    expect(d.logicalScenarios).toBeNull();
  });

  it("does not count an id that now stands on another scenario as kept (rank ids)", () => {
    const d = diffPlans(
      { testCases: [{ id: "TC-0001", share: 0.6, scenarioId: "r/1/0" }, { id: "TC-0002", share: 0.4, scenarioId: "r/2/0" }] },
      { testCases: [{ id: "TC-0001", share: 0.5, scenarioId: "q/9/2" }, { id: "TC-0002", share: 0.3, scenarioId: "r/2/0" }, { id: "TC-0003", share: 0.2, scenarioId: "r/1/0" }] },
    );
    expect(d.testCases.sameScenario).toEqual([{ oldId: "TC-0001", newId: "TC-0003", scenarioId: "r/1/0" }]);
    expect(d.testCases.kept.map((k) => k.id)).toEqual(["TC-0002"]);
    expect(d.testCases.reused).toEqual([{ id: "TC-0001", oldScenarioId: "r/1/0", newScenarioId: "q/9/2" }]);
    expect(d.keptShareOfOld).toBe(0.5);
    expect(d.warnings.join(" ")).toContain("ids by rank");
  });

  it("diffs logical scenarios and takes a test case's share from its logical scenario when it has none (plan schema 2)", () => {
    const d = diffPlans(
      { testCases: [{ id: "a", logicalScenario: "L1" }], logicalScenarios: [{ id: "L1", share: 0.6 }, { id: "L2", share: 0.4 }] },
      { testCases: [{ id: "a", logicalScenario: "L1" }], logicalScenarios: [{ id: "L1", share: 0.5 }, { id: "L3", share: 0.5 }] },
    );
    expect(d.testCases.kept[0]!.change).toBeCloseTo(-0.1, 15);
    expect(d.logicalScenarios!.added).toEqual(["L3"]);
    expect(d.logicalScenarios!.dropped).toEqual(["L2"]);
  });
});
