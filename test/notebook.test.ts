import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import * as api from "../src/index.js";
import { clusteringModelToJson } from "../src/cluster/clusteringModel.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { planToJson } from "../src/plan/writePlan.js";
import { readRecording } from "../src/recording/readRecording.js";
import { OUTSIDE_JUPYTER } from "../src/report/notebook.js";

const root = join(import.meta.dirname, "..");
const source = readFileSync(join(root, "scripts/notebook-src/01-recordings-to-test-plan.txt"), "utf8");
const dir = mkdtempSync(join(tmpdir(), "roadsieve-notebook-"));
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** The notebook's code cells, in order, split as scripts/make-notebook.py splits them. */
function codeCells(text: string): string[] {
  const parts = text.split(/^%% (md|ts)\s*$/m);
  const cells: string[] = [];
  for (let i = 1; i + 1 < parts.length; i += 2) if (parts[i] === "ts") cells.push(parts[i + 1]!.replace(/^\n+|\n+$/g, ""));
  return cells;
}

describe("notebook 01 and runPipeline", () => {
  it("the notebook builds its plan from the pipeline's own stage functions", () => {
    // If the notebook went back to hand-rolled clustering, the comparison below would compare
    // nothing: the plan it writes must come from these calls.
    const code = codeCells(source).join("\n");
    for (const call of ["rs.resolvePipelineOptions(", "rs.extractRecording(", "rs.mergeScenarioSets(", "rs.embedScenarios(", "rs.fitClustering(", "const result = rs.planFromClustering("])
      expect(code, `the notebook should call ${call}`).toContain(call);
    expect(code).toContain("rs.writeOutputs(result,");
  });

  it("its step-by-step path, run as code, writes byte for byte the plan and model of runPipeline with the same seed", async () => {
    const cells = codeCells(source);
    const importLine = 'import * as rs from "../dist/index.js";';
    expect(cells[0]).toContain(importLine);
    const seed = Number(/const seed = (\d+);/.exec(cells[0]!)?.[1]);
    expect(Number.isInteger(seed)).toBe(true);
    const out = join(dir, "out");
    // The cells as they are, in order, in one module: the display calls become no-ops (figures are
    // still built, since they are their arguments), the library comes from src/ instead of dist/,
    // and the output folder is a temporary one. Run from notebooks/ so relative paths hold.
    const body = cells
      .join("\n\n")
      .replace(importLine, "")
      .replaceAll("../notebook-out/01", out);
    const script = `import * as lib from ${JSON.stringify(join(root, "src/index.ts"))};
import { writeFileSync as __write } from "node:fs";
const rs = { ...lib, show: () => {}, showTable: () => {}, showText: () => {}, loadPlotly: () => {} };
${body}
__write(${JSON.stringify(join(dir, "stepwise.plan.json"))}, rs.planToJson(result.plan));
__write(${JSON.stringify(join(dir, "stepwise.model.json"))}, rs.clusteringModelToJson(result.model));
`;
    const file = join(dir, "notebook-01.mts");
    writeFileSync(file, script);
    const r = spawnSync(process.execPath, ["--import", "tsx", file], { cwd: join(root, "notebooks"), encoding: "utf8", timeout: 600_000 });
    expect(r.status, r.stderr).toBe(0);
    expect(r.stdout).toContain("plan.json identical: true");

    // Read the way the notebook reads it (the path as given is the recording's source in the plan).
    const cwd = process.cwd();
    process.chdir(join(root, "notebooks"));
    const rec = await readRecording("../sample-data/orrowind/tracks.parquet").finally(() => process.chdir(cwd));
    const one = runPipeline([rec], { seed });
    const planJson = planToJson(one.plan);
    expect(readFileSync(join(dir, "stepwise.plan.json"), "utf8")).toBe(planJson);
    expect(readFileSync(join(out, "plan.json"), "utf8")).toBe(planJson);
    expect(readFileSync(join(dir, "stepwise.model.json"), "utf8")).toBe(clusteringModelToJson(one.model));
    expect(readFileSync(join(out, "model.json"), "utf8")).toBe(clusteringModelToJson(one.model));
  }, 600_000);

  it("the notebook adapter's advice outside a kernel names functions that exist", () => {
    // Earlier messages pointed to a writeReport() that the library never had.
    expect(() => api.showText("x")).toThrow(OUTSIDE_JUPYTER);
    const named = [...OUTSIDE_JUPYTER.matchAll(/([A-Za-z]+)\(/g)].map((m) => m[1]!);
    expect(named).toEqual(["writeOutputs", "renderHtml", "buildReport"]);
    for (const n of named) expect(typeof (api as Record<string, unknown>)[n], n).toBe("function");
  });
});
