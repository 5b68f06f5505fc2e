import type { Plan } from "../plan/logicalTypes.js";
import type { ReportSection } from "./html.js";

const pct = (x: number): string => `${(100 * x).toFixed(2)} %`;
const g3 = (x: number): string => (Number.isInteger(x) ? String(x) : x.toPrecision(3));

/** Report sections for the plan of logical scenarios: classes, logical scenarios by class, critical events. */
export function logicalSections(plan: Plan): ReportSection[] {
  const s = plan.selection;
  const weak = plan.classes.filter((c) => c.weak || c.coverage < 0.9);
  const out: ReportSection[] = [];
  out.push({
    id: "classes",
    heading: "Scenario classes",
    paragraphs: [
      `Every scenario falls into one class by a fixed rule (first match wins, see docs/logical.md). Inside each class the scenarios are clustered on the class's standardized parameters; k is the smallest number whose representatives lie within the stated tolerances of 90 % of the class's exposure, at most ${Math.max(...plan.classes.map((c) => c.k))}.` +
        (weak.length > 0 ? ` Weak structure or tolerance not reached in: ${weak.map((c) => `${c.classId} (silhouette ${c.silhouette === null ? "–" : c.silhouette.toFixed(2)}, ${pct(c.coverage)} within tolerance)`).join(", ")}; the logical scenarios there split a continuum.` : ""),
    ],
    tables: [
      {
        columns: ["class", "in words", "scenarios", "km share", "k", "within tolerance", "silhouette", "Calinski–Harabasz", "Davies–Bouldin"],
        rows: plan.classes.map((c) => [c.classId, c.name, c.scenarios, pct(c.share), c.k, pct(c.coverage), c.silhouette === null ? "–" : c.silhouette.toFixed(3), c.calinskiHarabasz === null ? "–" : c.calinskiHarabasz.toFixed(1), c.daviesBouldin === null ? "–" : c.daviesBouldin.toFixed(3)]),
      },
    ],
  });
  out.push({
    id: "logical-scenarios",
    heading: "Logical scenarios by class",
    paragraphs: [
      `${s.logicalScenarios} logical scenarios; ${s.testCases} concrete test cases under ${s.defaultBudget ? "the default" : "a"} budget of ${s.budget}: ${s.representatives} representatives, ${s.critical} critical anchors, ${s.variations} sampled variations. ` +
        `Logical scenarios with a test case stand for ${pct(plan.accounting.testedShare)} of the kilometres; ${pct(plan.accounting.leftOutShare)} is left out. Ranges are min..max with the exposure-weighted 5 / 50 / 95 % quantiles; the representation error is how far members lie from the representative (median / 90th percentile, parameter units).`,
    ],
    tables: [
      {
        columns: ["logical scenario", "class", "in words", "scenarios", "km share", "per 1000 km [95 % interval]", "parameter ranges", "representation error", "anchors", "test cases"],
        rows: plan.logicalScenarios.map((l) => [
          l.id,
          l.classId,
          l.name,
          l.scenarios,
          pct(l.share),
          `${g3(l.ratePer1000km.rate)} [${g3(l.ratePer1000km.lower)}, ${g3(l.ratePer1000km.upper)}]`,
          l.parameters.map((p) => (p.measurable > 0 ? `${p.name} ${g3(p.min)}..${g3(p.max)} ${p.unit} (${g3(p.p05)} / ${g3(p.p50)} / ${g3(p.p95)})` : `${p.name} not measurable`)).join("; "),
          Object.entries(l.representationError).map(([k, e]) => `${k} ${g3(e.median)} / ${g3(e.p90)}`).join("; "),
          `${l.criticalAnchors.length} (${l.criticalAnchors.filter((a) => a.scheduled).length} scheduled)`,
          l.testCases,
        ]),
      },
    ],
  });
  out.push({
    id: "critical-events",
    heading: "Critical events, counted once",
    paragraphs: [
      `${s.criticalEvents} critical events (one per vehicle pair and time span, whichever window saw it); ${s.unscheduledAnchors} are listed but not scheduled under the budget. ${s.rejectedCritical} flagged window(s) were rejected as artefacts: ${plan.rejectedCritical.map((r) => `${r.scenarioId} (${r.reason})`).join("; ") || "none"}.`,
    ],
    tables: [
      {
        columns: ["event", "tracks", "time (s)", "logical scenario", "min TTC (s)", "min THW (s)", "peak decel (m/s²)", "scheduled", "rules"],
        rows: plan.criticalEvents.map((e) => [e.id, e.tracks.join(", "), `${e.tFrom.toFixed(2)}–${e.tTo.toFixed(2)}`, e.logicalScenario, e.minTtc === null ? "–" : e.minTtc.toFixed(2), e.minThw === null ? "–" : e.minThw.toFixed(2), e.maxDecel === null ? "–" : e.maxDecel.toFixed(2), e.scheduled ? "yes" : "no", e.rules.join("; ")]),
      },
    ],
  });
  if (plan.leftOut.length > 0)
    out.push({
      id: "left-out",
      heading: "Left out by the budget",
      tables: [{ columns: ["logical scenario", "in words", "scenarios", "km share", "reason"], rows: plan.leftOut.map((l) => [l.logicalScenario, l.name, l.scenarios, pct(l.share), l.reason]) }],
    });
  return out;
}
