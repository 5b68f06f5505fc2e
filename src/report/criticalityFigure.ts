import { ALERT_COLOUR, FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

/** Which plan rule made a scenario critical (the first that applies), or null. */
export type CriticalRule = "ttc" | "thw" | "cut-in" | "decel" | "flag";

export interface CriticalityPoint {
  minTtc: number;
  minThw: number;
  /** The first plan rule the scenario crossed, null when it is not critical. */
  rule: CriticalRule | null;
  hover?: string;
}

/** The thresholds the plan ran with (the ones drawn and named). */
export interface CriticalityThresholds {
  ttc: number;
  thw: number;
  cutInThw: number;
  decel: number;
}

const RULES: { rule: CriticalRule; symbol: string; name: (t: CriticalityThresholds) => string }[] = [
  { rule: "ttc", symbol: "circle", name: (t) => `critical: TTC below ${t.ttc} s` },
  { rule: "thw", symbol: "square", name: (t) => `critical: time headway below ${t.thw} s` },
  { rule: "cut-in", symbol: "triangle-up", name: (t) => `critical: cut-in with headway below ${t.cutInThw} s` },
  { rule: "decel", symbol: "diamond-open", name: (t) => `critical: braking harder than ${t.decel} m/s² (see the braking chart)` },
  { rule: "flag", symbol: "x", name: () => "critical: a listed criticality flag" },
];

/** Labelled ticks for a log axis of seconds. */
function logTicks(lo: number, cap: number): { tickvals: number[]; ticktext: string[] } {
  // Leave out ticks too close to the cap on a log axis (50 beside 60 would overlap).
  const vals = [0.05, 0.1, 0.2, 0.5, 1, 2, 5, 10, 20, 50].filter((v) => v >= lo * 0.999 && v <= cap / 1.5);
  return { tickvals: [...vals, cap], ticktext: [...vals.map((v) => String(v)), `${cap}+ / none`] };
}

/**
 * Minimum time headway against minimum TTC per scenario, on log axes with labelled ticks, one
 * trace (and legend entry) per plan rule, and the thresholds the plan used drawn as lines.
 * Scenarios without a leader (THW infinite) or never closing in (TTC infinite) sit at the cap.
 */
export function criticalityFigure(points: CriticalityPoint[], thresholds: CriticalityThresholds, cap = 60): Figure {
  const capped = points.map((p) => ({ ...p, ttc: Math.min(p.minTtc, cap), thw: Math.min(p.minThw, cap) }));
  const big = points.length > 5000;
  const trace = (mine: typeof capped, name: string, marker: Record<string, unknown>): Record<string, unknown> => ({
    type: big ? "scattergl" : "scatter",
    mode: "markers",
    name: `${name} (${mine.length})`,
    x: mine.map((p) => round(p.thw, 3)),
    y: mine.map((p) => round(p.ttc, 3)),
    text: mine.map((p) => p.hover ?? ""),
    hoverinfo: "text+x+y",
    marker,
  });
  const data: Record<string, unknown>[] = [trace(capped.filter((p) => p.rule === null), "not critical", { size: 5, opacity: 0.45, color: PALETTE[0] })];
  for (const r of RULES) {
    const mine = capped.filter((p) => p.rule === r.rule);
    if (mine.length > 0) data.push(trace(mine, r.name(thresholds), { size: 8, symbol: r.symbol, color: ALERT_COLOUR, line: { color: ALERT_COLOUR, width: 1.2 } }));
  }
  const finite = (v: number): boolean => Number.isFinite(v) && v > 0;
  const lo = Math.min(cap, thresholds.thw, thresholds.ttc, ...capped.map((p) => p.thw).filter(finite), ...capped.map((p) => p.ttc).filter(finite));
  const range = [Math.log10(lo * 0.8), Math.log10(cap * 1.25)];
  const line = (axis: "x" | "y", v: number, dash: string): Record<string, unknown> =>
    axis === "x"
      ? { type: "line", xref: "x", yref: "paper", x0: v, x1: v, y0: 0, y1: 1, line: { color: ALERT_COLOUR, dash, width: 1.2 } }
      : { type: "line", xref: "paper", yref: "y", x0: 0, x1: 1, y0: v, y1: v, line: { color: ALERT_COLOUR, dash, width: 1.2 } };
  const shapes = [line("x", thresholds.thw, "dash"), line("y", thresholds.ttc, "dash")];
  const annotations: Record<string, unknown>[] = [
    { xref: "x", yref: "paper", x: Math.log10(thresholds.thw), y: 1, text: `THW ${thresholds.thw} s`, showarrow: false, yanchor: "bottom", font: { color: ALERT_COLOUR } },
    { xref: "paper", yref: "y", x: 1, y: Math.log10(thresholds.ttc), text: `TTC ${thresholds.ttc} s`, showarrow: false, xanchor: "right", yanchor: "bottom", font: { color: ALERT_COLOUR } },
  ];
  if (thresholds.cutInThw > 0 && thresholds.cutInThw !== thresholds.thw) {
    shapes.push(line("x", thresholds.cutInThw, "dot"));
    annotations.push({ xref: "x", yref: "paper", x: Math.log10(thresholds.cutInThw), y: 0.94, text: `cut-in THW ${thresholds.cutInThw} s`, showarrow: false, xanchor: "left", font: { color: ALERT_COLOUR, size: 11 } });
  }
  return {
    data,
    layout: baseLayout("How close each scenario came: shortest time headway and shortest time-to-collision", {
      xaxis: { title: { text: "shortest time headway to the leader (s, log)" }, type: "log", range, tickangle: 0, ...logTicks(lo, cap) },
      yaxis: { title: { text: "shortest TTC while closing in (s, log)" }, type: "log", range, tickangle: 0, ...logTicks(lo, cap) },
      shapes,
      annotations,
      height: 480,
      showlegend: true,
      legend: { orientation: "h", y: -0.18 },
      margin: { l: 95, r: 20, t: 50, b: 90 },
    }),
    config: FIGURE_CONFIG,
  };
}
