import type { ReportSection } from "./html.js";
import type { TestPlan } from "../plan/types.js";

/**
 * A section that comes before everything else in the report when the plan carries logical
 * scenarios (plan schema 2.0.0, `plan.logicalScenarios`). It takes the plan and returns either a
 * ReportSection or ready-made section HTML (trusted; escape data inside), or null to leave it out.
 */
export type LeadSection = (plan: TestPlan & { logicalScenarios?: readonly unknown[] }) => ReportSection | { id: string; heading: string; html: string } | string | null;

/**
 * The slot for the logical-scenario section. The owner of src/report/logicalSection.ts registers
 * it here (one import and one entry); buildReport renders these first, and only when
 * `plan.logicalScenarios` exists, so a plan of schema 1.x reports as before.
 */
export const LEAD_SECTIONS: LeadSection[] = [];

/** Turn the lead sections into report sections, in order (empty when the plan has no logical scenarios). */
export function leadSections(plan: TestPlan & { logicalScenarios?: readonly unknown[] }, sections: readonly LeadSection[] = LEAD_SECTIONS): ReportSection[] {
  if (!Array.isArray(plan.logicalScenarios)) return [];
  const out: ReportSection[] = [];
  sections.forEach((f, i) => {
    const s = f(plan);
    if (s === null) return;
    if (typeof s === "string") out.push({ id: `logical-${i}`, heading: "Logical scenarios", html: s });
    else out.push(s);
  });
  return out;
}
