import { FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

export interface KSweepRow {
  k: number;
  inertia: number;
  silhouette: number;
  calinskiHarabasz?: number;
  daviesBouldin?: number;
}

/** Silhouette and inertia against k, with the chosen k marked. */
export function kSweepFigure(rows: KSweepRow[], chosenK: number, note = ""): Figure {
  const ks = rows.map((r) => r.k);
  const data: Record<string, unknown>[] = [
    {
      type: "scatter",
      mode: "lines+markers",
      name: "silhouette (higher is better)",
      x: ks,
      y: rows.map((r) => round(r.silhouette, 5)),
      line: { color: PALETTE[0] },
    },
    {
      type: "scatter",
      mode: "lines+markers",
      name: "inertia",
      x: ks,
      y: rows.map((r) => round(r.inertia, 3)),
      yaxis: "y2",
      line: { color: PALETTE[7], dash: "dot" },
    },
  ];
  if (rows.some((r) => r.daviesBouldin !== undefined))
    data.push({
      type: "scatter",
      mode: "lines+markers",
      name: "Davies–Bouldin (lower is better)",
      x: ks,
      y: rows.map((r) => round(r.daviesBouldin ?? NaN, 5)),
      line: { color: PALETTE[1] },
    });
  return {
    data,
    layout: baseLayout(`Choosing the number of clusters: k = ${chosenK}${note ? ` (${note})` : ""}`, {
      xaxis: { title: { text: "k" }, dtick: ks.length > 20 ? undefined : 1 },
      yaxis: { title: { text: "silhouette / Davies–Bouldin" } },
      yaxis2: { title: { text: "inertia" }, overlaying: "y", side: "right", showgrid: false },
      shapes: [{ type: "line", x0: chosenK, x1: chosenK, yref: "paper", y0: 0, y1: 1, line: { color: "#111111", dash: "dash" } }],
      legend: { orientation: "h", y: -0.2 },
      height: 380,
      margin: { l: 60, r: 70, t: 50, b: 60 },
    }),
    config: FIGURE_CONFIG,
  };
}
