import { ALERT_COLOUR, FIGURE_CONFIG, baseLayout, clusterColour, round, type Figure } from "./figure.js";

export interface CriticalityPoint {
  minTtc: number;
  minThw: number;
  label: number;
  hover?: string;
}

/**
 * Minimum time headway against minimum TTC per scenario, on log axes, with the threshold lines.
 * Scenarios without a leader (THW infinite) or never closing (TTC infinite) are drawn at the axis cap.
 */
export function criticalityFigure(points: CriticalityPoint[], thresholds: { ttc: number; thw: number }, cap = 60): Figure {
  const finite = points.map((p) => ({ ...p, ttc: Math.min(p.minTtc, cap), thw: Math.min(p.minThw, cap) }));
  return {
    data: [
      {
        type: points.length > 5000 ? "scattergl" : "scatter",
        mode: "markers",
        name: "scenarios",
        x: finite.map((p) => round(p.thw, 3)),
        y: finite.map((p) => round(p.ttc, 3)),
        text: points.map((p) => p.hover ?? ""),
        hoverinfo: "text+x+y",
        marker: { size: 5, opacity: 0.6, color: points.map((p) => clusterColour(p.label)) },
      },
    ],
    layout: baseLayout(`Criticality per scenario: minimum TTC vs minimum time headway (capped at ${cap} s)`, {
      xaxis: { title: { text: "minimum time headway (s)" }, type: "log" },
      yaxis: { title: { text: "minimum TTC while closing (s)" }, type: "log" },
      shapes: [
        { type: "line", xref: "x", yref: "paper", x0: thresholds.thw, x1: thresholds.thw, y0: 0, y1: 1, line: { color: ALERT_COLOUR, dash: "dash" } },
        { type: "line", xref: "paper", yref: "y", x0: 0, x1: 1, y0: thresholds.ttc, y1: thresholds.ttc, line: { color: ALERT_COLOUR, dash: "dash" } },
      ],
      annotations: [
        { xref: "x", yref: "paper", x: Math.log10(thresholds.thw), y: 1, text: `THW ${thresholds.thw} s`, showarrow: false, yanchor: "bottom", font: { color: ALERT_COLOUR } },
        { xref: "paper", yref: "y", x: 1, y: Math.log10(thresholds.ttc), text: `TTC ${thresholds.ttc} s`, showarrow: false, xanchor: "right", yanchor: "bottom", font: { color: ALERT_COLOUR } },
      ],
      height: 420,
      showlegend: false,
    }),
    config: FIGURE_CONFIG,
  };
}
