/**
 * The notebook adapter: the only place that talks to tslab's display. Everything else in report/
 * builds figures and HTML as data. tslab is loaded lazily so that the CLI and tests never pay for
 * (or depend on) the kernel.
 *
 * Rich display: `show(x)` draws a figure, or shows a plan, a pipeline result, a table, a logical
 * scenario (or a list of them) as a readable HTML table. Inside a tslab kernel the same happens when
 * such a value is the last value of a cell: tslab prints that value with console.log, and this
 * module (when loaded in a tslab kernel) routes console.log of a single roadsieve value to show.
 */
import { createRequire } from "node:module";
import type { Figure } from "./figure.js";
import { cellText, escapeHtml, scriptJson, type ReportCell, type ReportTable } from "./html.js";
import { describeTypeKey, reasonInWords } from "./describe.js";
import { plotlySource } from "./plotlySource.js";

interface HtmlDisplay {
  html(s: string): void;
}

let display: HtmlDisplay | undefined;
let plotlySent = false;
let counter = 0;

/** What to do instead of show() outside a kernel: names functions of the public API (a test checks they exist). */
export const OUTSIDE_JUPYTER =
  "outside Jupyter, write the report file with writeOutputs(result, dir) (report.html beside plan.json), or get its HTML as a string with renderHtml(buildReport(result))";
const NOT_IN_KERNEL = `roadsieve's notebook display works only inside a running tslab Jupyter kernel; ${OUTSIDE_JUPYTER}`;

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
    if (/not ready/i.test(msg)) throw new Error(NOT_IN_KERNEL);
    throw e;
  }
}

/** Send plotly.js to the page once per kernel session (the first figure does it implicitly). */
export function loadPlotly(force = false): void {
  if (plotlySent && !force) return;
  emit(`<script>${plotlySource().replace(/<\/script/gi, "<\\/script")}</script>`);
  plotlySent = true;
}

function showFigure(figure: Figure): void {
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

// Jupyter's own table style right-aligns every cell; text reads better left-aligned, numbers right.
const STYLE =
  "<style>div.rs-nb table{border-collapse:collapse;font-size:12px}div.rs-nb table th,div.rs-nb table td{border:1px solid #dde2e8;padding:3px 6px;text-align:left !important;vertical-align:top}div.rs-nb table th{background:#f7f8fa}div.rs-nb table td.num{text-align:right !important}div.rs-nb .lbl{color:#5b6673;font-size:11px}div.rs-nb p{margin:4px 0}</style>";

function cellHtml(c: ReportCell): string {
  if (typeof c === "number") return `<td class="num">${escapeHtml(String(c))}</td>`;
  if (typeof c === "string") return `<td>${escapeHtml(c)}</td>`;
  if ("code" in c) return `<td><code>${escapeHtml(c.code)}</code>${c.label ? `<div class="lbl">${escapeHtml(c.label)}</div>` : ""}</td>`;
  return `<td>${c.lines.map((l) => `<div>${escapeHtml(l)}</div>`).join("")}</td>`;
}

/** A table as notebook HTML (first maxRows rows, default 20). */
export function tableHtml(table: ReportTable, maxRows = table.maxRows ?? 20): string {
  const rows = table.rows.slice(0, maxRows);
  return `${STYLE}<div class="rs-nb">${table.caption ? `<p><b>${escapeHtml(table.caption)}</b></p>` : ""}${(table.notes ?? []).map((n) => `<p>${escapeHtml(n)}</p>`).join("")}<table><tr>${table.columns
    .map((c) => `<th>${escapeHtml(c)}</th>`)
    .join("")}</tr>${rows.map((r) => `<tr>${r.map(cellHtml).join("")}</tr>`).join("")}</table>${table.rows.length > maxRows ? `<p><i>${table.rows.length - maxRows} more rows</i></p>` : ""}</div>`;
}

const fix = (x: unknown, d = 2): string => (typeof x === "number" && Number.isFinite(x) ? x.toFixed(d) : "–");
const pct = (x: unknown): string => (typeof x === "number" ? `${(100 * x).toFixed(2)} %` : "–");

type Obj = Record<string, unknown>;
const isObj = (x: unknown): x is Obj => typeof x === "object" && x !== null && !Array.isArray(x) && !ArrayBuffer.isView(x);
const isFigure = (x: unknown): x is Figure => isObj(x) && Array.isArray(x.data) && isObj(x.layout);
const isTable = (x: unknown): x is ReportTable => isObj(x) && Array.isArray(x.columns) && Array.isArray(x.rows);
const isPlan = (x: unknown): x is Obj & { testCases: Obj[]; summary: string } => isObj(x) && typeof x.schemaVersion === "string" && Array.isArray(x.testCases);
const isResult = (x: unknown): x is Obj & { plan: Obj } => isObj(x) && isPlan(x.plan) && isObj(x.scenarios);
/** A logical scenario of plan schema 2 (CONTRACT: classId, className, parameters[] with p05/p50/p95). */
const isLogical = (x: unknown): x is Obj & { parameters: Obj[] } => isObj(x) && typeof x.classId === "string" && Array.isArray(x.parameters);

/** The test cases of a plan as a table (why each is there, what happens, what it stands for). */
export function planTable(plan: { testCases: Obj[] }): ReportTable {
  return {
    caption: `${plan.testCases.length} test cases`,
    columns: ["test case", "role", "why it is in the plan", "what happens", "share of km", "shortest TTC (s)", "shortest headway (s)", "hardest braking (m/s²)", "scenarios"],
    rows: plan.testCases.map((t): ReportCell[] => {
      const c = (t.criticality ?? {}) as Obj;
      const key = typeof t.typeKey === "string" ? t.typeKey : null;
      return [
        String(t.id),
        String(t.role ?? t.kind ?? ""),
        { lines: Array.isArray(t.reasons) ? (t.reasons as string[]).map((r) => reasonInWords(r, undefined, typeof t.memberCount === "number" ? t.memberCount : undefined)) : [] },
        key ? { code: key, label: describeTypeKey(key) } : String(t.logicalScenario ?? ""),
        pct(t.share),
        fix(c.minTtc),
        fix(c.minThw),
        fix(c.maxDecel),
        typeof t.memberCount === "number" ? t.memberCount : "–",
      ];
    }),
  };
}

/** A logical scenario's parameters as a table (range, 5/50/95 % quantiles, how many measurable). */
export function logicalScenarioTable(ls: Obj & { parameters: Obj[] }): ReportTable {
  return {
    caption: `${String(ls.name ?? ls.id)} (${String(ls.className ?? ls.classId)}): ${String(ls.scenarios ?? "?")} scenarios, ${pct(ls.share)} of the km`,
    columns: ["parameter", "unit", "min", "5 %", "median", "95 %", "max", "measurable in", "meaning"],
    rows: ls.parameters.map((p): ReportCell[] => [String(p.name), String(p.unit ?? ""), fix(p.min), fix(p.p05), fix(p.p50), fix(p.p95), fix(p.max), typeof p.measurable === "number" ? p.measurable : "–", String(p.description ?? "")]),
  };
}

/** Plain objects in a list (same keys) as a table of their simple fields. */
function listTable(items: Obj[]): ReportTable {
  const keys = Object.keys(items[0]!).filter((k) => items.every((it) => ["string", "number", "boolean"].includes(typeof it[k]) || it[k] === null));
  return { columns: keys, rows: items.map((it) => keys.map((k): ReportCell => (typeof it[k] === "number" ? (it[k] as number) : String(it[k])))) };
}

/** The HTML a value shows as in a notebook, or null when it is not a value roadsieve knows. */
export function richHtml(value: unknown): string | null {
  if (isTable(value)) return tableHtml(value);
  if (isResult(value)) return richHtml(value.plan);
  if (isPlan(value)) {
    const logical = Array.isArray(value.logicalScenarios) ? (value.logicalScenarios as Obj[]) : [];
    const parts = [`${STYLE}<div class="rs-nb">${value.summary.split(/\n+/).map((p) => `<p>${escapeHtml(p)}</p>`).join("")}</div>`];
    if (logical.length > 0) parts.push(tableHtml(listTable(logical.map((l) => ({ id: l.id, name: l.name, class: l.className ?? l.classId, share: l.share, scenarios: l.scenarios })))));
    parts.push(tableHtml(planTable(value), 15));
    return parts.join("");
  }
  if (isLogical(value)) return tableHtml(logicalScenarioTable(value));
  if (Array.isArray(value) && value.length > 0 && value.every(isLogical))
    return tableHtml(listTable(value.map((l) => ({ id: l.id, name: l.name, class: l.className ?? l.classId, share: l.share, scenarios: l.scenarios }))));
  if (Array.isArray(value) && value.length > 0 && value.every((x) => isObj(x) && typeof x.id === "string" && Array.isArray(x.reasons))) return tableHtml(planTable({ testCases: value as Obj[] }));
  return null;
}

/**
 * Show a value in the notebook: a plotly figure is drawn; a plan, a pipeline result, a table, a
 * logical scenario or a list of test cases is shown as a readable table; text as paragraphs.
 */
export function show(value: Figure | ReportTable | object | string | string[]): void {
  if (isFigure(value)) return showFigure(value);
  if (typeof value === "string" || (Array.isArray(value) && value.every((v) => typeof v === "string"))) return showText(value as string | string[]);
  const html = richHtml(value);
  if (html === null) throw new TypeError("show() takes a figure, a plan, a pipeline result, a table ({ columns, rows }), a logical scenario, a list of test cases, or text");
  emit(html);
}

/** Show a table (first maxRows rows). */
export function showTable(table: ReportTable): void {
  emit(tableHtml(table));
}

/** Show a paragraph of text (escaped) or a list of lines. */
export function showText(text: string | string[]): void {
  const lines = Array.isArray(text) ? text : [text];
  emit(lines.map((l) => `<p>${escapeHtml(l)}</p>`).join(""));
}

/** Plain text of a table (for logs). */
export function tableText(table: ReportTable): string {
  return [table.columns.join(" | "), ...table.rows.map((r) => r.map(cellText).join(" | "))].join("\n");
}

let hooked = false;
/**
 * Make a roadsieve value that is the last value of a cell (or is console.log-ged alone) show as
 * rich HTML. tslab prints a cell's last value with a console.log it captured at start-up, which
 * formats through util.inspect; so the hook is util.inspect's custom-inspection symbol, defined
 * (non-enumerable, invisible to Object.keys, for…in and JSON) on Object.prototype. For any value
 * that is not a figure, plan, result, table or logical scenario it formats exactly as before.
 * Installed automatically only when this module loads inside a tslab kernel.
 */
export function enableRichDisplay(): void {
  if (hooked) return;
  hooked = true;
  const custom = Symbol.for("nodejs.util.inspect.custom");
  Object.defineProperty(Object.prototype, custom, {
    configurable: true,
    enumerable: false,
    writable: true,
    value: function richInspect(this: unknown, _depth: number, options: Record<string, unknown>, inspect: (v: unknown, o: Record<string, unknown>) => string): string {
      try {
        if (isFigure(this)) {
          showFigure(this);
          return "";
        }
        const html = richHtml(this);
        if (html !== null) {
          emit(html);
          return "";
        }
      } catch {
        /* not in a running kernel after all: print as text */
      }
      return inspect(this, { ...options, customInspect: false });
    },
  });
}

if (process.argv.some((a) => /[\\/]tslab([\\/]|$)|tslab\.js$|^tslab$/.test(a)) || process.env.ROADSIEVE_RICH_DISPLAY === "1") enableRichDisplay();
