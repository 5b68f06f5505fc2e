import { FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";

/** A histogram of finite values (non-finite ones are counted in the title, not plotted). */
export function histogramFigure(values: ArrayLike<number>, title: string, xTitle: string, options: { bins?: number; logY?: boolean; threshold?: number } = {}): Figure {
  const finite: number[] = [];
  let skipped = 0;
  for (let i = 0; i < values.length; i++) {
    const v = values[i]!;
    if (Number.isFinite(v)) finite.push(round(v, 4));
    else skipped++;
  }
  return {
    data: [{ type: "histogram", x: finite, nbinsx: options.bins ?? 60, marker: { color: PALETTE[0] }, name: xTitle }],
    layout: baseLayout(`${title}${skipped > 0 ? ` (${skipped} without a value not shown)` : ""}`, {
      xaxis: { title: { text: xTitle } },
      yaxis: { title: { text: "count" }, type: options.logY ? "log" : "linear" },
      bargap: 0.02,
      height: 340,
      shapes:
        options.threshold !== undefined
          ? [{ type: "line", xref: "x", yref: "paper", x0: options.threshold, x1: options.threshold, y0: 0, y1: 1, line: { color: "#b3261e", dash: "dash" } }]
          : [],
    }),
    config: FIGURE_CONFIG,
  };
}
