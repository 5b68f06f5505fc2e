import { ALERT_COLOUR, FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

/**
 * Sorted k-distance curve (Ester et al. 1996) with the chosen eps: rows to the right of the knee are
 * far from their k-th neighbour and become DBSCAN noise, the rare scenarios.
 */
export function kDistanceFigure(kDistances: ArrayLike<number>, eps: number, k: number, maxPoints = 2000): Figure {
  const n = kDistances.length;
  const step = Math.max(1, Math.ceil(n / maxPoints));
  const x: number[] = [];
  const y: number[] = [];
  for (let i = 0; i < n; i += step) {
    x.push(i);
    y.push(round(kDistances[i]!, 5));
  }
  if (n > 0 && x[x.length - 1] !== n - 1) {
    x.push(n - 1);
    y.push(round(kDistances[n - 1]!, 5));
  }
  return {
    data: [{ type: "scatter", mode: "lines", name: `${k}-distance`, x, y, line: { color: PALETTE[0] } }],
    layout: baseLayout(`Sorted ${k}-distance curve and the DBSCAN radius eps = ${eps.toPrecision(4)}`, {
      xaxis: { title: { text: "scenarios, sorted" } },
      yaxis: { title: { text: `distance to the ${k}-th neighbour` } },
      shapes: [{ type: "line", xref: "paper", x0: 0, x1: 1, y0: eps, y1: eps, line: { color: ALERT_COLOUR, dash: "dash" } }],
      height: 340,
      showlegend: false,
    }),
    config: FIGURE_CONFIG,
  };
}
