import type { ReportLegend } from "./describe.js";
import type { Figure } from "./figure.js";
import { plotlySource } from "./plotlySource.js";

/** Escape text for HTML element content and attribute values. */
export function escapeHtml(text: string): string {
  return text.replace(/[&<>"']/g, (c) => ({ "&": "&amp;", "<": "&lt;", ">": "&gt;", '"': "&quot;", "'": "&#39;" })[c]!);
}

/** JSON that is safe inside a <script> element. */
export function scriptJson(value: unknown): string {
  return JSON.stringify(value).replace(/</g, "\\u003c").replace(/\u2028/g, "\\u2028").replace(/\u2029/g, "\\u2029");
}

/** A section of the report: heading, paragraphs (plain text), then figures, tables and legends. */
export interface ReportSection {
  id: string;
  heading: string;
  paragraphs?: string[];
  /** Bulleted items (plain text). */
  bullets?: string[];
  /** Every figure says in its caption what it shows and how to read it. */
  figures?: { figure: Figure; caption: string }[];
  tables?: ReportTable[];
  /** Legends for the codes the section shows. */
  legends?: ReportLegend[];
  /**
   * Ready-made HTML placed after the heading (trusted: only sections built by roadsieve's own
   * code, e.g. the logical-scenario section, use it; text from data must be escaped by them).
   */
  html?: string;
  /** Visual emphasis for cautions. */
  tone?: "normal" | "caution";
}

/**
 * A table cell: text, a number (right-aligned), a code with its plain-language label beside it
 * (the code is listed in a legend), or several lines.
 */
export type ReportCell = string | number | { code: string; label: string } | { lines: string[] };

export interface ReportTable {
  caption?: string;
  columns: string[];
  rows: ReportCell[][];
  /** Sentences shown above the table, e.g. for columns folded because most rows repeat one value. */
  notes?: string[];
  /** Show at most this many rows, with a note saying how many were left out. */
  maxRows?: number;
}

/** The text of a cell (codes with their label), for comparisons and plain-text output. */
export function cellText(c: ReportCell): string {
  if (typeof c === "number") return String(c);
  if (typeof c === "string") return c;
  if ("code" in c) return c.label ? `${c.code} (${c.label})` : c.code;
  return c.lines.join("; ");
}

function renderCell(c: ReportCell): string {
  if (typeof c === "number") return `<td class="num">${escapeHtml(String(c))}</td>`;
  if (typeof c === "string") return `<td>${escapeHtml(c)}</td>`;
  if ("code" in c) return `<td><code>${escapeHtml(c.code)}</code>${c.label ? `<div class="lbl">${escapeHtml(c.label)}</div>` : ""}</td>`;
  return `<td>${c.lines.map((l) => `<div>${escapeHtml(l)}</div>`).join("")}</td>`;
}

function renderLegend(l: ReportLegend): string {
  return `<div class="legend"><p class="note"><b>${escapeHtml(l.title)}</b></p><dl>${l.entries
    .map((e) => `<dt><code>${escapeHtml(e.code)}</code></dt><dd>${escapeHtml(e.meaning)}</dd>`)
    .join("")}</dl></div>`;
}

export interface ReportDocument {
  title: string;
  subtitle?: string;
  /** Headline figures shown as tiles (label → value text). */
  tiles?: { label: string; value: string }[];
  sections: ReportSection[];
  /** Provenance printed at the end (key → value). */
  provenance: Record<string, string>;
}

const STYLE = `
:root{--ink:#1d2733;--muted:#5b6673;--line:#dde2e8;--accent:#2f6db3;--alert:#b3261e;--bg:#ffffff;--panel:#f7f8fa}
*{box-sizing:border-box}body{margin:0;font:14px/1.5 system-ui,-apple-system,"Segoe UI",Roboto,sans-serif;color:var(--ink);background:var(--bg)}
header{padding:28px 40px 18px;border-bottom:3px solid var(--accent)}
header h1{margin:0;font-size:24px}header p{margin:4px 0 0;color:var(--muted)}
nav{padding:8px 40px;border-bottom:1px solid var(--line);font-size:13px;position:sticky;top:0;background:#fff;z-index:2}
nav a{margin-right:14px;color:var(--accent);text-decoration:none}
main{padding:10px 40px 40px;max-width:1200px;overflow-x:hidden}
section{margin:26px 0;scroll-margin-top:72px}.tablewrap,figure{scroll-margin-top:72px}section h2{font-size:18px;border-bottom:1px solid var(--line);padding-bottom:4px}
.tiles{display:flex;flex-wrap:wrap;gap:12px;margin:18px 0}
.tile{background:var(--panel);border:1px solid var(--line);border-radius:6px;padding:10px 14px;min-width:150px}
.tile .v{font-size:20px;font-weight:600}.tile .l{color:var(--muted);font-size:12px}
.caution{border-left:4px solid var(--alert);background:#fbf1f0;padding:8px 16px}
figure{margin:14px 0}figcaption{color:var(--ink);font-size:12.5px;background:var(--panel);border-left:3px solid var(--accent);padding:6px 10px;max-width:1100px}
table{border-collapse:collapse;font-size:12px;margin:10px 0;width:100%}
.tablewrap{overflow:auto;max-width:100%;max-height:70vh;border:1px solid var(--line)}
.tablewrap table{margin:0}
th,td{border:1px solid var(--line);padding:4px 6px;text-align:left;vertical-align:top}
th{background:var(--panel);position:sticky;top:0;z-index:1;box-shadow:0 1px 0 var(--line)}td.num{text-align:right;font-variant-numeric:tabular-nums}
td .lbl{color:var(--muted);font-size:11px}code{font:11px/1.4 ui-monospace,Menlo,Consolas,monospace;word-break:break-all}
.legend{background:var(--panel);border:1px solid var(--line);border-radius:6px;padding:6px 12px;margin:10px 0}
.legend dl{display:grid;grid-template-columns:max-content 1fr;gap:2px 14px;margin:4px 0;font-size:12px}.legend dd{margin:0}
ul.notes{color:var(--ink);font-size:12px;margin:6px 0}
.note{color:var(--muted);font-size:12px}
footer{padding:16px 40px;border-top:1px solid var(--line);color:var(--muted);font-size:12px}
footer dl{display:grid;grid-template-columns:max-content 1fr;gap:2px 12px;margin:0}footer dt{font-weight:600}
footer dd{margin:0;word-break:break-all}
`;

function renderTable(t: ReportTable): string {
  const max = t.maxRows ?? t.rows.length;
  const shown = t.rows.slice(0, max);
  const head = `<tr>${t.columns.map((c) => `<th>${escapeHtml(c)}</th>`).join("")}</tr>`;
  const body = shown.map((r) => `<tr>${r.map(renderCell).join("")}</tr>`).join("\n");
  const more = t.rows.length > max ? `<p class="note">${t.rows.length - max} more rows are in plan.csv / plan.json.</p>` : "";
  const notes = t.notes && t.notes.length > 0 ? `<ul class="notes">${t.notes.map((n) => `<li>${escapeHtml(n)}</li>`).join("")}</ul>` : "";
  return `${t.caption ? `<p class="note">${escapeHtml(t.caption)}</p>` : ""}${notes}<div class="tablewrap"><table><thead>${head}</thead><tbody>\n${body}</tbody></table></div>${more}`;
}

/**
 * Render a self-contained HTML page: plotly.js inlined, figures as JSON data, no network access
 * needed to open it. Deterministic: the same document gives the same bytes.
 */
export function renderHtml(doc: ReportDocument): string {
  const figures: { id: string; figure: Figure }[] = [];
  const sections = doc.sections
    .map((s) => {
      const parts: string[] = [`<section id="${escapeHtml(s.id)}"${s.tone === "caution" ? ' class="caution"' : ""}>`, `<h2>${escapeHtml(s.heading)}</h2>`];
      for (const p of s.paragraphs ?? []) parts.push(`<p>${escapeHtml(p)}</p>`);
      if (s.html) parts.push(s.html);
      if (s.bullets && s.bullets.length > 0) parts.push(`<ul>${s.bullets.map((b) => `<li>${escapeHtml(b)}</li>`).join("")}</ul>`);
      for (const f of s.figures ?? []) {
        const id = `fig-${figures.length}`;
        figures.push({ id, figure: f.figure });
        parts.push(`<figure><div id="${id}" class="plot"></div><figcaption>${escapeHtml(f.caption)}</figcaption></figure>`);
      }
      for (const t of s.tables ?? []) parts.push(renderTable(t));
      for (const l of s.legends ?? []) parts.push(renderLegend(l));
      parts.push("</section>");
      return parts.join("\n");
    })
    .join("\n");
  const nav = doc.sections.map((s) => `<a href="#${escapeHtml(s.id)}">${escapeHtml(s.heading)}</a>`).join("");
  const tiles = doc.tiles?.length
    ? `<div class="tiles">${doc.tiles.map((t) => `<div class="tile"><div class="v">${escapeHtml(t.value)}</div><div class="l">${escapeHtml(t.label)}</div></div>`).join("")}</div>`
    : "";
  const prov = Object.entries(doc.provenance)
    .map(([k, v]) => `<dt>${escapeHtml(k)}</dt><dd>${escapeHtml(v)}</dd>`)
    .join("");
  return `<!DOCTYPE html>
<html lang="en">
<head>
<meta charset="utf-8">
<meta name="viewport" content="width=device-width, initial-scale=1">
<title>${escapeHtml(doc.title)}</title>
<style>${STYLE}</style>
<script>${plotlySource().replace(/<\/script/gi, "<\\/script")}</script>
</head>
<body>
<header><h1>${escapeHtml(doc.title)}</h1>${doc.subtitle ? `<p>${escapeHtml(doc.subtitle)}</p>` : ""}</header>
<nav>${nav}</nav>
<main>
${tiles}
${sections}
</main>
<footer><dl>${prov}</dl></footer>
<script type="application/json" id="roadsieve-figures">${scriptJson(figures)}</script>
<script>
(function () {
  var figs = JSON.parse(document.getElementById("roadsieve-figures").textContent);
  figs.forEach(function (f) { Plotly.newPlot(f.id, f.figure.data, f.figure.layout, f.figure.config || {}); });
})();
</script>
</body>
</html>
`;
}
