import { describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { buildReport } from "../src/report/buildReport.js";
import { escapeHtml, renderHtml, scriptJson } from "../src/report/html.js";
import { scenarioMapFigure } from "../src/report/scenarioMapFigure.js";
import { ALERT_COLOUR, PALETTE } from "../src/report/figure.js";
import { foldRepeatedColumns } from "../src/report/foldColumns.js";
import { describeTypeKey } from "../src/report/describe.js";
import { resolveTestPlanOptions } from "../src/plan/options.js";
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
    expect(titles.some((t) => t.startsWith("Map of similarity"))).toBe(true);
    expect(titles.some((t) => t.startsWith("What each test case stands for"))).toBe(true);
    const map = figs.find((f) => f.figure.layout.title.text.startsWith("Map of similarity"))!;
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

/** The figures of a rendered report, parsed back from its JSON data. */
function figuresOf(page: string): { id: string; figure: { data: Record<string, unknown>[]; layout: Record<string, any> } }[] {
  return JSON.parse(/<script type="application\/json" id="roadsieve-figures">([\s\S]*?)<\/script>/.exec(page)![1]!);
}

describe("report readability", () => {
  const doc = buildReport(result);
  const figs = figuresOf(html);
  // The cluster view (plan.exploration) is what the test-case, cluster and criticality sections show.
  const plan = result.plan.exploration;

  it("each test case row says why it is in the plan, with the rule and the measured figure", () => {
    const sec = doc.sections.find((s) => s.id === "test-cases")!;
    const t = sec.tables![0]!;
    const why = t.columns.indexOf("why it is in the plan");
    expect(why).toBeGreaterThan(0);
    for (const [i, tc] of plan.testCases.entries()) {
      const cell = t.rows[i]![why] as { lines: string[] };
      // Every critical reason of the plan (rule and figure, e.g. "peak deceleration 6.94 m/s² > 4 m/s²") is shown as is.
      for (const r of tc.reasons.filter((x) => x.startsWith("critical:"))) expect(cell.lines).toContain(r);
      if (tc.role === "representative") expect(cell.lines.join(" ")).toMatch(/closest to all \d+ in it/);
    }
    // The hardest-braking column exists, so a case critical for braking does not look harmless.
    expect(t.columns).toContain("hardest braking (m/s²)");
  });

  it("draws the thresholds the plan used on the criticality chart, with a legend entry per rule", () => {
    const o = resolveTestPlanOptions(result.options.plan);
    const crit = figs.find((f) => String(f.figure.layout.title.text).startsWith("How close"))!;
    const xs = (crit.figure.layout.shapes as { x0: number; xref: string }[]).filter((s) => s.xref === "x").map((s) => s.x0);
    const ys = (crit.figure.layout.shapes as { y0: number; yref: string }[]).filter((s) => s.yref === "y").map((s) => s.y0);
    expect(xs).toContain(o.thwBelow);
    expect(xs).toContain(o.cutInThwBelow);
    expect(ys).toEqual([o.ttcBelow]);
    expect(crit.figure.layout.showlegend).toBe(true);
    expect(crit.figure.layout.xaxis.ticktext.length).toBeGreaterThan(3); // labelled log ticks
    // Critical points by trace add up to the plan's count of critical scenarios.
    const critical = crit.figure.data.filter((d) => String(d.name).startsWith("critical")).reduce((a, d) => a + (d.x as unknown[]).length, 0);
    expect(critical).toBe(plan.selection.criticalScenarios);
  });

  it("fits the silhouette axis to the silhouettes and the discovery axis to the curves", () => {
    const k = figs.find((f) => String(f.figure.layout.title.text).startsWith("Choosing the number"));
    if (k) {
      const sil = result.sweep!.rows.map((r) => r.silhouette);
      const [lo, hi] = k.figure.layout.yaxis.range as [number, number];
      expect(lo).toBeLessThanOrEqual(Math.min(...sil));
      expect(hi).toBeGreaterThanOrEqual(Math.max(...sil));
      expect(hi - lo).toBeLessThan(2 * (Math.max(...sil) - Math.min(...sil)) + 1e-9);
    }
    const d = figs.find((f) => String(f.figure.layout.title.text).startsWith("Catalogue discovery"))!;
    const top = (d.figure.layout.yaxis.range as number[])[1]!;
    const curveMax = Math.max(...d.figure.data.flatMap((t) => t.y as number[]));
    expect(top).toBeGreaterThanOrEqual(curveMax);
    expect(top).toBeLessThanOrEqual(1.2 * curveMax);
  });

  it("keeps red for critical markers: no cluster colour is close to it", () => {
    const rgb = (h: string): number[] => [1, 3, 5].map((i) => parseInt(h.slice(i, i + 2), 16));
    const a = rgb(ALERT_COLOUR);
    // Euclidean RGB distance above 100 (of 441): clearly another colour (common practice for a quick check).
    for (const c of PALETTE) expect(Math.hypot(...rgb(c).map((v, i) => v - a[i]!)), c).toBeGreaterThan(100);
  });

  it("lists the plan's warnings, the same list as plan.json", () => {
    // plan.json is the plan of logical scenarios (schema 2); its warnings hold every warning of the run.
    const w = doc.sections.find((s) => s.id === "warnings")!;
    expect(w.bullets).toEqual(result.plan.warnings);
    expect(result.warnings).toEqual(result.plan.warnings);
    for (const rw of result.recordings[0]!.warnings) expect(result.plan.warnings).toContain(`${result.recordings[0]!.id}: ${rw}`);
  });
});

describe("foldRepeatedColumns", () => {
  it("folds a column that repeats one value for most rows into a sentence naming the exceptions (worked example)", () => {
    const rows = Array.from({ length: 10 }, (_, i) => [`T${i}`, i === 3 ? "E4" : "E2", i]);
    const t = foldRepeatedColumns({ columns: ["id", "class", "n"], rows });
    expect(t.columns).toEqual(["id", "n"]);
    expect(t.notes).toEqual(["class: E2 for 9 of 10 rows; the others: T3: E4."]);
    expect(t.rows[3]).toEqual(["T3", 3]);
    // Below the share (7 of 10 < 0.8) the column stays.
    const kept = foldRepeatedColumns({ columns: ["id", "class"], rows: rows.map((r, i) => [r[0]!, i < 3 ? "E4" : "E2"]) });
    expect(kept.columns).toEqual(["id", "class"]);
  });
});

describe("describeTypeKey", () => {
  it("puts every part of a type key in words, and tells a cut sequence from a set", () => {
    expect(describeTypeKey("LCL>LCR|A+D|occ:ahead,left|ev:overtaken,harsh-braking")).toBe(
      "lane changes left, then right; speeds up and slows down; neighbours ahead and left; overtaken, harsh-braking",
    );
    expect(describeTypeKey("LCL>LCR>LCL…|K|occ:-|ev:-")).toBe("lane changes left, then right, then left, then more; steady speed; no neighbours");
  });
});

describe("the slot for the logical-scenario section", () => {
  it("renders the plan of logical scenarios right after the cautions, registered lead sections first, then the cluster view", () => {
    const lead = (p: { logicalScenarios?: readonly unknown[] }) => ({ id: "lead", heading: "Lead", paragraphs: [`${p.logicalScenarios!.length} logical scenarios`] });
    const doc = buildReport(result, { leadSections: [lead, () => "<p>ready-made section HTML</p>"] });
    const ids = doc.sections.map((s) => s.id);
    expect(ids.slice(0, 5)).toEqual(["summary", "cautions", "lead", "logical-1", "classes"]);
    expect(ids.indexOf("logical-scenarios")).toBeLessThan(ids.indexOf("test-cases"));
    expect(doc.sections[2]!.paragraphs).toEqual([`${result.plan.logicalScenarios.length} logical scenarios`]);
    expect(renderHtml(doc)).toContain("<p>ready-made section HTML</p>");
    // Without registered sections the logical sections follow the cautions directly.
    expect(buildReport(result).sections.map((s) => s.id).slice(0, 3)).toEqual(["summary", "cautions", "classes"]);
  });
});
