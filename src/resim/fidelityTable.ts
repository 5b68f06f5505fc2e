import type { ReplayFidelity } from "./replayFidelity.js";
import type { EgoOutcome } from "./simulateScenario.js";

/**
 * Fidelity targets for replaying a recorded test case. About 0.5 % speed MAPE is a figure reported in
 * the trade for re-simulation on synthetic data (common practice, no source); the gap and THW targets
 * are ours, chosen so that a replay that passes keeps the plan's THW thresholds meaningful.
 */
export const FIDELITY_TARGETS = Object.freeze({ speedMape: 0.5, gapMape: 1, minThwDiff: 0.05 });

/** One test case's re-simulation result: the `fidelity` block a plan's test case can carry. */
export interface FidelityRow {
  testCase: string;
  role: string;
  logicalScenario: string | null;
  file: string;
  replay: ReplayFidelity | null;
  /** True when every replay figure that could be measured is within FIDELITY_TARGETS. */
  withinTargets: boolean | null;
  /** The ego as replayed (what the file says) and as driven by the reference driver. */
  replayOutcome: EgoOutcome;
  closedLoop: EgoOutcome | null;
  /** Assigned back to its own logical scenario (null when no assignment was run). */
  assignedBack: boolean | null;
  warnings: string[];
}

export function withinTargets(f: ReplayFidelity): boolean | null {
  const checks: boolean[] = [];
  if (f.speedMape !== null) checks.push(f.speedMape <= FIDELITY_TARGETS.speedMape);
  if (f.gapMape !== null) checks.push(f.gapMape <= FIDELITY_TARGETS.gapMape);
  if (f.minThwDiff !== null) checks.push(f.minThwDiff <= FIDELITY_TARGETS.minThwDiff);
  return checks.length > 0 ? checks.every(Boolean) : null;
}

/** The block for plan.json (testCases[i].fidelity): stable key order, numbers rounded for reading. */
export function fidelityBlock(r: FidelityRow): Record<string, unknown> {
  const rd = (v: number | null, d = 4): number | null => (v === null ? null : Number(v.toFixed(d)));
  const outcome = (o: EgoOutcome | null) => (o ? { minTtc: rd(o.minTtc), minThw: rd(o.minThw), collision: o.collision, collisionTime: rd(o.collisionTime), collisionAhead: o.collisionAhead } : null);
  const f = r.replay;
  return {
    replay: f
      ? {
          frames: f.frames,
          leaderAgreement: rd(f.leaderAgreement),
          speedMape: rd(f.speedMape),
          speedMae: rd(f.speedMae),
          sourceMinSpeed: rd(f.sourceMinSpeed),
          gapMape: rd(f.gapMape),
          thwMape: rd(f.thwMape),
          lateralMape: rd(f.lateralMape),
          minThwSource: rd(f.minThwSource),
          minThwResim: rd(f.minThwResim),
          minThwDiff: rd(f.minThwDiff),
        }
      : null,
    withinTargets: r.withinTargets,
    targets: { ...FIDELITY_TARGETS },
    replayOutcome: outcome(r.replayOutcome),
    closedLoop: outcome(r.closedLoop),
    assignedBack: r.assignedBack,
  };
}

export const FIDELITY_CSV_COLUMNS = [
  "test_case",
  "role",
  "logical_scenario",
  "frames",
  "leader_agreement",
  "speed_mape_pct",
  "speed_mae_mps",
  "gap_mape_pct",
  "thw_mape_pct",
  "lateral_mape_pct",
  "min_thw_source_s",
  "min_thw_resim_s",
  "min_thw_diff_s",
  "within_targets",
  "closed_loop_min_ttc_s",
  "closed_loop_min_thw_s",
  "closed_loop_collision",
  "closed_loop_collision_ahead",
  "assigned_back",
] as const;

export function fidelityCsv(rows: readonly FidelityRow[]): string {
  const n = (v: number | null | undefined, d = 4): string => (v === null || v === undefined ? "" : v.toFixed(d));
  const b = (v: boolean | null): string => (v === null ? "" : v ? "true" : "false");
  const q = (s: string): string => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  const lines = [FIDELITY_CSV_COLUMNS.join(",")];
  for (const r of rows) {
    const f = r.replay;
    lines.push(
      [
        q(r.testCase),
        q(r.role),
        q(r.logicalScenario ?? ""),
        f ? String(f.frames) : "",
        n(f?.leaderAgreement),
        n(f?.speedMape),
        n(f?.speedMae),
        n(f?.gapMape),
        n(f?.thwMape),
        n(f?.lateralMape),
        n(f?.minThwSource),
        n(f?.minThwResim),
        n(f?.minThwDiff),
        b(r.withinTargets),
        n(r.closedLoop?.minTtc),
        n(r.closedLoop?.minThw),
        r.closedLoop ? b(r.closedLoop.collision) : "",
        r.closedLoop ? b(r.closedLoop.collisionAhead) : "",
        b(r.assignedBack),
      ].join(","),
    );
  }
  return `${lines.join("\n")}\n`;
}
