/**
 * Hand-built logical scenarios (CONTRACT.md §2 shape) for the template tests, one per templated class,
 * with values typical of motorway traffic (fictional, chosen by hand; not measured).
 */
import type { LogicalScenarioLike, LogicalScenarioParameter } from "../../src/exports/logicalScenarioShape.js";

function param(name: string, unit: string, lo: number, hi: number, description: string): LogicalScenarioParameter {
  const edges = Array.from({ length: 6 }, (_, i) => lo + ((hi - lo) * i) / 5);
  return { name, unit, description, min: lo, max: hi, p05: lo + 0.05 * (hi - lo), p50: (lo + hi) / 2, p95: lo + 0.95 * (hi - lo), measurable: 1, histogram: { edges, weights: [1, 3, 4, 3, 1] } };
}

/** Parameter ranges of the hand-built scenarios (also the ranges variations are drawn from). */
export const RANGES: Record<string, [number, number, string, string]> = {
  egoSpeed: [22, 34, "m/s", "ego speed at the start"],
  leaderSpeed: [22, 34, "m/s", "leader speed before braking"],
  gap: [15, 50, "m", "bumper-to-bumper gap to the leader"],
  leaderDecel: [2, 7, "m/s²", "peak leader deceleration"],
  brakeDuration: [2.5, 4, "s", "braking duration"],
  cutterRelSpeed: [-4, 3, "m/s", "cutter speed minus ego speed"],
  gapAtCrossing: [10, 40, "m", "gap when the cutter crosses the marking"],
  laneChangeDuration: [3, 7, "s", "lane-change duration"],
  targetGapAhead: [30, 80, "m", "gap to the target-lane leader"],
  targetGapBehind: [20, 60, "m", "gap to the target-lane follower"],
  overtakerRelSpeed: [3, 10, "m/s", "overtaker speed minus ego speed"],
  lateralDistance: [3.4, 4.1, "m", "lateral centre-to-centre distance while passing"],
};

const CLASSES: Record<string, string[]> = {
  "free-driving": ["egoSpeed"],
  following: ["egoSpeed", "leaderSpeed", "gap"],
  "leader-braking": ["egoSpeed", "leaderSpeed", "gap", "leaderDecel", "brakeDuration"],
  "cut-in": ["egoSpeed", "cutterRelSpeed", "gapAtCrossing", "laneChangeDuration"],
  "lane-change-left": ["egoSpeed", "laneChangeDuration", "targetGapAhead", "targetGapBehind"],
  "lane-change-right": ["egoSpeed", "laneChangeDuration", "targetGapAhead", "targetGapBehind"],
  overtaken: ["egoSpeed", "overtakerRelSpeed", "lateralDistance"],
};

export function handBuiltLogicalScenarios(): LogicalScenarioLike[] {
  return Object.entries(CLASSES).map(([classId, names], i) => {
    const parameters = names.map((n) => param(n, RANGES[n]![2], RANGES[n]![0], RANGES[n]![1], RANGES[n]![3]));
    const values: Record<string, number | null> = {};
    for (const p of parameters) values[p.name] = Number(p.p50.toFixed(2));
    return {
      id: `LS-${String(i + 1).padStart(2, "0")}`,
      classId,
      className: classId.replace(/-/g, " "),
      name: `${classId} on the Orrowind Motorway`,
      parameters,
      dependence: null,
      representative: { scenarioId: `orrowind/${10 + i}/0`, recording: "orrowind", egoTrack: 10 + i, tStart: 0, tEnd: 12, values },
    };
  });
}
