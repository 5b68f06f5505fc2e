/**
 * The report opened in a real browser (Debian's headless Chromium, driven over the DevTools pipe by
 * test/helpers/chromium.ts), offline and 1280 px wide, as a reader would open out/report.html.
 * Checks: no script errors, every plotly chart drawn with its data points, the first data row of
 * every table visible (not covered by the sticky header), no horizontal scrolling of the page,
 * nothing fetched from the network, every code shown has a legend entry, and the warnings are the
 * same list as plan.json's.
 */
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { pathToFileURL } from "node:url";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { writePlan } from "../src/plan/writePlan.js";
import { buildReport } from "../src/report/buildReport.js";
import { renderHtml } from "../src/report/html.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { Browser, chromiumMissing, type Page } from "./helpers/chromium.js";

const missing = chromiumMissing();
if (missing) console.warn(`report browser test skipped: ${missing}`);

// 40 vehicle-km of the fictional Orrowind Motorway with planted hard braking and tight cut-ins, so
// that every kind of test case (representative, critical, rare) and every chart appear.
const traffic = generateTraffic({ vehicleKm: 40, hardBrakingRate: 0.1, tightCutInRate: 0.1, recordingId: "browser-test" }, new Rng(4));
const result = runPipeline([traffic.recording], { seed: 3, map: "umap" });

const dir = mkdtempSync(join(tmpdir(), "roadsieve-browser-"));
const reportPath = join(dir, "report.html");
let browser: Browser | undefined;
let page: Page | undefined;

/** In-page check: for every table, scroll it into view and ask which element is drawn over the centre of the first data cell. */
const FIRST_ROWS = `(() => [...document.querySelectorAll("table")].map((t, i) => {
  const row = [...t.rows].find((x) => x.querySelector("td"));
  if (!row) return { i, visible: false, why: "no data row" };
  row.scrollIntoView({ block: "center", inline: "start" });
  const wrap = t.closest(".tablewrap");
  if (wrap) wrap.scrollTop = 0;
  const cell = row.cells[0];
  const r = cell.getBoundingClientRect();
  const x = r.left + Math.min(r.width / 2, 20);
  // The row's top edge and its centre must both show the row, not the header drawn over it.
  const hits = [r.top + 3, r.top + r.height / 2].map((y) => document.elementFromPoint(x, y));
  const bad = hits.find((h) => !h || h.closest("tr") !== row);
  return { i, visible: bad === undefined, why: bad ? bad.tagName + " " + (bad.textContent || "").slice(0, 40) : "ok" };
}))()`;

beforeAll(async () => {
  if (missing) return;
  await writePlan(result.plan, dir);
  writeFileSync(reportPath, renderHtml(buildReport(result)));
  browser = await Browser.launch();
  page = await browser.newPage(1280, 900, true);
  await page.goto(pathToFileURL(reportPath).href);
  await page.waitFor(`[...document.querySelectorAll(".plot")].every((e) => e.querySelector(".main-svg"))`);
  // Let plotly finish its second layout pass (legends, autorange).
  await new Promise((r) => setTimeout(r, 500));
});

afterAll(async () => {
  await browser?.close();
  rmSync(dir, { recursive: true, force: true });
});

describe.skipIf(missing !== null)("report.html in headless Chromium (offline, 1280 px)", () => {
  it("runs without script errors and fetches nothing from the network", async () => {
    expect(page!.errors).toEqual([]);
    expect(page!.externalRequests).toEqual([]);
    const external = await page!.evaluate<number>(`document.querySelectorAll("script[src], link[href^='http'], img[src^='http'], iframe").length`);
    expect(external).toBe(0);
  });

  it("draws every plotly chart: an SVG with as many markers, bars and lines as the figure data holds", async () => {
    const figs = JSON.parse(/<script type="application\/json" id="roadsieve-figures">([\s\S]*?)<\/script>/.exec(readFileSync(reportPath, "utf8"))![1]!) as {
      id: string;
      figure: { data: { type?: string; mode?: string; x?: unknown[]; visible?: unknown }[] };
    }[];
    expect(figs.length).toBeGreaterThanOrEqual(6);
    const drawn = await page!.evaluate<{ id: string; svg: boolean; points: number; bars: number; lines: number }[]>(`[...document.querySelectorAll(".plot")].map((e) => ({
      id: e.id,
      svg: !!e.querySelector("svg.main-svg"),
      points: e.querySelectorAll(".scatterlayer path.point").length,
      bars: e.querySelectorAll(".barlayer path").length,
      lines: [...e.querySelectorAll(".scatterlayer path.js-line")].filter((p) => (p.getAttribute("d") || "").length > 2).length,
    }))`);
    expect(drawn.map((d) => d.id)).toEqual(figs.map((f) => f.id));
    for (const f of figs) {
      const d = drawn.find((x) => x.id === f.id)!;
      expect(d.svg, f.id).toBe(true);
      // Expected marks, counted from the data the page was given (no scattergl at this size).
      const markers = f.figure.data.filter((t) => t.type === "scatter" && String(t.mode).includes("markers")).reduce((a, t) => a + (t.x?.length ?? 0), 0);
      const lines = f.figure.data.filter((t) => t.type === "scatter" && String(t.mode).includes("lines") && (t.x?.length ?? 0) > 1).length;
      const bars = f.figure.data.some((t) => t.type === "bar" || t.type === "histogram");
      expect(d.points, `${f.id} markers`).toBe(markers);
      expect(d.lines, `${f.id} lines`).toBeGreaterThanOrEqual(lines);
      if (bars) expect(d.bars, `${f.id} bars`).toBeGreaterThan(0);
      expect(d.points + d.lines + d.bars, `${f.id} has data marks`).toBeGreaterThan(0);
    }
  });

  it("shows the first data row of every table (the sticky header does not cover it)", async () => {
    const rows = await page!.evaluate<{ i: number; visible: boolean; why: string }[]>(FIRST_ROWS);
    expect(rows.length).toBeGreaterThanOrEqual(6);
    for (const r of rows) expect(r, `table ${r.i}: ${r.why}`).toMatchObject({ visible: true });
  });

  it("fits 1280 px: no horizontal page scroll, every chart and table inside the viewport", async () => {
    const m = await page!.evaluate<{ scrollWidth: number; wide: string[] }>(`(() => {
      window.scrollTo(0, 0);
      const wide = [...document.querySelectorAll(".plot, .tablewrap, .legend, figcaption")]
        .map((e) => [e, e.getBoundingClientRect()])
        .filter(([e, r]) => r.left < 0 || r.right > 1280 || r.width < 200)
        .map(([e, r]) => (e.id || e.className) + " " + Math.round(r.left) + ".." + Math.round(r.right));
      return { scrollWidth: document.documentElement.scrollWidth, wide };
    })()`);
    expect(m.scrollWidth).toBeLessThanOrEqual(1280);
    expect(m.wide).toEqual([]);
  });

  it("has a legend entry for every code it shows (type keys, exposure aid, feature names)", async () => {
    const r = await page!.evaluate<{ codes: string[]; legend: string[] }>(`(() => ({
      codes: [...document.querySelectorAll("td code")].map((c) => c.textContent),
      legend: [...document.querySelectorAll(".legend dt code")].map((c) => c.textContent),
    }))()`);
    expect(r.codes.length).toBeGreaterThan(0);
    const legend = new Set(r.legend);
    // Split a shown code into its tokens by the type-key grammar (docs/coverage.md): parts by "|",
    // "occ:" / "ev:" prefixes, items by "," and ">", the cut mark "…"; a set such as "A+D" is one code.
    const tokens = (code: string): string[] => {
      if (!code.includes("|")) return [code];
      const out: string[] = ["|"];
      for (const part of code.split("|")) {
        let p = part;
        for (const prefix of ["occ:", "ev:"])
          if (p.startsWith(prefix)) {
            out.push(prefix);
            p = p.slice(prefix.length);
          }
        if (p.endsWith("…")) {
          out.push("…");
          p = p.slice(0, -1);
        }
        if (p.includes(">")) out.push(">");
        out.push(...p.split(/[,>]/));
      }
      return out;
    };
    const unexplained = new Set<string>();
    for (const c of r.codes) for (const t of tokens(c)) if (!legend.has(t)) unexplained.add(`${t} (in ${c})`);
    expect([...unexplained]).toEqual([]);
  });

  it("lists the same warnings as plan.json", async () => {
    const planJson = JSON.parse(readFileSync(join(dir, "plan.json"), "utf8")) as { warnings: string[] };
    const shown = await page!.evaluate<string[]>(`[...document.querySelectorAll("#warnings li")].map((l) => l.textContent)`);
    expect(planJson.warnings.length).toBeGreaterThan(0); // generated recordings carry partial-window warnings
    expect(shown).toEqual(planJson.warnings);
  });

  it("the first-row check catches a header that covers the first row (the old sticky offset)", async () => {
    // Control: a table whose sticky header sits 34 px down inside its scroll box, as before the fix.
    const bad = join(dir, "covered.html");
    writeFileSync(
      bad,
      `<!DOCTYPE html><style>.tablewrap{overflow-x:auto}th{position:sticky;top:34px;background:#eee}td,th{padding:8px}</style>` +
        `<div style="height:1200px"></div><div class="tablewrap"><table><thead><tr><th>a</th><th>b</th></tr></thead><tbody><tr><td>first</td><td>1</td></tr><tr><td>second</td><td>2</td></tr><tr><td>third</td><td>3</td></tr></tbody></table></div><div style="height:1200px"></div>`,
    );
    const p2 = await browser!.newPage(1280, 900, true);
    await p2.goto(pathToFileURL(bad).href);
    const rows = await p2.evaluate<{ visible: boolean }[]>(FIRST_ROWS);
    expect(rows).toEqual([expect.objectContaining({ visible: false })]);
  });
});
