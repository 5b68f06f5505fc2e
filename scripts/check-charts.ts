/**
 * Open exported HTML pages (notebooks exported by nbconvert, or a report) in headless Chromium,
 * offline, and check that every plotly chart on them was drawn: each chart's div holds an SVG with
 * data marks, no chart says plotly.js is missing, and no script error was raised by the page's own
 * scripts. Used by .ci/run for the notebook exports. Run: npx tsx scripts/check-charts.ts FILE.html…
 */
import { resolve } from "node:path";
import { pathToFileURL } from "node:url";
import { Browser } from "../test/helpers/chromium.js";

const files = process.argv.slice(2);
if (files.length === 0) {
  console.error("usage: npx tsx scripts/check-charts.ts FILE.html…");
  process.exit(2);
}
const browser = await Browser.launch();
let failed = 0;
try {
  for (const f of files) {
    const page = await browser.newPage(1280, 900, true);
    await page.goto(pathToFileURL(resolve(f)).href);
    // Charts are drawn by inline scripts; give them a moment after the load event.
    await page.waitFor(`document.readyState === "complete"`);
    await new Promise((r) => setTimeout(r, 1500));
    const r = await page.evaluate<{ charts: number; drawn: number; missing: number }>(`(() => {
      const charts = [...document.querySelectorAll(".js-plotly-plot, div[id^='roadsieve-plot-'], .plot")];
      const drawn = charts.filter((c) => c.querySelector("svg.main-svg") && c.querySelectorAll("path.point, .barlayer path, path.js-line, .heatmaplayer image").length > 0).length;
      const missing = [...document.querySelectorAll("div")].filter((d) => /plotly\\.js is not loaded/.test(d.textContent || "") && d.children.length === 0).length;
      return { charts: new Set(charts).size, drawn, missing };
    })()`);
    // Requests the page makes to the network are expected to fail offline (nbconvert templates may
    // reference a CDN); only errors from the page's own scripts count.
    const errors = page.errors.filter((e) => !/Failed to load resource|net::ERR_/.test(e));
    const ok = r.charts > 0 && r.drawn === r.charts && r.missing === 0 && errors.length === 0;
    console.log(`${ok ? "ok  " : "FAIL"} ${f}: ${r.drawn} of ${r.charts} charts drawn${r.missing ? `, ${r.missing} without plotly.js` : ""}${errors.length ? `; script errors: ${errors.join(" | ")}` : ""}`);
    if (!ok) failed++;
  }
} finally {
  await browser.close();
}
process.exit(failed > 0 ? 1 : 0);
