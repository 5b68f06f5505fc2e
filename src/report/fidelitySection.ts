import { FIDELITY_TARGETS, type FidelityRow } from "../resim/fidelityTable.js";
import { ALERT_COLOUR, FIGURE_CONFIG, PALETTE, baseLayout, round, type Figure } from "./figure.js";
import type { ReportSection } from "./html.js";

const fix = (x: number | null | undefined, d = 3): string => (x === null || x === undefined || !Number.isFinite(x) ? "–" : x.toFixed(d));

/** Speed and gap MAPE per re-simulated test case against the targets (log scale: the spread is wide). */
export function fidelityFigure(rows: readonly FidelityRow[]): Figure {
  const ids = rows.map((r) => r.testCase);
  const y = (k: "speedMape" | "gapMape"): (number | null)[] => rows.map((r) => (r.replay?.[k] === null || r.replay?.[k] === undefined ? null : round(Math.max(r.replay[k]!, 1e-4), 5)));
  return {
    data: [
      { type: "scatter", mode: "markers", name: "speed MAPE (%)", x: ids, y: y("speedMape"), marker: { color: PALETTE[0], size: 6 } },
      { type: "scatter", mode: "markers", name: "gap MAPE (%)", x: ids, y: y("gapMape"), marker: { color: PALETTE[1], size: 6, symbol: "diamond" } },
    ],
    layout: baseLayout("Replay fidelity per test case (lower is better)", {
      xaxis: { title: { text: "test case" }, showticklabels: rows.length <= 60 },
      yaxis: { title: { text: "MAPE (%)" }, type: "log" },
      shapes: [
        { type: "line", xref: "paper", x0: 0, x1: 1, y0: FIDELITY_TARGETS.speedMape, y1: FIDELITY_TARGETS.speedMape, line: { color: ALERT_COLOUR, dash: "dash" } },
        { type: "line", xref: "paper", x0: 0, x1: 1, y0: FIDELITY_TARGETS.gapMape, y1: FIDELITY_TARGETS.gapMape, line: { color: PALETTE[1], dash: "dot" } },
      ],
      legend: { orientation: "h", y: -0.25 },
      height: 380,
    }),
    config: FIGURE_CONFIG,
  };
}

/**
 * The report section on re-simulation: how closely each exported test case replays what was recorded
 * (measured by roadsieve's own chain on both) and how the reference driver fares in closed loop. A
 * hook for buildReport (pass the rows of resimPlanFolder) and the body of resim/fidelity.html.
 */
export function fidelitySection(rows: readonly FidelityRow[]): ReportSection {
  const within = rows.filter((r) => r.withinTargets === true).length;
  const closed = rows.filter((r) => r.closedLoop);
  const ahead = closed.filter((r) => r.closedLoop!.collisionAhead === true).length;
  const behind = closed.filter((r) => r.closedLoop!.collision && r.closedLoop!.collisionAhead === false).length;
  return {
    id: "fidelity",
    heading: "Re-simulation fidelity",
    paragraphs: [
      `Each test case's OpenSCENARIO file was played by roadsieve's player at the recording's frame rate, written in the tracks format, read back and measured by the same chain as the recording. ` +
        `${within} of ${rows.length} test cases are within every target: speed MAPE ≤ ${FIDELITY_TARGETS.speedMape} % (a figure reported in the trade for re-simulation on synthetic data; common practice, no source), gap MAPE ≤ ${FIDELITY_TARGETS.gapMape} %, minimum THW within ${FIDELITY_TARGETS.minThwDiff} s.`,
      closed.length > 0
        ? `In closed loop the reference driver (IDM car-following, MOBIL lane changes) drove the ego while the others followed the scenario: ${ahead} test case(s) end in a collision with a vehicle ahead; ${behind} with a vehicle from behind, which does not react to the ego and says only that the reference driver left the recorded path.`
        : "No closed-loop runs.",
    ],
    figures: [{ figure: fidelityFigure(rows), caption: "Dashed: the speed target; dotted: the gap target." }],
    tables: [
      {
        caption: "Per test case (MAPE in %, THW and TTC in s; – = not measurable, e.g. no leader)",
        columns: ["test case", "role", "frames", "speed MAPE", "gap MAPE", "THW MAPE", "lateral MAPE", "min THW source", "min THW replay", "within targets", "closed loop min TTC", "closed loop min THW", "collision"],
        rows: rows.map((r) => [
          r.testCase,
          r.role,
          r.replay?.frames ?? "–",
          fix(r.replay?.speedMape),
          fix(r.replay?.gapMape),
          fix(r.replay?.thwMape),
          fix(r.replay?.lateralMape),
          fix(r.replay?.minThwSource, 2),
          fix(r.replay?.minThwResim, 2),
          r.withinTargets === null ? "–" : r.withinTargets ? "yes" : "no",
          fix(r.closedLoop?.minTtc, 2),
          fix(r.closedLoop?.minThw, 2),
          r.closedLoop ? (r.closedLoop.collision ? (r.closedLoop.collisionAhead ? "ahead" : "from behind") : "no") : "–",
        ]),
        maxRows: 300,
      },
    ],
  };
}
