/**
 * Screenshots of the report for the docs (docs/img/report-*.png): the demo run on the bundled
 * Orrowind sample (the same options as `roadsieve demo`), rendered, opened in headless Chromium at
 * 1280 px offline, and cut into a few small PNGs. Run: npx tsx scripts/report-screenshots.ts
 */
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { readRecording } from "../src/recording/readRecording.js";
import { buildReport } from "../src/report/buildReport.js";
import { renderHtml } from "../src/report/html.js";
import { Browser } from "../test/helpers/chromium.js";

const root = resolve(import.meta.dirname, "..");
const outDir = join(root, "docs", "img");
mkdirSync(outDir, { recursive: true });
const rec = await readRecording(join(root, "sample-data", "orrowind", "tracks.parquet"));
const result = runPipeline([rec], {});
const tmp = mkdtempSync(join(tmpdir(), "roadsieve-shots-"));
const html = join(tmp, "report.html");
writeFileSync(html, renderHtml(buildReport(result)));

const browser = await Browser.launch();
try {
  const page = await browser.newPage(1280, 900, true);
  await page.goto(pathToFileURL(html).href);
  await page.waitFor(`[...document.querySelectorAll(".plot")].every((e) => e.querySelector(".main-svg"))`);
  await new Promise((r) => setTimeout(r, 800));
  if (page.errors.length > 0) throw new Error(`script errors in the report: ${page.errors.join("; ")}`);
  // Page rectangles (CSS px, document coordinates) of what to show.
  const rect = async (selector: string, extraBelow = 0, maxHeight = 900): Promise<{ x: number; y: number; width: number; height: number }> => {
    const r = await page.evaluate<{ x: number; y: number; width: number; height: number } | null>(`(() => {
      const e = document.querySelector(${JSON.stringify(selector)});
      if (!e) return null;
      const b = e.getBoundingClientRect();
      return { x: 0, y: b.top + window.scrollY, width: 1280, height: b.height };
    })()`);
    if (!r) throw new Error(`nothing matches ${selector}`);
    return { ...r, y: Math.max(0, r.y - 8), height: Math.min(maxHeight, r.height + 16 + extraBelow) };
  };
  const shots: [string, { x: number; y: number; width: number; height: number }][] = [
    ["report-top", { x: 0, y: 0, width: 1280, height: 620 }],
    ["report-test-cases", await rect("#test-cases .tablewrap", 0, 620)],
    ["report-map", await rect("#map figure")],
    ["report-criticality", await rect("#criticality figure")],
    ["report-discovery", await rect("#coverage figure")],
    ["report-k", await rect("#clusters figure")],
  ];
  // Show the notes and legend above the test-case table too.
  const notes = await rect("#test-cases ul.notes", 0, 400);
  shots[1] = ["report-test-cases", { x: 0, y: notes.y, width: 1280, height: Math.min(680, shots[1]![1].y + shots[1]![1].height - notes.y) }];
  for (const [name, clip] of shots) {
    const png = await page.screenshot(clip, 0.6);
    writeFileSync(join(outDir, `${name}.png`), png);
    console.log(`wrote docs/img/${name}.png (${Math.round(clip.width * 0.6)}×${Math.round(clip.height * 0.6)} px, ${(png.length / 1024).toFixed(0)} KiB)`);
  }
} finally {
  await browser.close();
  rmSync(tmp, { recursive: true, force: true });
}
