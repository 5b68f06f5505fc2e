import { FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

export interface KSweepRow {
  k: number;
  inertia: number;
  silhouette: number;
  calinskiHarabasz?: number;
  daviesBouldin?: number;
}

/** An axis range that fits the values with a margin (NaN ignored). */
export function fittedRange(values: number[], pad = 0.12): [number, number] | undefined {
  const v = values.filter((x) => Number.isFinite(x));
  if (v.length === 0) return undefined;
  const lo = Math.min(...v);
  const hi = Math.max(...v);
  const span = hi - lo || Math.abs(hi) || 1;
  return [round(lo - pad * span, 6), round(hi + pad * span, 6)];
}

/**
 * Silhouette (higher is better) and inertia against k, with the chosen k marked; Davies–Bouldin
 * (lower is better) in its own panel below, so that each score has an axis fitted to its values
 * instead of a silhouette of 0.15 squeezed onto an axis that runs to 2.5.
 */
export function kSweepFigure(rows: KSweepRow[], chosenK: number, note = ""): Figure {
  const ks = rows.map((r) => r.k);
  const hasDb = rows.some((r) => r.daviesBouldin !== undefined && Number.isFinite(r.daviesBouldin));
  const data: Record<string, unknown>[] = [
    {
      type: "scatter",
      mode: "lines+markers",
      name: "silhouette (left axis; higher is better)",
      x: ks,
      y: rows.map((r) => round(r.silhouette, 5)),
      line: { color: PALETTE[0] },
    },
    {
      type: "scatter",
      mode: "lines+markers",
      name: "inertia (right axis; always falls with k)",
      x: ks,
      y: rows.map((r) => round(r.inertia, 3)),
      yaxis: "y2",
      line: { color: PALETTE[7], dash: "dot" },
    },
  ];
  if (hasDb)
    data.push({
      type: "scatter",
      mode: "lines+markers",
      name: "Davies–Bouldin (lower panel; lower is better)",
      x: ks,
      y: rows.map((r) => round(r.daviesBouldin ?? NaN, 5)),
      yaxis: "y3",
      line: { color: PALETTE[1] },
    });
  const top = hasDb ? [0.4, 1] : [0, 1];
  return {
    data,
    layout: baseLayout(`Choosing the number of clusters: k = ${chosenK}${note ? ` (${note})` : ""}`, {
      xaxis: { title: { text: "number of clusters k" }, dtick: ks.length > 20 ? undefined : 1, anchor: hasDb ? "y3" : "y" },
      yaxis: { title: { text: "silhouette" }, range: fittedRange(rows.map((r) => r.silhouette)), domain: top },
      yaxis2: { title: { text: "inertia" }, overlaying: "y", side: "right", showgrid: false, range: fittedRange(rows.map((r) => r.inertia)) },
      ...(hasDb ? { yaxis3: { title: { text: "Davies–Bouldin" }, domain: [0, 0.3], range: fittedRange(rows.map((r) => r.daviesBouldin ?? NaN)) } } : {}),
      shapes: [{ type: "line", x0: chosenK, x1: chosenK, yref: "paper", y0: 0, y1: 1, line: { color: "#111111", dash: "dash" } }],
      annotations: [{ x: chosenK, yref: "paper", y: 1, text: `chosen k = ${chosenK}`, showarrow: false, yanchor: "bottom", xanchor: "left" }],
      legend: { orientation: "h", y: -0.22 },
      height: hasDb ? 460 : 380,
      margin: { l: 60, r: 70, t: 50, b: 70 },
    }),
    config: FIGURE_CONFIG,
  };
}
