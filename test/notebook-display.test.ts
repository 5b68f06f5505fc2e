/**
 * The notebook adapter's rich display, outside a kernel: the HTML a plan, a table and a logical
 * scenario show as, and the inspection hook that makes a cell's last value show that way while every
 * other value prints exactly as before.
 */
import { inspect } from "node:util";
import { describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { enableRichDisplay, richHtml, tableHtml } from "../src/report/notebook.js";
import { reasonInWords } from "../src/report/describe.js";
import { escapeHtml } from "../src/report/html.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";

const traffic = generateTraffic({ vehicleKm: 10, hardBrakingRate: 0.2, recordingId: "notebook-test" }, new Rng(5));
const result = runPipeline([traffic.recording], { seed: 1, map: "pca", k: 3 });

describe("rich display", () => {
  it("shows the plan of logical scenarios (schema 2) as its summary, the logical scenarios and the concrete test cases", () => {
    const html = richHtml(result.plan)!;
    expect(html).not.toBeNull();
    for (const l of result.plan.logicalScenarios) expect(html).toContain(`<td>${escapeHtml(l.id)}</td>`);
    for (const t of result.plan.testCases.slice(0, 15)) expect(html).toContain(`<td>${escapeHtml(t.id)}</td>`);
    expect(richHtml(result)).toBe(html); // a pipeline result shows as its plan
  });

  it("shows a cluster-view plan as its summary and a table of test cases with why each is there", () => {
    const html = richHtml(result.plan.exploration)!;
    expect(html).not.toBeNull();
    for (const t of result.plan.exploration.testCases.slice(0, 15)) {
      expect(html).toContain(`<td>${t.id}</td>`);
      // Critical reasons (the rule and the measured figure) are shown as the plan states them; the
      // others in plain words.
      for (const r of t.reasons) expect(html).toContain(escapeHtml(r.startsWith("critical:") ? r : reasonInWords(r, undefined, t.memberCount)));
      if (t.role === "rare") expect(html).toMatch(/rare: (like no dense group|the only scenario of its type key)/);
    }
  });

  it("shows a table and a logical scenario (plan schema 2 shape) as tables, and nothing else", () => {
    expect(tableHtml({ columns: ["a", "b"], rows: [["<x>", 2]] })).toContain("<td>&lt;x&gt;</td><td class=\"num\">2</td>");
    const ls = {
      id: "LS-1", classId: "following", className: "following a leader", name: "following", share: 0.4, scenarios: 12,
      parameters: [{ name: "thw", unit: "s", description: "time headway", min: 0.6, max: 3, p05: 0.8, p50: 1.5, p95: 2.6, measurable: 12 }],
    };
    const html = richHtml(ls)!;
    expect(html).toContain("<td>thw</td><td>s</td><td>0.60</td><td>0.80</td><td>1.50</td><td>2.60</td><td>3.00</td>");
    expect(richHtml({ a: 1 })).toBeNull();
    expect(richHtml([1, 2])).toBeNull();
  });

  it("the inspection hook leaves every other value's text as it was, and is invisible to keys and JSON", () => {
    const before = [inspect({ a: 1, b: [1, 2] }), inspect(new Map([[1, 2]])), inspect([{ x: 1 }])];
    enableRichDisplay();
    expect([inspect({ a: 1, b: [1, 2] }), inspect(new Map([[1, 2]])), inspect([{ x: 1 }])]).toEqual(before);
    expect(Object.keys({})).toEqual([]);
    expect(JSON.stringify({ a: 1 })).toBe('{"a":1}');
    // Outside a kernel, a plan falls back to its plain text.
    expect(inspect(result.plan.selection)).toContain("testCases");
  });
});
