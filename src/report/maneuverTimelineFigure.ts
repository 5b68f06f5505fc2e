import { LATERAL, LONGITUDINAL } from "../maneuvers/labels.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import type { Track } from "../recording/types.js";
import { FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

const LAT_COLOURS = ["#9aa0a6", PALETTE[0], PALETTE[1]];
const LON_COLOURS = ["#9aa0a6", PALETTE[2], PALETTE[3]];

/**
 * One track over time: lateral position (recorded and smoothed) with lane markings, speed and
 * acceleration, and the detected maneuver labels as coloured bands. For checking detection by eye.
 */
export function maneuverTimelineFigure(track: Track, m: TrackManeuvers, laneMarkings: number[]): Figure {
  const t = Array.from(track.t, (v) => round(v, 3));
  const n = t.length;
  const band = (codes: Int8Array, names: readonly string[], colours: string[], yref: string, y0: number, y1: number): Record<string, unknown>[] => {
    const shapes: Record<string, unknown>[] = [];
    let s = 0;
    for (let i = 1; i <= n; i++)
      if (i === n || codes[i] !== codes[s]) {
        shapes.push({ type: "rect", xref: "x", yref, x0: t[s], x1: t[i - 1], y0, y1, fillcolor: colours[codes[s]!], line: { width: 0 }, opacity: 0.85, name: names[codes[s]!] });
        s = i;
      }
    return shapes;
  };
  const shapes = [
    ...band(m.lateral, LATERAL, LAT_COLOURS, "paper", 0.94, 0.99),
    ...band(m.longitudinal, LONGITUDINAL, LON_COLOURS, "paper", 0.465, 0.51),
    ...laneMarkings.map((y) => ({ type: "line", xref: "paper", yref: "y", x0: 0, x1: 1, y0: y, y1: y, line: { color: "#6f7b87", dash: "dash", width: 1 } })),
  ];
  return {
    data: [
      { type: "scatter", mode: "markers", name: "y recorded", x: t, y: Array.from(track.y, (v) => round(v, 3)), marker: { size: 2, color: "#9aa0a6" } },
      { type: "scatter", mode: "lines", name: "y smoothed", x: t, y: Array.from(m.motion.y, (v) => round(v, 3)), line: { color: PALETTE[0] } },
      { type: "scatter", mode: "lines", name: "speed (m/s)", x: t, y: Array.from(m.motion.vx, (v) => round(v, 3)), yaxis: "y2", line: { color: PALETTE[2] } },
      { type: "scatter", mode: "lines", name: "acceleration (m/s²)", x: t, y: Array.from(m.motion.ax, (v) => round(v, 3)), yaxis: "y3", line: { color: PALETTE[3] } },
    ],
    layout: baseLayout(`Track ${track.id} (${track.kind}): top band lateral maneuver (blue left, orange right), middle band longitudinal (green accelerate, red decelerate)`, {
      xaxis: { title: { text: "t (s)" }, anchor: "y3" },
      yaxis: { title: { text: "y (m)" }, domain: [0.55, 0.93] },
      yaxis2: { title: { text: "speed" }, domain: [0.27, 0.45] },
      yaxis3: { title: { text: "accel." }, domain: [0, 0.22] },
      shapes,
      height: 560,
      legend: { orientation: "h", y: -0.12 },
    }),
    config: FIGURE_CONFIG,
  };
}
