import type { ConcreteTestCase, LogicalScenario, Plan } from "./logicalTypes.js";

function cell(v: string | number | boolean | null): string {
  if (v === null) return "";
  if (typeof v === "number") return Number.isFinite(v) ? String(v) : "";
  const s = String(v);
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** plan.csv (schema 2.0.0): one row per concrete test case with its logical scenario; values as JSON. */
export const CONCRETE_CSV_COLUMNS = [
  "test_case",
  "logical_scenario",
  "class",
  "kind",
  "weight",
  "scenario_id",
  "recording",
  "ego_track",
  "window",
  "t_start_s",
  "t_end_s",
  "event_id",
  "values",
  "reasons",
] as const;

function row(t: ConcreteTestCase): (string | number | null)[] {
  return [
    t.id,
    t.logicalScenario,
    t.classId,
    t.kind,
    t.weight,
    t.scenarioId,
    t.source?.recording ?? null,
    t.source?.egoTrack ?? null,
    t.source?.window ?? null,
    t.source?.tStart ?? null,
    t.source?.tEnd ?? null,
    t.eventId,
    JSON.stringify(t.values),
    t.reasons.join("; "),
  ];
}

export function planToCsv(plan: Plan): string {
  const lines = [CONCRETE_CSV_COLUMNS.join(",")];
  for (const t of plan.testCases) lines.push(row(t).map(cell).join(","));
  return `${lines.join("\n")}\n`;
}

/** logical-scenarios.csv: one row per logical scenario; parameter ranges as "name=min..max [p05, p50, p95] unit". */
export const LOGICAL_CSV_COLUMNS = [
  "logical_scenario",
  "class",
  "class_name",
  "name",
  "scenarios",
  "km",
  "hours",
  "share",
  "time_share",
  "rate_per_1000km",
  "rate_lower",
  "rate_upper",
  "representative",
  "critical_anchors",
  "test_cases",
  "parameters",
  "representation_error",
] as const;

function lsRow(l: LogicalScenario): (string | number | null)[] {
  return [
    l.id,
    l.classId,
    l.className,
    l.name,
    l.scenarios,
    l.km,
    l.hours,
    l.share,
    l.timeShare,
    l.ratePer1000km.rate,
    l.ratePer1000km.lower,
    l.ratePer1000km.upper,
    l.representative.scenarioId,
    l.criticalAnchors.length,
    l.testCases,
    l.parameters.map((p) => (p.measurable > 0 ? `${p.name}=${p.min}..${p.max} [${p.p05}, ${p.p50}, ${p.p95}] ${p.unit}` : `${p.name}=not measurable`)).join("; "),
    Object.entries(l.representationError)
      .map(([k, e]) => `${k}: median ${e.median}, p90 ${e.p90}`)
      .join("; "),
  ];
}

export function logicalScenariosToCsv(plan: Plan): string {
  const lines = [LOGICAL_CSV_COLUMNS.join(",")];
  for (const l of plan.logicalScenarios) lines.push(lsRow(l).map(cell).join(","));
  return `${lines.join("\n")}\n`;
}
