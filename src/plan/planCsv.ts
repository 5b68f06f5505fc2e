import type { TestCase, TestPlan } from "./types.js";

/**
 * plan.csv: one row per test case, in plan order, with these columns (units in the names). Numbers
 * are written in JavaScript's shortest round-trip form; an empty cell means "none" (e.g. no closing
 * leader for min_ttc_s). Fields holding commas, quotes or line breaks are quoted (RFC 4180).
 */
export const PLAN_CSV_COLUMNS = [
  "test_case",
  "role",
  "reasons",
  "scenario_id",
  "recording",
  "ego_track",
  "window",
  "t_start_s",
  "t_end_s",
  "cluster",
  "type_key",
  "scenarios",
  "km",
  "hours",
  "share",
  "time_share",
  "rate_per_1000km",
  "rate_lower",
  "rate_upper",
  "rate_level",
  "exposure_class",
  "frequency_class",
  "min_ttc_s",
  "min_thw_s",
  "max_drac_mps2",
  "max_decel_mps2",
  "critical",
  "flags",
] as const;

function cell(v: string | number | boolean | null): string {
  if (v === null) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

function row(t: TestCase): (string | number | boolean | null)[] {
  const r = t.standsFor.ratePer1000km;
  return [
    t.id,
    t.role,
    t.reasons.join("; "),
    t.scenarioId,
    t.source.recording,
    t.source.egoTrack,
    t.source.window,
    t.source.tStart,
    t.source.tEnd,
    t.cluster,
    t.typeKey,
    t.standsFor.scenarios,
    t.standsFor.km,
    t.standsFor.hours,
    t.share,
    t.timeShare,
    r.rate,
    r.lower,
    r.upper,
    r.level,
    t.standsFor.exposureClass,
    t.standsFor.frequency.class,
    t.criticality.minTtc,
    t.criticality.minThw,
    t.criticality.maxDrac,
    t.criticality.maxDecel,
    t.criticality.critical,
    t.criticality.flags.join(";"),
  ];
}

export function testPlanToCsv(plan: TestPlan): string {
  const lines = [PLAN_CSV_COLUMNS.join(",")];
  for (const t of plan.testCases) lines.push(row(t).map(cell).join(","));
  return `${lines.join("\n")}\n`;
}
