import { InputError } from "../core/errors.js";
import type { Matrix } from "../core/matrix.js";
import { ALERT_COLOUR, FIGURE_CONFIG, baseLayout, clusterColour, round, type Figure } from "./figure.js";

export interface ScenarioMapInput {
  /** n × 2 coordinates of the 2-D map. */
  coords: Matrix;
  /** Cluster label per scenario (-1 = noise). */
  labels: Int32Array;
  /** Scenario indices chosen as test cases (representatives are marked). */
  representatives: ArrayLike<number>;
  /** Optional hover text per scenario (e.g. its id and type key). */
  hover?: string[];
  /** Optional flag per scenario: critical scenarios get an outline. */
  critical?: ArrayLike<boolean>;
  /** Map method ("pca" or "umap"), named in the title. */
  method: string;
  /** Legend name per cluster label (default "cluster 3", "rare: in no dense cluster"). */
  clusterName?: (label: number) => string;
  title?: string;
}

/**
 * Scatter of all scenarios on the 2-D map, one trace per cluster (so the legend can hide clusters),
 * noise in grey, representatives as large diamonds. WebGL (scattergl) keeps 100k points interactive.
 */
export function scenarioMapFigure(input: ScenarioMapInput): Figure {
  const { coords, labels } = input;
  if (coords.cols !== 2) throw new InputError(`coords.cols=${coords.cols} should be 2`);
  if (labels.length !== coords.rows) throw new InputError(`labels.length=${labels.length} should equal coords.rows=${coords.rows}`);
  const groups = new Map<number, number[]>();
  for (let i = 0; i < labels.length; i++) {
    const l = labels[i]!;
    let g = groups.get(l);
    if (!g) groups.set(l, (g = []));
    g.push(i);
  }
  const keys = [...groups.keys()].sort((a, b) => a - b);
  const big = coords.rows > 5000;
  const data: Record<string, unknown>[] = keys.map((l) => {
    const idx = groups.get(l)!;
    return {
      type: big ? "scattergl" : "scatter",
      mode: "markers",
      name: `${input.clusterName ? input.clusterName(l) : l < 0 ? "rare: in no dense cluster" : `cluster ${l}`} (${idx.length})`,
      x: idx.map((i) => round(coords.data[2 * i]!)),
      y: idx.map((i) => round(coords.data[2 * i + 1]!)),
      text: input.hover ? idx.map((i) => input.hover![i]!) : undefined,
      hoverinfo: input.hover ? "text" : "x+y+name",
      marker: { size: big ? 3 : 5, color: clusterColour(l), opacity: l < 0 ? 0.55 : 0.7 },
    };
  });
  const crit: number[] = [];
  if (input.critical) for (let i = 0; i < labels.length; i++) if (input.critical[i]) crit.push(i);
  if (crit.length > 0)
    data.push({
      type: "scatter",
      mode: "markers",
      name: `critical: red ring (${crit.length})`,
      x: crit.map((i) => round(coords.data[2 * i]!)),
      y: crit.map((i) => round(coords.data[2 * i + 1]!)),
      text: input.hover ? crit.map((i) => input.hover![i]!) : undefined,
      hoverinfo: input.hover ? "text" : "x+y",
      marker: { size: 9, color: "rgba(0,0,0,0)", line: { color: ALERT_COLOUR, width: 1.5 } },
    });
  const reps = Array.from(input.representatives);
  data.push({
    type: "scatter",
    mode: "markers",
    name: `test cases: diamond (${reps.length})`,
    x: reps.map((i) => round(coords.data[2 * i]!)),
    y: reps.map((i) => round(coords.data[2 * i + 1]!)),
    text: input.hover ? reps.map((i) => input.hover![i]!) : undefined,
    hoverinfo: input.hover ? "text" : "x+y",
    marker: {
      size: 13,
      symbol: "diamond",
      color: reps.map((i) => clusterColour(labels[i]!)),
      line: { color: "#111111", width: 1.5 },
    },
  });
  const m = input.method.toUpperCase();
  // The map's coordinates have no unit or meaning of their own (only distances matter), so the axes
  // carry no numbers and are named by what the reader can take from them.
  const axis = (text: string): Record<string, unknown> => ({ title: { text }, zeroline: false, showticklabels: false, ticks: "" });
  return {
    data,
    layout: baseLayout(input.title ?? `Map of similarity: every scenario is a point, nearby points are similar scenarios (${m})`, {
      xaxis: axis("map of similarity — nearby points are similar scenarios"),
      yaxis: axis("(the directions have no meaning of their own)"),
      legend: { itemsizing: "constant", orientation: "h", y: -0.08, font: { size: 11 } },
      height: 640,
      margin: { l: 40, r: 20, t: 50, b: 20 },
    }),
    config: FIGURE_CONFIG,
  };
}
