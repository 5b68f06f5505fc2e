import { mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { fileURLToPath } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { writeOutputs } from "../src/pipeline/writeOutputs.js";
import { readRecording } from "../src/recording/readRecording.js";
import type { Recording } from "../src/recording/types.js";
import { FIDELITY_TARGETS, type FidelityRow } from "../src/resim/fidelityTable.js";
import { resimPlanFolder } from "../src/resim/resimPlan.js";
import { TEMPLATE_INPUTS } from "../src/exports/logicalTemplateXml.js";
import { ODR_XSD, OSC_XSD, xsdFailures } from "./helpers/xsd.js";

const SAMPLE = fileURLToPath(new URL("../sample-data/orrowind/tracks.parquet", import.meta.url));
const dir = mkdtempSync(join(tmpdir(), "roadsieve-resim-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

let rec: Recording;
let rows: FidelityRow[];
let recorded: number;
let templated: number;
beforeAll(async () => {
  rec = await readRecording(SAMPLE);
  const result = runPipeline([rec], { map: "pca" });
  recorded = result.plan.testCases.filter((tc) => tc.source !== null).length;
  templated = result.plan.logicalScenarios.filter((ls) => TEMPLATE_INPUTS[ls.classId]).length;
  await writeOutputs(result, dir, { catalogue: false, openScenario: [rec] });
  const res = await resimPlanFolder(dir, [rec], { closedLoop: false, only: (tc) => tc.role === "representative" || tc.role === "critical" });
  rows = res.rows;
}, 600_000);

describe("the sample plan, exported and re-simulated", () => {
  it("every written .xosc and .xodr validates against the official ASAM XSD it declares", () => {
    const osc = join(dir, "openscenario");
    const files = readdirSync(osc);
    const xosc = files.filter((f) => f.endsWith(".xosc")).map((f) => join(osc, f));
    const xodr = files.filter((f) => f.endsWith(".xodr")).map((f) => join(osc, f));
    expect(xodr.length).toBe(1);
    // One replay per recorded test case; templates, value sets and marginals under logical/.
    expect(xosc.length).toBe(recorded);
    expect(readdirSync(join(osc, "logical")).filter((f) => f.endsWith(".xosc")).length).toBe(3 * templated);
    for (const f of xosc) expect(readFileSync(f, "utf8")).toContain(`<LogicFile filepath="${rec.id}.xodr"/>`);
    // Source: the ASAM OpenSCENARIO 1.2.0 and OpenDRIVE 1.6.1 XSDs shipped in standards/.
    expect(xsdFailures(xosc, OSC_XSD)).toEqual([]);
    expect(xsdFailures(xodr, ODR_XSD)).toEqual([]);
  });

  it("replay fidelity on the representatives and critical test cases: speed MAPE <= 0.5 % (common practice), gap MAPE <= 1 %, min THW within 0.05 s", () => {
    expect(rows.length).toBe(recorded);
    expect(recorded).toBeGreaterThan(10);
    const measured = rows.filter((r) => r.replay !== null);
    expect(measured.length).toBe(rows.length);
    for (const r of measured) {
      const f = r.replay!;
      // Gap and THW: every test case (common-practice targets of ours, docs/openscenario.md).
      if (f.gapMape !== null) expect(f.gapMape, r.testCase).toBeLessThanOrEqual(FIDELITY_TARGETS.gapMape);
      if (f.minThwDiff !== null) expect(f.minThwDiff, r.testCase).toBeLessThanOrEqual(FIDELITY_TARGETS.minThwDiff);
      // Speed: 0.5 % MAPE (a figure reported in the trade for re-simulation on synthetic data; common
      // practice, no source). A percentage says little where the ego nearly stops: there the mean
      // absolute error must stay below 0.1 m/s. A window shorter than the smoothing window (2 s, 51
      // frames) cannot be smoothed alike by the chain in source and replay: reported, not judged.
      if (f.frames < 51) continue;
      if ((f.sourceMinSpeed ?? 99) < 5) expect(f.speedMae!, r.testCase).toBeLessThanOrEqual(0.1);
      else expect(f.speedMape!, r.testCase).toBeLessThanOrEqual(FIDELITY_TARGETS.speedMape);
    }
    expect(measured.filter((r) => r.replay!.frames < 51).length).toBeLessThanOrEqual(3);
    expect(measured.filter((r) => (r.replay!.sourceMinSpeed ?? 99) < 5).length).toBeLessThanOrEqual(3);
    // Every re-simulated test case lands back in its own logical scenario (the plan's fitted model).
    expect(rows.map((r) => [r.testCase, r.assignedBack])).toEqual(rows.map((r) => [r.testCase, true]));
    // Representatives: all within every target.
    for (const r of rows.filter((x) => x.role === "representative")) expect(r.withinTargets, r.testCase).toBe(true);
  });

  it("fidelity.csv and fidelity.json are written with one row per re-simulated test case", () => {
    const csv = readFileSync(join(dir, "resim", "fidelity.csv"), "utf8").trim().split("\n");
    expect(csv.length).toBe(rows.length + 1);
    const json = JSON.parse(readFileSync(join(dir, "resim", "fidelity.json"), "utf8")) as { testCases: { id: string; fidelity: { replay: unknown } }[] };
    expect(json.testCases.map((t) => t.id)).toEqual(rows.map((r) => r.testCase));
  });
});
