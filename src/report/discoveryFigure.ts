import { FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

export interface DiscoverySeries {
  name: string;
  /** Cumulative vehicle-km at each point. */
  km: ArrayLike<number>;
  /** Distinct kinds seen (observed curve) or expected (rarefaction/extrapolation). */
  count: ArrayLike<number>;
  /** "observed" solid, "rarefied" dashed, "extrapolated" dotted. */
  style: "observed" | "rarefied" | "extrapolated";
  /** Optional lower/upper band. */
  lower?: ArrayLike<number>;
  upper?: ArrayLike<number>;
}

/**
 * Discovery curves: distinct scenario types (or clusters) against vehicle-km, observed in recording
 * order, expected by rarefaction, and extrapolated beyond the data; the estimated total as a line.
 */
export function discoveryFigure(series: DiscoverySeries[], asymptotes: { name: string; value: number }[] = [], title?: string): Figure {
  const data: Record<string, unknown>[] = [];
  series.forEach((s, i) => {
    const colour = PALETTE[Math.floor(i / 3) % PALETTE.length];
    const x = Array.from(s.km, (v) => round(v, 3));
    if (s.lower && s.upper) {
      data.push({
        type: "scatter",
        mode: "lines",
        x: [...x, ...x.slice().reverse()],
        y: [...Array.from(s.upper, (v) => round(v, 3)), ...Array.from(s.lower, (v) => round(v, 3)).reverse()],
        fill: "toself",
        fillcolor: "rgba(47,109,179,0.12)",
        line: { width: 0 },
        hoverinfo: "skip",
        showlegend: false,
      });
    }
    data.push({
      type: "scatter",
      mode: "lines",
      name: s.name,
      x,
      y: Array.from(s.count, (v) => round(v, 3)),
      line: { color: colour, dash: s.style === "observed" ? "solid" : s.style === "rarefied" ? "dash" : "dot", width: 2 },
    });
  });
  // The y axis fits the curves; an estimated total far above them would flatten them, so it is then
  // named in a note at the top instead of drawn.
  let yMax = 0;
  for (const s of series) for (let i = 0; i < s.count.length; i++) yMax = Math.max(yMax, s.count[i]!, s.upper ? s.upper[i]! : 0);
  const yTop = yMax > 0 ? yMax * 1.15 : 1;
  const drawn = asymptotes.filter((a) => a.value <= yTop);
  const above = asymptotes.filter((a) => a.value > yTop);
  const shapes = drawn.map((a) => ({
    type: "line",
    xref: "paper",
    x0: 0,
    x1: 1,
    y0: a.value,
    y1: a.value,
    line: { color: "#6f7b87", dash: "longdash", width: 1 },
  }));
  const annotations: Record<string, unknown>[] = drawn.map((a) => ({
    xref: "paper",
    x: 1,
    xanchor: "right",
    y: a.value,
    yanchor: "bottom",
    text: `${a.name}: ${a.value.toFixed(1)}`,
    showarrow: false,
    font: { size: 11, color: "#4a5561" },
  }));
  if (above.length > 0)
    annotations.push({
      xref: "paper",
      yref: "paper",
      x: 0,
      xanchor: "left",
      y: 1,
      yanchor: "top",
      text: `above the chart: ${above.map((a) => `${a.name} ${a.value.toFixed(1)}`).join(", ")}`,
      showarrow: false,
      font: { size: 11, color: "#4a5561" },
      bgcolor: "rgba(255,255,255,0.8)",
    });
  return {
    data,
    layout: baseLayout(title ?? "Catalogue discovery: distinct scenario types against vehicle-km", {
      xaxis: { title: { text: "vehicle-km" }, rangemode: "tozero" },
      yaxis: { title: { text: "distinct kinds seen" }, range: [0, round(yTop, 3)] },
      shapes,
      annotations,
      legend: { orientation: "h", y: -0.2 },
      height: 420,
    }),
    config: FIGURE_CONFIG,
  };
}
