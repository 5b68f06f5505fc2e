/**
 * The notebook adapter: the only place that talks to tslab's display. Everything else in report/
 * builds figures and HTML as data. tslab is loaded lazily so that the CLI and tests never pay for
 * (or depend on) the kernel.
 */
import { createRequire } from "node:module";
import type { Figure } from "./figure.js";
import { escapeHtml, scriptJson, type ReportTable } from "./html.js";
import { plotlySource } from "./plotlySource.js";

interface HtmlDisplay {
  html(s: string): void;
}

/** What to do instead of show() outside a kernel: names functions of the public API (a test checks they exist). */
export const OUTSIDE_JUPYTER =
  "outside Jupyter, write the report file with writeOutputs(result, dir) (report.html beside plan.json), or get its HTML as a string with renderHtml(buildReport(result))";

let display: HtmlDisplay | undefined;
let plotlySent = false;
let counter = 0;

function tslabDisplay(): HtmlDisplay {
  if (display) return display;
  let mod: { display?: HtmlDisplay };
  try {
    mod = createRequire(import.meta.url)("tslab") as { display?: HtmlDisplay };
  } catch (e) {
    throw new Error(`the notebook display needs the tslab package (${(e as Error).message}); ${OUTSIDE_JUPYTER}`);
  }
  if (!mod.display) throw new Error("tslab.display is missing; is this the tslab kernel?");
  display = mod.display;
  return display;
}

function emit(html: string): void {
  try {
    tslabDisplay().html(html);
  } catch (e) {
    const msg = (e as Error).message;
    if (/not ready/i.test(msg))
      throw new Error(`roadsieve's notebook display works only inside a running tslab Jupyter kernel; ${OUTSIDE_JUPYTER}`);
    throw e;
  }
}

/** Send plotly.js to the page once per kernel session (the first figure does it implicitly). */
export function loadPlotly(force = false): void {
  if (plotlySent && !force) return;
  emit(`<script>${plotlySource().replace(/<\/script/gi, "<\\/script")}</script>`);
  plotlySent = true;
}

/** Show a plotly figure in the notebook. */
export function show(figure: Figure): void {
  loadPlotly();
  const id = `roadsieve-plot-${process.pid}-${counter++}`;
  emit(`<div id="${id}"></div>
<script>
(function () {
  var el = document.getElementById(${JSON.stringify(id)});
  if (!window.Plotly) { el.textContent = "plotly.js is not loaded in this page: run roadsieve's loadPlotly(true) in a cell, then this one again."; return; }
  var f = ${scriptJson(figure)};
  window.Plotly.newPlot(el, f.data, f.layout, f.config || {});
})();
</script>`);
}

/** Show a table (first maxRows rows). */
export function showTable(table: ReportTable): void {
  const max = table.maxRows ?? 20;
  const rows = table.rows.slice(0, max);
  emit(
    `${table.caption ? `<p><b>${escapeHtml(table.caption)}</b></p>` : ""}<table><tr>${table.columns.map((c) => `<th>${escapeHtml(c)}</th>`).join("")}</tr>${rows
      .map((r) => `<tr>${r.map((v) => `<td style="text-align:${typeof v === "number" ? "right" : "left"}">${escapeHtml(String(v))}</td>`).join("")}</tr>`)
      .join("")}</table>${table.rows.length > max ? `<p><i>${table.rows.length - max} more rows</i></p>` : ""}`,
  );
}

/** Show a paragraph of text (escaped) or a list of lines. */
export function showText(text: string | string[]): void {
  const lines = Array.isArray(text) ? text : [text];
  emit(lines.map((l) => `<p>${escapeHtml(l)}</p>`).join(""));
}
