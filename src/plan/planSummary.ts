import type { TestPlan } from "./types.js";

/** The cautions every plan carries, in this order. */
export const PLAN_CAUTIONS: readonly string[] = [
  "These estimates describe the recordings — the roads, traffic, weather, vehicles and drivers that were recorded — and carry over to other conditions only with evidence that those conditions are alike.",
  "They are not a safety argument on their own; the responsible safety process (ISO 26262, ISO 21448) decides how they are used.",
  "Exposure classes are shown as an aid for hazard analysis (ISO 26262-3 Annex B thresholds quoted from memory); this tool does not decide them.",
  "Coverage, rarefaction and coupon-collector figures treat scenario windows as independent draws; consecutive windows of one drive are correlated, so the real uncertainty is larger than stated.",
  "A kind of situation is what the type key and the clustering can tell apart; situations they cannot distinguish count as one.",
];

/** Percent with three significant digits (e.g. "87.3 %", "0.0412 %"), deterministic. */
export function formatPercent(share: number): string {
  if (!Number.isFinite(share)) return "n/a";
  const p = 100 * share;
  if (p === 0) return "0 %";
  // Never round a share just below 100 % up to "100 %": add decimals until it stays below.
  if (p > 99.5 && p < 100) {
    for (let d = 1; d <= 12; d++) if (Number(p.toFixed(d)) < 100) return `${Number(p.toFixed(d))} %`;
  }
  return `${trimNumber(p)} %`;
}

/** Three significant digits, thousands as "k", "million", "billion" for readability; deterministic. */
export function formatQuantity(v: number): string {
  if (v === Infinity) return "an unbounded number of";
  if (!Number.isFinite(v)) return "n/a";
  const a = Math.abs(v);
  if (a >= 1e9) return `${trimNumber(v / 1e9)} billion`;
  if (a >= 1e6) return `${trimNumber(v / 1e6)} million`;
  if (a >= 1000) return Math.round(v).toString().replace(/\B(?=(\d{3})+(?!\d))/g, " ");
  return trimNumber(v);
}

function trimNumber(v: number): string {
  if (v === 0) return "0";
  const a = Math.abs(v);
  const digits = a >= 100 ? 0 : a >= 10 ? 1 : a >= 1 ? 2 : Math.min(12, 2 - Math.floor(Math.log10(a)));
  return Number(v.toFixed(digits)).toString();
}

/** The plain-language paragraph stored in plan.summary. */
export function composeSummary(plan: TestPlan): string {
  const s = plan.selection;
  const a = plan.accounting;
  const t = plan.totals;
  const types = plan.coverage.typeKeys;
  const cl = plan.coverage.clusters;
  const zf = plan.coverage.zeroFailure;
  const lines: string[] = [];
  lines.push(
    `${s.testCases} test case${s.testCases === 1 ? "" : "s"} stand for ${formatPercent(a.testCasesShare)} of the recorded vehicle-kilometres ` +
      `(${formatQuantity(a.testCasesShare * t.km)} of ${formatQuantity(t.km)} km) and ${formatPercent(a.testCasesTimeShare)} of the recorded time ` +
      `(${s.representatives} cluster representative${s.representatives === 1 ? "" : "s"}, ${s.critical} critical, ${s.rare} rare).`,
  );
  if (s.budgetExceeded)
    lines.push(`The budget of ${s.budget} test cases was exceeded: ${s.mustKeep} critical or rare scenarios are kept because they must not be averaged away.`);
  if (plan.leftOut.length > 0)
    lines.push(
      `The ${s.targetShare !== null && plan.leftOut.every((l) => l.reason === "target share reached") ? "target share" : "budget"} left out ${formatPercent(a.leftOutShare)} of the recorded vehicle-kilometres (${plan.leftOut.length} cluster${plan.leftOut.length === 1 ? "" : "s"} without a test case).`,
    );
  lines.push(
    `The chance that a new scenario is of a type not yet in the catalogue is ${formatPercent(types.unseenMass)} (Good–Turing: ${types.singletons} of ${types.scenarios} scenarios are of a type seen once). ` +
      `The recordings show ${types.observed} types of an estimated ${formatQuantity(types.chao1.estimate)} (Chao1, ${Math.round(100 * types.chao1.level)} % interval ${formatQuantity(types.chao1.lower)}–${formatQuantity(types.chao1.upper)}), ` +
      `and ${cl.observed} clusters${plan.coverage.clusterNoise === "singletons" && s.noiseScenarios > 0 ? " (each noise scenario counted as its own)" : ""} of an estimated ${formatQuantity(cl.chao1.estimate)}.`,
  );
  const e = types.effort[0];
  if (e)
    lines.push(
      e.additionalKm > 0
        ? `About ${formatQuantity(e.additionalKm)} more kilometres would be needed to see ${formatPercent(e.share)} of the estimated types (Chao et al. 2009); seeing every estimated unseen type would take about ${formatQuantity(types.couponCollector.estimated.additionalKm)} more km if they were as frequent as the estimated unseen mass suggests (rarer ones take longer).`
        : `The recordings already show ${formatPercent(e.share)} of the estimated types.`,
    );
  const perMillion = zf.rateBoundPerKm * 1e6;
  let zl = `With no event in the recorded ${formatQuantity(zf.recordedKm)} km, a rate below ${formatQuantity(perMillion)} per million km is shown at ${formatPercent(zf.confidence)} confidence`;
  if (zf.reference)
    zl += `; showing a rate below ${zf.reference.label} would need about ${formatQuantity(zf.reference.kmNeeded)} km without an event, of which ${formatPercent(zf.reference.recordedShareOfNeeded)} is recorded`;
  lines.push(`${zl}.`);
  return lines.join(" ");
}

/** Plain-text summary of a plan: the paragraph, the cautions and any warnings. */
export function planSummary(plan: TestPlan): string {
  const out = [plan.summary || composeSummary(plan), "", "Cautions:", ...plan.cautions.map((c) => `- ${c}`)];
  if (plan.warnings.length > 0) out.push("", "Warnings:", ...plan.warnings.map((w) => `- ${w}`));
  return `${out.join("\n")}\n`;
}
