import { createHash } from "node:crypto";
import { InputError } from "../core/errors.js";
import type { Rng } from "../core/rng.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { describeExposure, exposureContext } from "../exposure/describeExposure.js";
import { scenarioWeights } from "../exposure/sampleWeights.js";
import { scenarioClass } from "../logical/classes.js";
import { findCriticalEvents, type CriticalEventOptions } from "../logical/criticalEvents.js";
import { fitLogicalScenarios, type LogicalFit, type LogicalFitOptions, type LogicalModel } from "../logical/fitLogicalScenarios.js";
import { sampleVariations } from "../logical/sampleVariations.js";
import type { Scenario } from "../scenario/types.js";
import { moreCritical } from "./criticality.js";
import { PLAN_V2_SCHEMA_VERSION, type ConcreteTestCase, type CriticalAnchor, type LogicalLeftOut, type LogicalScenario, type Plan, type PlanCriticalEvent } from "./logicalTypes.js";
import { resolveTestPlanOptions, type TestPlanOptions } from "./options.js";
import { formatPercent } from "./planSummary.js";
import type { TestPlan } from "./types.js";

/** Options of the logical level of the plan. */
export interface LogicalPlanOptions {
  /** Concrete test cases to run (default: DEFAULT_BUDGET, or the must-keep count when larger). */
  budget?: number;
  /** Logical scenarios with at least this km share get a test case before the spread-based rest (default 0.01). */
  minShare?: number;
  /** Extra weight of logical scenarios with critical anchors in the Neyman allocation (default 1: twice the weight). */
  criticalWeight?: number;
  /** Importance-sampling shift of the normal scores towards the dangerous side (default 0 = off). */
  importanceShift?: number;
  fit?: LogicalFitOptions;
  criticalEvents?: CriticalEventOptions;
}

export const DEFAULT_BUDGET = 40;

const h10 = (s: string): string => createHash("sha256").update(s).digest("hex").slice(0, 10);

/** Test-case id from content: recording, ego track, start and end time, logical scenario (and kind). */
export function testCaseId(parts: (string | number)[]): string {
  return `TC-${h10(parts.map((p) => (typeof p === "number" ? p.toFixed(3) : p)).join("|"))}`;
}

export interface PlanInput {
  scenarios: readonly Scenario[];
  /** The global cluster view (buildTestPlan without budget), kept as plan.exploration. */
  exploration: TestPlan;
  rng: Rng;
}

/**
 * The plan of logical scenarios (schema 2.0.0): classes → per-class clustering → logical scenarios
 * with distributions → critical events counted once and filed as anchors → concrete test cases
 * under the budget.
 *
 * Allocation: (1) every logical scenario with critical anchors gets one test case, its most
 * critical anchor (the budget must allow these, else InputError); (2) then every logical scenario
 * with share >= minShare, largest first, gets its representative while the budget lasts; (3) the
 * rest by Neyman allocation, n_h ∝ W_h·S_h·(1 + criticalWeight·[h has anchors]) (W share, S spread
 * in standardized units), by largest remainder. Within a logical scenario the order is: most
 * critical anchor (critical ones), representative, further anchors by criticality, then sampled
 * variations.
 */
export function buildPlan(input: PlanInput, planOptions: TestPlanOptions = {}, options: LogicalPlanOptions = {}): Plan {
  return buildPlanDetailed(input, planOptions, options).plan;
}

/** buildPlan plus what the catalogue and assignment need: each scenario's logical scenario id and the fitted model. */
export function buildPlanDetailed(
  input: PlanInput,
  planOptions: TestPlanOptions = {},
  options: LogicalPlanOptions = {},
): { plan: Plan; logicalScenarioOf: string[]; model: LogicalModel } {
  const { scenarios, exploration, rng } = input;
  const po = resolveTestPlanOptions({ ...planOptions, budget: undefined, targetShare: undefined });
  const n = scenarios.length;
  const warnings: string[] = [];
  const minShare = options.minShare ?? 0.01;
  if (!(minShare >= 0 && minShare <= 1)) throw new InputError(`minShare=${minShare} should be a share in [0, 1]`, { column: "minShare", value: String(minShare) });
  const criticalWeight = options.criticalWeight ?? 1;
  if (!(criticalWeight >= 0 && Number.isFinite(criticalWeight))) throw new InputError(`criticalWeight=${criticalWeight} should be >= 0`, { column: "criticalWeight", value: String(criticalWeight) });
  const shift = options.importanceShift ?? 0;
  if (!(shift >= 0 && shift <= 5)) throw new InputError(`importanceShift=${shift} should be in [0, 5] (standard deviations)`, { column: "importanceShift", value: String(shift) });
  if (options.budget !== undefined && !(Number.isInteger(options.budget) && options.budget >= 1))
    throw new InputError(`budget=${options.budget} should be an integer >= 1`, { column: "budget", value: String(options.budget) });

  const weights = scenarioWeights(scenarios, po.weightBy);
  const ctx = exposureContext(scenarios, po.exposure);
  const fit: LogicalFit = fitLogicalScenarios(scenarios, weights, rng.fork("logical"), options.fit);
  warnings.push(...fit.warnings);
  const crit = findCriticalEvents(scenarios, po, options.criticalEvents);

  // Anchors per logical scenario, most critical first.
  const anchorsOf = fit.scenarios.map(() => [] as number[]);
  crit.events.forEach((e, k) => anchorsOf[fit.labelOf[e.anchor]!]!.push(k));
  for (const list of anchorsOf) list.sort((x, y) => moreCritical(scenarios[crit.events[x]!.anchor]!, scenarios[crit.events[y]!.anchor]!, crit.events[x]!.anchor, crit.events[y]!.anchor) || x - y);

  const L = fit.scenarios.length;
  const fig = fit.scenarios.map((ls) => describeExposure(ctx, ls.members));
  const share = fig.map((f) => f.share);
  // Items per logical scenario in the order they are taken.
  type Item = { kind: "critical"; event: number } | { kind: "representative" } | { kind: "variation" };
  const items = (h: number, count: number): Item[] => {
    const out: Item[] = [];
    const an = anchorsOf[h]!;
    const rep = fit.scenarios[h]!.representative;
    const anchorItems = an.map((e) => ({ kind: "critical" as const, event: e }));
    const repIsAnchor = an.some((e) => crit.events[e]!.anchor === rep);
    if (an.length > 0) out.push(anchorItems[0]!);
    if (!repIsAnchor) out.push({ kind: "representative" });
    out.push(...anchorItems.slice(1));
    while (out.length < count) out.push({ kind: "variation" });
    return out.slice(0, count);
  };
  const mustKeep = anchorsOf.filter((a) => a.length > 0).length;
  const defaultBudget = options.budget === undefined;
  const budget = options.budget ?? Math.max(DEFAULT_BUDGET, mustKeep);
  if (budget < mustKeep)
    throw new InputError(
      `budget=${budget} is below the ${mustKeep} test cases that must be kept (one per logical scenario with critical anchors: ${fit.scenarios.filter((_, h) => anchorsOf[h]!.length > 0).map((l) => l.id).join(", ")})`,
      { column: "budget", value: String(budget) },
    );
  const alloc = new Array<number>(L).fill(0);
  for (let h = 0; h < L; h++) if (anchorsOf[h]!.length > 0) alloc[h] = 1;
  let left = budget - mustKeep;
  const bigOnes = Array.from({ length: L }, (_, h) => h)
    .filter((h) => alloc[h] === 0 && share[h]! >= minShare)
    .sort((a, b) => share[b]! - share[a]! || a - b);
  let skippedBig = 0;
  for (const h of bigOnes) {
    if (left > 0) {
      alloc[h] = 1;
      left--;
    } else skippedBig++;
  }
  if (skippedBig > 0) warnings.push(`the budget of ${budget} leaves ${skippedBig} logical scenario(s) with a share >= ${formatPercent(minShare)} without a test case`);
  if (left > 0) {
    // Neyman allocation with a criticality weight, by largest remainder; ties by share, then order.
    const nw = fit.scenarios.map((ls, h) => share[h]! * Math.max(ls.spread, 1e-6) * (1 + criticalWeight * (anchorsOf[h]!.length > 0 ? 1 : 0)));
    const tot = nw.reduce((a, b) => a + b, 0);
    const ideal = nw.map((w) => (tot > 0 ? (w / tot) * (budget) : 0));
    // Take what each logical scenario still lacks against its ideal, in whole cases.
    const lack = ideal.map((x, h) => Math.max(0, x - alloc[h]!));
    const lackTot = lack.reduce((a, b) => a + b, 0);
    const add = lack.map((x) => (lackTot > 0 ? (x / lackTot) * left : 0));
    const base = add.map((x) => Math.floor(x));
    let rest = left - base.reduce((a, b) => a + b, 0);
    for (let h = 0; h < L; h++) alloc[h]! += base[h]!;
    const order = Array.from({ length: L }, (_, h) => h).sort((a, b) => add[b]! - base[b]! - (add[a]! - base[a]!) || share[b]! - share[a]! || a - b);
    for (let r = 0; rest > 0 && r < order.length; r++, rest--) alloc[order[r]!]!++;
  }

  // Concrete test cases.
  const testCases: ConcreteTestCase[] = [];
  const scheduledEvent = new Uint8Array(crit.events.length);
  const logicalScenarios: LogicalScenario[] = [];
  const leftOut: LogicalLeftOut[] = [];
  fit.scenarios.forEach((ls, h) => {
    const its = items(h, alloc[h]!);
    const nVar = its.filter((x) => x.kind === "variation").length;
    const vars = nVar > 0 ? sampleVariations(ls, nVar, rng.fork(`variations/${ls.id}`), shift) : [];
    let v = 0;
    const recorded = (i: number, kind: "representative" | "critical", reasons: string[], eventId: string | null): ConcreteTestCase => {
      const s = scenarios[i]!;
      return {
        id: testCaseId([s.recording, s.egoTrack, s.tStart, s.tEnd, ls.id, kind]),
        logicalScenario: ls.id,
        classId: ls.classId,
        kind,
        scenarioIndex: i,
        scenarioId: s.id,
        source: { recording: s.recording, egoTrack: s.egoTrack, window: s.window, tStart: s.tStart, tEnd: s.tEnd },
        values: { ...s.parameters! },
        weight: 1,
        reasons,
        eventId,
      };
    };
    for (const it of its) {
      if (it.kind === "representative") testCases.push(recorded(ls.representative, "representative", [`medoid of ${ls.id} (${ls.members.length} scenarios, ${formatPercent(share[h]!)} of the km)`], null));
      else if (it.kind === "critical") {
        const e = crit.events[it.event]!;
        scheduledEvent[it.event] = 1;
        const reasons = [`critical event ${e.id} (tracks ${e.tracks.join(" and ")}, ${e.tFrom.toFixed(2)}–${e.tTo.toFixed(2)} s)`, ...e.rules];
        if (e.anchor === ls.representative) reasons.push(`also the medoid of ${ls.id}`);
        testCases.push(recorded(e.anchor, "critical", reasons, e.id));
      } else {
        const x = vars[v++]!;
        const key = JSON.stringify(x.values);
        testCases.push({
          id: testCaseId([ls.id, "variation", v, key]),
          logicalScenario: ls.id,
          classId: ls.classId,
          kind: "variation",
          scenarioIndex: null,
          scenarioId: null,
          source: null,
          values: x.values,
          weight: x.weight,
          reasons: [shift > 0 ? `sampled from ${ls.id}'s fitted distribution, shifted ${shift} SD towards the critical side (weight = likelihood ratio)` : `sampled from ${ls.id}'s fitted distribution (Gaussian copula, exposure-weighted marginals)`],
          eventId: null,
        });
      }
    }
    const per: Record<string, number> = {};
    for (const i of ls.members) per[scenarios[i]!.recording] = (per[scenarios[i]!.recording] ?? 0) + 1;
    const rs = scenarios[ls.representative]!;
    const anchors: CriticalAnchor[] = anchorsOf[h]!.map((k) => {
      const e = crit.events[k]!;
      return {
        eventId: e.id,
        scenarioIndex: e.anchor,
        scenarioId: scenarios[e.anchor]!.id,
        rule: e.rules.join("; "),
        minTtc: e.minTtc,
        minThw: e.minThw,
        maxDrac: e.maxDrac,
        maxDecel: e.maxDecel,
        scheduled: false,
      };
    });
    const f = fig[h]!;
    logicalScenarios.push({
      id: ls.id,
      classId: ls.classId,
      className: ls.className,
      name: ls.name,
      share: f.share,
      timeShare: f.timeShare,
      km: f.km,
      hours: f.hours,
      scenarios: f.scenarios,
      ratePer1000km: f.ratePer1000km,
      parameters: ls.parameters,
      dependence: ls.dependence,
      representative: { scenarioIndex: ls.representative, scenarioId: rs.id, recording: rs.recording, egoTrack: rs.egoTrack, tStart: rs.tStart, tEnd: rs.tEnd, values: { ...rs.parameters! } },
      representationError: ls.representationError,
      criticalAnchors: anchors,
      membersPerRecording: Object.fromEntries(Object.entries(per).sort((a, b) => (a[0] < b[0] ? -1 : 1))),
      testCases: its.length,
    });
    if (its.length === 0)
      leftOut.push({ logicalScenario: ls.id, classId: ls.classId, name: ls.name, scenarios: f.scenarios, km: f.km, hours: f.hours, share: f.share, timeShare: f.timeShare, reason: "budget" });
  });
  for (const l of logicalScenarios) for (const a of l.criticalAnchors) a.scheduled = testCases.some((t) => t.eventId === a.eventId);
  const unscheduled = crit.events.length - scheduledEvent.reduce((a, b) => a + b, 0);
  if (unscheduled > 0) warnings.push(`${unscheduled} of ${crit.events.length} critical events are listed as anchors but not scheduled as test cases under the budget of ${budget}`);
  const tested = logicalScenarios.filter((l) => l.testCases > 0);
  const accounting = {
    testedShare: compensatedSum(tested.map((l) => l.share)),
    leftOutShare: compensatedSum(leftOut.map((l) => l.share)),
    total: compensatedSum([...tested.map((l) => l.share), ...leftOut.map((l) => l.share)]),
    testedTimeShare: compensatedSum(tested.map((l) => l.timeShare)),
    leftOutTimeShare: compensatedSum(leftOut.map((l) => l.timeShare)),
    timeTotal: compensatedSum([...tested.map((l) => l.timeShare), ...leftOut.map((l) => l.timeShare)]),
  };
  if (Math.abs(accounting.total - 1) > 1e-12) warnings.push(`logical-scenario shares add up to ${accounting.total}, not 1 within 1e-12`);
  const events: PlanCriticalEvent[] = crit.events.map((e, k) => ({
    id: e.id,
    recording: e.recording,
    tracks: e.tracks,
    tFrom: e.tFrom,
    tTo: e.tTo,
    rules: e.rules,
    minTtc: e.minTtc,
    minThw: e.minThw,
    maxDrac: e.maxDrac,
    maxDecel: e.maxDecel,
    observedIn: e.observedIn.map((i) => scenarios[i]!.id),
    anchorScenarioId: scenarios[e.anchor]!.id,
    logicalScenario: fit.scenarios[fit.labelOf[e.anchor]!]!.id,
    scheduled: scheduledEvent[k] === 1,
  }));
  const classes = fit.classes.map((c) => {
    const idx: number[] = [];
    for (let i = 0; i < n; i++) if (scenarios[i]!.scenarioClass === c.classId) idx.push(i);
    const f = describeExposure(ctx, idx);
    return { ...c, definition: scenarioClass(c.classId).definition, share: f.share, timeShare: f.timeShare, km: f.km };
  });
  const plan: Plan = {
    schemaVersion: PLAN_V2_SCHEMA_VERSION,
    summary: "",
    cautions: [...exploration.cautions],
    totals: exploration.totals,
    selection: {
      budget,
      defaultBudget,
      testCases: testCases.length,
      representatives: testCases.filter((t) => t.kind === "representative").length,
      critical: testCases.filter((t) => t.kind === "critical").length,
      variations: testCases.filter((t) => t.kind === "variation").length,
      mustKeep,
      minShare,
      logicalScenarios: L,
      withTestCases: tested.length,
      criticalEvents: crit.events.length,
      unscheduledAnchors: unscheduled,
      rejectedCritical: crit.rejected.length,
      importanceShift: shift,
      rule: "one test case per logical scenario with critical anchors (its most critical anchor), then one per logical scenario with share >= minShare (largest first), then Neyman allocation by share × spread × (1 + criticalWeight if critical), largest remainder",
    },
    accounting,
    classes,
    logicalScenarios,
    testCases,
    leftOut,
    criticalEvents: events,
    rejectedCritical: crit.rejected,
    exploration,
    provenance: { ...exploration.provenance, options: { ...exploration.provenance.options, logical: { budget, minShare, criticalWeight, importanceShift: shift, fit: options.fit ?? {}, criticalEvents: options.criticalEvents ?? {} } } },
    warnings: [...warnings, ...exploration.warnings.map((w) => `exploration: ${w}`)],
  };
  plan.summary = logicalSummary(plan);
  return { plan, logicalScenarioOf: Array.from(fit.labelOf, (h) => fit.scenarios[h]!.id), model: fit.model };
}

/** The plan in a few sentences. */
export function logicalSummary(p: Plan): string {
  const s = p.selection;
  const other = p.classes.find((c) => c.classId === "other");
  return [
    `${p.totals.scenarios} scenarios (${p.totals.km.toFixed(1)} vehicle-km, ${p.totals.hours.toFixed(2)} vehicle-hours) fall into ${p.classes.length} classes and ${s.logicalScenarios} logical scenarios` +
      (other ? ` (${other.scenarios} scenario(s) could not be judged and are counted under "other")` : "") +
      ".",
    `${s.testCases} concrete test cases${s.defaultBudget ? ` (default budget ${s.budget})` : ` (budget ${s.budget})`}: ${s.representatives} representatives (exact medoids, real recorded scenarios), ${s.critical} critical anchors and ${s.variations} sampled variations.`,
    `The logical scenarios with a test case stand for ${formatPercent(p.accounting.testedShare)} of the recorded vehicle-kilometres; ${formatPercent(p.accounting.leftOutShare)} is left out (${p.leftOut.length} logical scenario(s) without a test case).`,
    `${s.criticalEvents} critical events, each counted once, are listed as anchors of their logical scenarios; ${s.unscheduledAnchors} of them are not scheduled. ${s.rejectedCritical} flagged window(s) were rejected as measurement artefacts.`,
  ].join("\n\n");
}
