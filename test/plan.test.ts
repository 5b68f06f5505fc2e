import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { spawnSync } from "node:child_process";
import { afterAll, describe, expect, it } from "vitest";
import {
  buildTestPlan,
  PLAN_CSV_COLUMNS,
  PLAN_SCHEMA_VERSION,
  planSummary,
  testPlanToCsv,
  testPlanToJson,
  writeTestPlan,
  type TestPlan,
  type TestPlanOptions,
} from "../src/plan/index.js";
import { InputError } from "../src/core/errors.js";
import { VERSION } from "../src/core/version.js";
import { poissonInterval } from "../src/exposure/index.js";
import type { Scenario } from "../src/scenario/types.js";
import { makeScenario, plantedCatalogue, referencePython } from "./plan-fixtures.js";

const tmp = mkdtempSync(join(tmpdir(), "roadsieve-plan-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** Every scenario is stood for by exactly one test case or one left-out entry. */
function checkAccounting(plan: TestPlan, n: number): void {
  const counted = plan.testCases.reduce((s, t) => s + t.memberCount, 0) + plan.leftOut.reduce((s, l) => s + l.scenarios, 0);
  expect(counted).toBe(n);
  let plain = 0;
  for (const t of plan.testCases) plain += t.share;
  for (const l of plan.leftOut) plain += l.share;
  expect(Math.abs(plain - 1)).toBeLessThan(1e-12);
  expect(Math.abs(plan.accounting.total - 1)).toBeLessThan(1e-12);
  expect(Math.abs(plan.accounting.timeTotal - 1)).toBeLessThan(1e-12);
  const seen = new Set<number>();
  for (const t of plan.testCases) for (const m of t.members) {
    expect(seen.has(m.index)).toBe(false);
    seen.add(m.index);
  }
}

/** Minimal RFC 4180 reader for checking plan.csv. */
function readCsv(text: string): string[][] {
  const rows: string[][] = [];
  let row: string[] = [];
  let cell = "";
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const ch = text[i]!;
    if (quoted) {
      if (ch === '"' && text[i + 1] === '"') {
        cell += '"';
        i++;
      } else if (ch === '"') quoted = false;
      else cell += ch;
    } else if (ch === '"') quoted = true;
    else if (ch === ",") {
      row.push(cell);
      cell = "";
    } else if (ch === "\n") {
      row.push(cell);
      rows.push(row);
      row = [];
      cell = "";
    } else cell += ch;
  }
  return rows;
}

describe("buildTestPlan on a hand-built catalogue", () => {
  // Cluster 0: scenarios 0–3 (medoid 1), scenario 2 critical (TTC 0.9 s). Cluster 1: 4–5 (medoid 5).
  // Scenario 6 is noise. km: 1, 2, 0.5, 1.5, 3, 1, 1 (total 10); 10 s each.
  const km = [1, 2, 0.5, 1.5, 3, 1, 1];
  const base = (i: number, over: Partial<Scenario> = {}): Scenario =>
    makeScenario(i, { egoTrack: i < 4 ? 1 : 2, window: i, km: km[i]!, ...over });
  const scenarios = [
    base(0),
    base(1),
    base(2, { criticality: { minTtc: 0.9, minThw: 1, maxDrac: 4, maxDecel: 3, flags: ["ttc"] } }),
    base(3),
    base(4, { lateral: ["lane-change-left"] }),
    base(5, { lateral: ["lane-change-left"] }),
    base(6, { lateral: ["lane-change-right"], longitudinal: ["decelerate"] }),
  ];
  const labels = Int32Array.from([0, 0, 0, 0, 1, 1, -1]);
  const medoids = Int32Array.from([1, 5]);
  const embedding = { data: Float64Array.from([0, 0, 1, 0, 5, 5, 2, 0, 10, 10, 10, 11, 30, 30]), rows: 7, cols: 2 };
  const input = { scenarios, labels, medoids, embedding, clusterMethod: "dbscan" };

  it("without a budget: one medoid per cluster plus the critical and the rare scenario, shares by hand", () => {
    const plan = buildTestPlan(input);
    expect(plan.schemaVersion).toBe(PLAN_SCHEMA_VERSION);
    // Order: representatives by cluster km (cluster 0: 5 km, cluster 1: 4 km), then critical, then rare.
    expect(plan.testCases.map((t) => [t.scenarioIndex, t.role])).toEqual([
      [1, "representative"],
      [5, "representative"],
      [2, "critical"],
      [6, "rare"],
    ]);
    const [m0, m1, crit, rare] = plan.testCases;
    // The critical scenario is pulled out of cluster 0, so the medoid stands for 0, 1, 3: 4.5 of 10 km.
    expect(m0!.share).toBeCloseTo(0.45, 14);
    expect(m0!.memberCount).toBe(3);
    expect(m1!.share).toBeCloseTo(0.4, 14);
    expect(crit!.share).toBeCloseTo(0.05, 14);
    expect(rare!.share).toBeCloseTo(0.1, 14);
    expect(rare!.reasons).toContain("rare: DBSCAN noise (recurs in no cluster)");
    expect(crit!.reasons[0]).toBe("critical: min TTC 0.9 s < 1.5 s");
    expect(plan.leftOut).toEqual([]);
    checkAccounting(plan, 7);
    // Members nearest first with Euclidean distances in the embedding; own scenario first at 0.
    expect(m0!.members.map((m) => [m.index, m.distance])).toEqual([
      [1, 0],
      [0, 1],
      [3, 1],
    ]);
    // Rate: 3 occurrences in 10 km → 300 per 1000 km with the Garwood interval scaled by 100.
    expect(m0!.standsFor.ratePer1000km.rate).toBeCloseTo(300, 10);
    expect(m0!.standsFor.ratePer1000km.upper).toBeCloseTo(poissonInterval(3).upper * 100, 9);
    expect(m0!.criticality.minTtc).toBeNull(); // Infinity → null
    expect(plan.totals).toEqual({ scenarios: 7, km: 10, hours: 70 / 3600, drives: 2, recordings: 1 });
    expect(plan.exposureTable.map((r) => r.cluster)).toEqual([0, 1, -1]);
  });

  it("budget 3: the critical and rare scenarios stay, one representative fits, the rest is left out", () => {
    const plan = buildTestPlan(input, { budget: 3 });
    expect(plan.testCases.map((t) => t.scenarioIndex)).toEqual([1, 2, 6]);
    expect(plan.leftOut).toEqual([
      expect.objectContaining({ cluster: 1, medoidIndex: 5, reason: "budget", scenarios: 2, critical: 0 }),
    ]);
    expect(plan.leftOut[0]!.share).toBeCloseTo(0.4, 14);
    expect(plan.accounting.leftOutShare).toBeCloseTo(0.4, 14);
    expect(plan.selection.budgetExceeded).toBe(false);
    checkAccounting(plan, 7);
  });

  it("budget 1: the must-keep scenarios exceed it, are kept anyway, and the plan says so", () => {
    const plan = buildTestPlan(input, { budget: 1 });
    expect(plan.testCases.map((t) => t.scenarioIndex)).toEqual([2, 6]);
    expect(plan.selection.budgetExceeded).toBe(true);
    expect(plan.warnings.join(" ")).toMatch(/budget of 1 test cases was exceeded/);
    expect(plan.summary).toMatch(/budget of 1 test cases was exceeded/);
    expect(plan.leftOut.map((l) => l.cluster)).toEqual([0, 1]);
    // Cluster 0 without its critical member: 4.5 km left out.
    expect(plan.leftOut[0]!.share).toBeCloseTo(0.45, 14);
    checkAccounting(plan, 7);
  });

  it("targetShare: representatives are added by share until the target is reached", () => {
    // Must-keep: 0.05 + 0.1 = 0.15; cluster 0 adds 0.45 → 0.60 ≥ 0.5, so cluster 1 is left out.
    const plan = buildTestPlan(input, { targetShare: 0.5 });
    expect(plan.testCases.map((t) => t.scenarioIndex)).toEqual([1, 2, 6]);
    expect(plan.leftOut[0]!.reason).toBe("target share reached");
    const all = buildTestPlan(input, { targetShare: 0.61 });
    expect(all.testCases.length).toBe(4);
    // weightBy hours: every scenario lasts 10 s, so cluster 0 (4 scenarios) outweighs cluster 1 (2).
    const byTime = buildTestPlan(input, { targetShare: 0.5, weightBy: "hours" });
    expect(byTime.testCases[0]!.scenarioIndex).toBe(1);
  });

  it("a critical medoid is a critical test case and is kept at any budget", () => {
    const sc = scenarios.map((s, i) => (i === 5 ? { ...s, criticality: { ...s.criticality, minThw: 0.2 } } : s));
    const plan = buildTestPlan({ ...input, scenarios: sc }, { budget: 1 });
    const t5 = plan.testCases.find((t) => t.scenarioIndex === 5)!;
    expect(t5.role).toBe("critical");
    expect(t5.reasons).toEqual(["medoid of cluster 1", "critical: min time headway 0.2 s < 0.5 s"]);
    expect(t5.memberCount).toBe(2);
    checkAccounting(plan, 7);
  });

  it("includeNoise: false leaves noise out with its own reason; without an embedding distances are null", () => {
    const plan = buildTestPlan({ scenarios, labels, medoids, clusterMethod: "kmeans" }, { includeNoise: false, includeSingletonTypes: false });
    expect(plan.testCases.map((t) => t.scenarioIndex)).toEqual([1, 5, 2]);
    expect(plan.leftOut).toEqual([expect.objectContaining({ cluster: -1, reason: "noise not kept (includeNoise: false)", scenarios: 1 })]);
    expect(plan.testCases[0]!.members.map((m) => m.distance)).toEqual([0, null, null]);
    const withD = buildTestPlan({ scenarios, labels, medoids, distances: Float64Array.from([1, 0, 7, 1, 14, 0, 0]), clusterMethod: "kmeans" });
    expect(withD.testCases[0]!.members.map((m) => m.distance)).toEqual([0, 1, 1]);
    checkAccounting(plan, 7);
  });

  it("rejects inconsistent input and bad options with messages that quote the value", () => {
    expect(() => buildTestPlan({ ...input, labels: Int32Array.from([0, 1]) })).toThrow(InputError);
    expect(() => buildTestPlan({ ...input, medoids: Int32Array.from([4, 5]) })).toThrow(/medoids\[0\]=4 is not a member of cluster 0/);
    expect(() => buildTestPlan(input, { budget: 0 })).toThrow(/budget=0 should be an integer >= 1/);
    expect(() => buildTestPlan(input, { targetShare: 1.5 })).toThrow(/targetShare=1.5/);
    expect(() => buildTestPlan(input, { criticalPolicy: "some" as never })).toThrow(/criticalPolicy="some"/);
    expect(() => buildTestPlan({ ...input, scenarios: [] })).toThrow(/catalogue is empty/);
    expect(() => buildTestPlan({ ...input, embedding: { data: new Float64Array(4), rows: 2, cols: 2 } })).toThrow(/embedding has 2 rows/);
  });

  it("a cluster without a medoid gets the member nearest its mean, with a warning", () => {
    const plan = buildTestPlan({ ...input, medoids: Int32Array.from([-1, 5]) });
    expect(plan.testCases[0]!.scenarioIndex).toBe(3);
    expect(plan.warnings.join(" ")).toMatch(/cluster 0 came without a medoid/);
  });
});

describe("critical policy", () => {
  // One cluster of 6, medoid 0; scenarios 2, 3, 4 critical with the same type key; 5 critical, other key.
  const crit = (ttc: number): Partial<Scenario> => ({ criticality: { minTtc: ttc, minThw: 1, maxDrac: 3, maxDecel: 2, flags: [] } });
  const scenarios = [
    makeScenario(0),
    makeScenario(1),
    makeScenario(2, crit(1.2)),
    makeScenario(3, crit(0.7)),
    makeScenario(4, crit(1.0)),
    makeScenario(5, { ...crit(1.4), lateral: ["lane-change-left"] }),
    makeScenario(6, { lateral: ["lane-change-left"] }),
  ];
  const labels = new Int32Array(7);
  const medoids = Int32Array.from([0]);

  it("'each' makes every critical scenario a test case of its own, most critical first", () => {
    const plan = buildTestPlan({ scenarios, labels, medoids, clusterMethod: "kmeans" });
    expect(plan.testCases.filter((t) => t.role === "critical").map((t) => t.scenarioIndex)).toEqual([3, 4, 2, 5]);
  });

  it("'most-critical-per-type' groups by cluster and type key under the most critical one", () => {
    const plan = buildTestPlan({ scenarios, labels, medoids, clusterMethod: "kmeans" }, { criticalPolicy: "most-critical-per-type" });
    const critical = plan.testCases.filter((t) => t.role === "critical");
    expect(critical.map((t) => t.scenarioIndex)).toEqual([3, 5]);
    expect(critical[0]!.members.map((m) => m.index).sort()).toEqual([2, 3, 4]);
    expect(critical[0]!.members.every((m) => m.critical)).toBe(true);
    checkAccounting(plan, 7);
  });

  it("a critical medoid of the same type key stands for the critical scenarios of its type", () => {
    const sc = scenarios.map((s, i) => (i === 0 ? { ...s, ...crit(1.3) } as Scenario : s));
    const plan = buildTestPlan({ scenarios: sc, labels, medoids, clusterMethod: "kmeans" }, { criticalPolicy: "most-critical-per-type", budget: 1 });
    expect(plan.testCases.map((t) => t.scenarioIndex)).toEqual([0, 5]);
    expect(plan.testCases[0]!.members.map((m) => m.index).sort()).toEqual([0, 1, 2, 3, 4, 6]);
    checkAccounting(plan, 7);
  });
});

describe("planted critical events (generated traffic)", () => {
  const cat = plantedCatalogue(20240611);
  const budgets: TestPlanOptions[] = [{ budget: 1 }, { budget: 2 }, { budget: 4 }, { budget: 7 }, { budget: 12 }, {}, { targetShare: 0.3 }, { targetShare: 0.95 }];

  it("every planted critical event appears in the plan at every budget, under both policies", () => {
    for (const policy of ["each", "most-critical-per-type"] as const)
      for (const b of budgets) {
        const plan = buildTestPlan(
          { scenarios: cat.scenarios, labels: cat.labels, medoids: cat.medoids, embedding: cat.embedding, clusterMethod: "dbscan" },
          { ...b, criticalPolicy: policy },
        );
        const asCase = new Set(plan.testCases.map((t) => t.scenarioIndex));
        const inCritical = new Set(plan.testCases.filter((t) => t.criticality.critical).flatMap((t) => t.members.map((m) => m.index)));
        for (const p of cat.planted) {
          if (policy === "each") expect(asCase.has(p)).toBe(true);
          else expect(inCritical.has(p)).toBe(true);
        }
        expect(plan.leftOut.every((l) => l.critical === 0)).toBe(true);
        checkAccounting(plan, cat.scenarios.length);
        if (b.budget !== undefined) {
          const reps = plan.testCases.filter((t) => t.role === "representative").length;
          expect(plan.testCases.length <= b.budget || plan.selection.budgetExceeded).toBe(true);
          expect(reps).toBe(Math.max(0, Math.min(4, b.budget - plan.selection.mustKeep)));
        }
      }
  });

  it("the same input gives byte-identical plan.json and plan.csv", async () => {
    const run = async (dir: string): Promise<Buffer[]> => {
      const plan = buildTestPlan(
        {
          scenarios: cat.scenarios,
          labels: cat.labels,
          medoids: cat.medoids,
          embedding: cat.embedding,
          clusterMethod: "dbscan",
          provenance: { seed: 42, inputChecksums: { "b.csv": "bb", "a.csv": "aa" }, upstream: { eps: 0.5, minPts: 5 } },
        },
        { budget: 5 },
      );
      const paths = await writeTestPlan(plan, join(tmp, dir));
      expect(paths.map((p) => p.slice(-9))).toEqual(["plan.json", "/plan.csv"]);
      return paths.map((p) => readFileSync(p));
    };
    const [a, b] = [await run("one"), await run("two")];
    expect(a[0]!.equals(b[0]!)).toBe(true);
    expect(a[1]!.equals(b[1]!)).toBe(true);
    const parsed = JSON.parse(a[0]!.toString("utf8")) as TestPlan;
    expect(parsed.provenance).toMatchObject({ tool: "roadsieve", version: VERSION, seed: 42, createdAt: null, clusterMethod: "dbscan" });
    expect(Object.keys(parsed.provenance.inputChecksums)).toEqual(["a.csv", "b.csv"]);
    expect((parsed.provenance.options as { budget: number }).budget).toBe(5);
    // Shares read back from the file still add up to 1 within 1e-12.
    const sum = parsed.testCases.reduce((s, t) => s + t.share, 0) + parsed.leftOut.reduce((s, l) => s + l.share, 0);
    expect(Math.abs(sum - 1)).toBeLessThan(1e-12);
    expect(a[0]!.toString("utf8")).not.toMatch(/Infinity|NaN/);
  });
});

describe("plan exports", () => {
  const cat = plantedCatalogue(7);
  const plan = buildTestPlan({ scenarios: cat.scenarios, labels: cat.labels, medoids: cat.medoids, embedding: cat.embedding, clusterMethod: "dbscan" }, { budget: 8 });

  it("plan.csv has the documented columns and one row per test case, quoted where needed", () => {
    const rows = readCsv(testPlanToCsv(plan));
    expect(rows[0]).toEqual([...PLAN_CSV_COLUMNS]);
    expect(rows.length).toBe(plan.testCases.length + 1);
    const col = (name: string): number => rows[0]!.indexOf(name);
    plan.testCases.forEach((t, i) => {
      const r = rows[i + 1]!;
      expect(r[col("test_case")]).toBe(t.id);
      expect(r[col("type_key")]).toBe(t.typeKey);
      expect(Number(r[col("share")])).toBe(t.share);
      expect(r[col("min_ttc_s")]).toBe(t.criticality.minTtc === null ? "" : String(t.criticality.minTtc));
    });
  });

  it("planSummary states what the test cases stand for, the unseen mass and the cautions", () => {
    const text = planSummary(plan);
    expect(text).toMatch(/^\d+ test cases stand for [\d.]+ % of the recorded vehicle-kilometres/);
    expect(text).toMatch(/chance that a new scenario is of a type not yet in the catalogue is [\d.]+ %/);
    expect(text).toMatch(/not a safety argument on their own/);
    expect(text).toMatch(/ISO 26262, ISO 21448/);
    expect(text).toMatch(/would need about [\d.]+ million km without an event/);
  });

  const schemaPython = referencePython() !== null && spawnSync(referencePython()!, ["-c", "import jsonschema"]).status === 0 ? referencePython() : null;
  // Since schema 2.0.0 the cluster plan of buildTestPlan is plan.json's "exploration" part: it is checked against that definition.
  it.skipIf(!schemaPython)(`the cluster plan validates against docs/plan.schema.json#/$defs/explorationPlan (python jsonschema, draft 2020-12)${schemaPython ? "" : " (skipped: /usr/bin/python3 with python3-jsonschema is missing)"}`, () => {
    const py = schemaPython!;
    const file = join(tmp, "schema-check.json");
    const plans = [plan, buildTestPlan({ scenarios: cat.scenarios, labels: cat.labels, medoids: cat.medoids, clusterMethod: "dbscan" }, { includeNoise: false, zeroFailureReferencePerKm: null })];
    for (const p of plans) {
      writeFileSync(file, testPlanToJson(p));
      const r = spawnSync(
        py,
        [
          "-c",
          `import json, sys, jsonschema
schema = json.load(open(sys.argv[1])); doc = json.load(open(sys.argv[2]))
jsonschema.Draft202012Validator.check_schema(schema)
schema = {"$ref": "#/$defs/explorationPlan", "$defs": schema["$defs"]}
errs = sorted(jsonschema.Draft202012Validator(schema).iter_errors(doc), key=lambda e: list(e.path))
print(json.dumps([f"{list(e.path)}: {e.message}" for e in errs[:10]]))`,
          fileURLToPath(new URL("../docs/plan.schema.json", import.meta.url)),
          file,
        ],
        { encoding: "utf8" },
      );
      expect(r.status, r.stderr).toBe(0);
      expect(JSON.parse(r.stdout)).toEqual([]);
    }
    // The validator does reject a drifted document (an undocumented field, a share as a string).
    const bad = JSON.parse(testPlanToJson(plan)) as Record<string, unknown> & { testCases: Record<string, unknown>[] };
    bad.extra = 1;
    bad.testCases[0]!.share = "0.5";
    writeFileSync(file, JSON.stringify(bad));
    const r = spawnSync(
      py,
      ["-c", "import json,sys,jsonschema; s=json.load(open(sys.argv[1])); s={'$ref': '#/$defs/explorationPlan', '$defs': s['$defs']}; d=json.load(open(sys.argv[2])); print(len(list(jsonschema.Draft202012Validator(s).iter_errors(d))))", fileURLToPath(new URL("../docs/plan.schema.json", import.meta.url)), file],
      { encoding: "utf8" },
    );
    expect(Number(r.stdout.trim())).toBe(2);
  });
});

describe("formatPercent", () => {
  it("never rounds a share just below 1 up to 100 %", async () => {
    const { formatPercent } = await import("../src/plan/index.js");
    expect(formatPercent(1)).toBe("100 %");
    expect(formatPercent(0.99996)).toBe("99.996 %");
    expect(formatPercent(0.873)).toBe("87.3 %");
    expect(formatPercent(0.000412)).toBe("0.0412 %");
  });
});

describe("criticalReasons", () => {
  it("names each crossed threshold; a cut-in counts with a tighter-than-1 s headway", async () => {
    const { criticalReasons, resolveTestPlanOptions } = await import("../src/plan/index.js");
    const o = resolveTestPlanOptions();
    const calm = makeScenario(0, { criticality: { minTtc: 4, minThw: 0.8, maxDrac: 1, maxDecel: 2, flags: ["thw"] } });
    expect(criticalReasons(calm, o)).toEqual([]);
    const cutIn = { ...calm, events: [{ kind: "cut-in" as const, t: 1, other: 9 }] };
    expect(criticalReasons(cutIn, o)).toEqual(["critical: cut-in with min time headway 0.8 s < 1 s"]);
    expect(criticalReasons(cutIn, resolveTestPlanOptions({ cutInThwBelow: 0 }))).toEqual([]);
    const hard = makeScenario(1, { criticality: { minTtc: 1.2, minThw: 0.4, maxDrac: 6, maxDecel: 4.5, flags: ["thw"] } });
    expect(criticalReasons(hard, resolveTestPlanOptions({ criticalFlags: ["thw"] }))).toEqual([
      "critical: min TTC 1.2 s < 1.5 s",
      "critical: min time headway 0.4 s < 0.5 s",
      "critical: peak deceleration 4.5 m/s² > 4 m/s²",
      'critical: flag "thw"',
    ]);
  });
});
