/**
 * A plotly figure as plain data: what `Plotly.newPlot(div, data, layout, config)` takes. Figures
 * are built by pure functions in this folder and rendered by report/html.ts or report/notebook.ts,
 * so that presentation stays separate from computation.
 */
export interface Figure {
  data: Record<string, unknown>[];
  layout: Record<string, unknown>;
  config?: Record<string, unknown>;
}

/**
 * Our own categorical palette (12 hues, colour-blind aware ordering). No red: red (ALERT_COLOUR) is
 * kept for critical scenarios and thresholds, so a cluster can never be mistaken for them.
 */
export const PALETTE = [
  "#2f6db3",
  "#e08a1e",
  "#3a9a5b",
  "#4b4f9e",
  "#7d5ab5",
  "#5c8a8a",
  "#d36fae",
  "#6f7b87",
  "#a8a530",
  "#2aa3b8",
  "#1f3f6e",
  "#c9a227",
] as const;

/** Colour for noise / unclustered scenarios. */
export const NOISE_COLOUR = "#9aa0a6";
/** Colour for critical scenarios and thresholds. */
export const ALERT_COLOUR = "#b3261e";

export function clusterColour(label: number): string {
  return label < 0 ? NOISE_COLOUR : PALETTE[label % PALETTE.length]!;
}

/** Base layout shared by every figure: quiet background, readable fonts. */
export function baseLayout(title: string, extra: Record<string, unknown> = {}): Record<string, unknown> {
  return {
    title: { text: title, x: 0, xanchor: "left", font: { size: 16 } },
    font: { family: "system-ui, -apple-system, Segoe UI, Roboto, sans-serif", size: 12, color: "#1d2733" },
    paper_bgcolor: "#ffffff",
    plot_bgcolor: "#f7f8fa",
    margin: { l: 60, r: 20, t: 50, b: 50 },
    hovermode: "closest",
    ...extra,
  };
}

export const FIGURE_CONFIG: Record<string, unknown> = { responsive: true, displaylogo: false };

/** Round for compact, byte-stable figure JSON. */
export function round(v: number, digits = 4): number {
  if (!Number.isFinite(v)) return v;
  const f = 10 ** digits;
  return Math.round(v * f) / f;
}
