import { FIGURE_CONFIG, NOISE_COLOUR, PALETTE, baseLayout, round, type Figure } from "./figure.js";

export interface ShareBar {
  /** Test case name shown on the axis. */
  name: string;
  /** Share of recorded vehicle-kilometres (fraction). */
  kmShare: number;
  /** Share of recorded time (fraction). */
  timeShare: number;
  /** Why the test case is in the plan, e.g. "representative", "rare", "critical". */
  reason: string;
  hover?: string;
}

/**
 * Horizontal bars: the share of recorded vehicle-kilometres and of time each test case stands for,
 * largest first, plus what is not represented (so the bars add up to 100 %).
 */
export function shareFigure(bars: ShareBar[], unrepresented?: { kmShare: number; timeShare: number }): Figure {
  const rows = [...bars];
  if (unrepresented && (unrepresented.kmShare > 0 || unrepresented.timeShare > 0))
    rows.push({ name: "not represented", kmShare: unrepresented.kmShare, timeShare: unrepresented.timeShare, reason: "left out" });
  const names = rows.map((b) => b.name);
  const reasonColour = (r: string): string =>
    r === "left out" ? NOISE_COLOUR : r === "representative" ? PALETTE[0] : r === "critical" ? "#b3261e" : PALETTE[1];
  // One bar trace per reason, so that the legend explains the colours; the category order of the
  // y axis stays the order of `rows`.
  const reasons = [...new Set(rows.map((b) => b.reason))];
  const traces = reasons.map((reason) => {
    const mine = rows.filter((b) => b.reason === reason);
    return {
      type: "bar",
      orientation: "h",
      name: reason,
      y: mine.map((b) => b.name),
      x: mine.map((b) => round(100 * b.kmShare, 4)),
      marker: { color: reasonColour(reason) },
      text: mine.map((b) => `${(100 * b.kmShare).toFixed(2)} %`),
      textposition: "outside",
      hovertext: mine.map((b) => b.hover ?? `${b.name}: ${b.reason}`),
      hoverinfo: "text+x",
    };
  });
  return {
    data: [
      ...traces,
      {
        type: "scatter",
        mode: "markers",
        name: "share of time",
        y: names,
        x: rows.map((b) => round(100 * b.timeShare, 4)),
        marker: { symbol: "line-ns-open", size: 14, color: "#111111" },
      },
    ],
    layout: baseLayout("What each test case stands for (share of recorded vehicle-km; tick = share of time)", {
      xaxis: { title: { text: "share (%)" }, rangemode: "tozero" },
      yaxis: { autorange: "reversed", automargin: true, categoryorder: "array", categoryarray: names },
      barmode: "overlay",
      height: Math.max(320, 22 * rows.length + 120),
      showlegend: true,
      legend: { orientation: "h", y: -0.12 },
    }),
    config: FIGURE_CONFIG,
  };
}
