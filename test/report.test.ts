import { describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { buildReport } from "../src/report/buildReport.js";
import { escapeHtml, renderHtml, scriptJson } from "../src/report/html.js";
import { scenarioMapFigure } from "../src/report/scenarioMapFigure.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";

const traffic = generateTraffic({ vehicleKm: 20, recordingId: "report-test" }, new Rng(2));
const result = runPipeline([traffic.recording], { seed: 1, map: "pca", k: 4 });
const html = renderHtml(buildReport(result, "Report <test> & checks"));

describe("renderHtml(buildReport(result))", () => {
  it("is self-contained: plotly is inlined and nothing is fetched from the network", () => {
    expect(html).toContain("Plotly");
    expect(html.length).toBeGreaterThan(3_000_000); // the plotly bundle itself
    expect(html).not.toMatch(/<script[^>]+src=/i);
    expect(html).not.toMatch(/<link[^>]+href=["']https?:/i);
  });

  it("carries every figure as data: the map with one diamond per test case and the km-share chart", () => {
    const m = /<script type="application\/json" id="roadsieve-figures">([\s\S]*?)<\/script>/.exec(html);
    expect(m).not.toBeNull();
    const figs = JSON.parse(m![1]!) as { id: string; figure: { data: { name?: string; x?: unknown[] }[]; layout: { title: { text: string } } } }[];
    const titles = figs.map((f) => f.figure.layout.title.text);
    expect(titles.some((t) => t.startsWith("Scenario map"))).toBe(true);
    expect(titles.some((t) => t.startsWith("What each test case stands for"))).toBe(true);
    const map = figs.find((f) => f.figure.layout.title.text.startsWith("Scenario map"))!;
    const diamonds = map.figure.data.find((d) => d.name?.startsWith("test cases"))!;
    expect(diamonds.x!.length).toBe(result.plan.exploration.testCases.length); // the map marks the exploration view's test cases
    for (const f of figs) expect(html).toContain(`<div id="${f.id}" class="plot">`);
  });

  it("shows the cautions and escapes text", () => {
    expect(html).toContain("not a safety argument on their own");
    expect(html).toContain("ISO 26262");
    expect(html).toContain("ISO 21448");
    expect(html).toContain("<title>Report &lt;test&gt; &amp; checks</title>");
    expect(escapeHtml(`<a href="x">'&'</a>`)).toBe("&lt;a href=&quot;x&quot;&gt;&#39;&amp;&#39;&lt;/a&gt;");
    expect(scriptJson({ s: "</script><script>alert(1)</script>" })).not.toContain("</script>");
  });

  it("is deterministic", () => {
    expect(renderHtml(buildReport(result, "Report <test> & checks"))).toBe(html);
  });
});

describe("scenarioMapFigure", () => {
  it("checks its input shapes and quotes the offending sizes", () => {
    const coords = { data: new Float64Array(6), rows: 3, cols: 2 };
    expect(() => scenarioMapFigure({ coords, labels: new Int32Array(2), representatives: [], method: "pca" })).toThrow("labels.length=2 should equal coords.rows=3");
    expect(() => scenarioMapFigure({ coords: { data: new Float64Array(9), rows: 3, cols: 3 }, labels: new Int32Array(3), representatives: [], method: "pca" })).toThrow("coords.cols=3 should be 2");
  });
});
