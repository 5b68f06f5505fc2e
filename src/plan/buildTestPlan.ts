import { InputError } from "../core/errors.js";
import type { Matrix } from "../core/matrix.js";
import type { Progress } from "../core/progress.js";
import { VERSION } from "../core/version.js";
import { catalogueCoverage, clusterKinds } from "../coverage/catalogueCoverage.js";
import { scenarioTypeKeys } from "../coverage/typeKey.js";
import { zeroFailureDistance, zeroFailureRateBound } from "../coverage/zeroFailure.js";
import { clusterExposure, groupByLabel } from "../exposure/clusterExposure.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { describeExposure, exposureContext } from "../exposure/describeExposure.js";
import { scenarioWeights } from "../exposure/sampleWeights.js";
import type { Scenario } from "../scenario/types.js";
import { criticalReasons, moreCritical } from "./criticality.js";
import { resolveTestPlanOptions, type ResolvedTestPlanOptions, type TestPlanOptions } from "./options.js";
import { composeSummary, PLAN_CAUTIONS } from "./planSummary.js";
import {
  PLAN_SCHEMA_VERSION,
  type LeftOutEntry,
  type PlanProvenance,
  type TestCase,
  type TestCaseMember,
  type TestCaseRole,
  type TestPlan,
  type ZeroFailureLine,
} from "./types.js";

export interface TestPlanInput {
  scenarios: readonly Scenario[];
  /** Cluster label per scenario; -1 = DBSCAN noise. */
  labels: Int32Array;
  /** Medoid scenario index per cluster label (index = label); -1 for a cluster without one. */
  medoids: Int32Array;
  /** Embedding the clustering worked on (rows = scenarios); gives member-to-representative distances. */
  embedding?: Matrix;
  /** Without an embedding: each scenario's distance to its cluster's medoid, as the clustering reports it. */
  distances?: Float64Array;
  /** Type keys per scenario, when already computed (default: scenarioTypeKey with options.typeKey). */
  typeKeys?: readonly string[];
  /** Name of the clustering method, for provenance (e.g. "dbscan"). */
  clusterMethod: string;
  provenance?: {
    seed?: number | null;
    /** File name → SHA-256 of the inputs. */
    inputChecksums?: Record<string, string>;
    /** A time stamp to record; leave it out for byte-identical reruns. */
    createdAt?: string | null;
    /** Options of the upstream stages (extraction, embedding, clustering). */
    upstream?: Record<string, unknown>;
  };
  /**
   * Warnings of the stages before the plan (reading, extraction, clustering), put first in
   * plan.warnings so that plan.json and the report list every warning of the run, the same list.
   */
  upstreamWarnings?: readonly string[];
  progress?: Progress;
}

/** Recursively sort object keys and turn non-finite numbers into null, so provenance is stable JSON. */
export function stableValue(v: unknown): unknown {
  if (typeof v === "number") return Number.isFinite(v) ? v : null;
  if (Array.isArray(v)) return v.map(stableValue);
  if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>, (x) => stableValue(x));
  if (v && typeof v === "object") {
    const out: Record<string, unknown> = {};
    for (const k of Object.keys(v).sort()) {
      const x = (v as Record<string, unknown>)[k];
      if (x !== undefined && typeof x !== "function") out[k] = stableValue(x);
    }
    return out;
  }
  return v;
}

const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

function validate(input: TestPlanInput): number {
  const { scenarios, labels, medoids, embedding, distances, typeKeys } = input;
  const n = scenarios.length;
  if (n === 0) throw new InputError("the scenario catalogue is empty; a test plan needs at least one scenario");
  if (!(labels instanceof Int32Array)) throw new InputError("labels should be an Int32Array (-1 = noise)", { column: "labels" });
  if (labels.length !== n) throw new InputError(`labels has ${labels.length} entries but there are ${n} scenarios`, { column: "labels", value: labels.length });
  if (!(medoids instanceof Int32Array)) throw new InputError("medoids should be an Int32Array (one scenario index per cluster)", { column: "medoids" });
  if (embedding) {
    if (!(embedding.data instanceof Float64Array) || embedding.data.length !== embedding.rows * embedding.cols)
      throw new InputError("embedding should be a Matrix { data: Float64Array, rows, cols } with data.length = rows·cols", { column: "embedding" });
    if (embedding.rows !== n) throw new InputError(`embedding has ${embedding.rows} rows but there are ${n} scenarios`, { column: "embedding", value: embedding.rows });
  }
  if (distances && distances.length !== n) throw new InputError(`distances has ${distances.length} entries but there are ${n} scenarios`, { column: "distances", value: distances.length });
  if (typeKeys && typeKeys.length !== n) throw new InputError(`typeKeys has ${typeKeys.length} entries but there are ${n} scenarios`, { column: "typeKeys", value: typeKeys.length });
  if (typeof input.clusterMethod !== "string" || input.clusterMethod.length === 0)
    throw new InputError("clusterMethod should name the clustering method (e.g. \"dbscan\")", { column: "clusterMethod" });
  return n;
}

/**
 * Build the test plan under a budget.
 *
 * 1. Critical scenarios (TTC or time headway under the thresholds, hard braking, chosen flags) and rare
 *    ones (DBSCAN noise, type keys seen once) are kept as test cases of their own unless they are a
 *    cluster's medoid — they are never averaged away, whatever the budget; if they alone exceed it,
 *    they are kept and the plan warns that the budget was exceeded.
 * 2. The rest of the budget goes to one medoid per cluster, largest share first, until the budget or
 *    the target share is reached.
 * 3. Accounting: each scenario is stood for by exactly one test case or left out. A medoid stands for
 *    its cluster minus the scenarios pulled out as test cases of their own; those stand for themselves
 *    (and, with "most-critical-per-type", for the critical scenarios grouped under them). So the
 *    test-case shares plus the left-out shares add up to 1.
 */
export function buildTestPlan(input: TestPlanInput, options: TestPlanOptions = {}): TestPlan {
  const n = validate(input);
  const o: ResolvedTestPlanOptions = resolveTestPlanOptions(options);
  const { scenarios, labels, embedding, distances } = input;
  const progress = input.progress;
  const warnings: string[] = [...(input.upstreamWarnings ?? [])];
  const step = (done: number, message: string): void => progress?.({ stage: "plan", done, total: 5, message });
  step(0, "exposure");

  const ctx = exposureContext(scenarios, o.exposure);
  const typeKeys = input.typeKeys ? [...input.typeKeys] : scenarioTypeKeys(scenarios, o.typeKey);
  const weights = scenarioWeights(scenarios, o.weightBy);
  const totalWeight = compensatedSum(weights);
  if (!(totalWeight > 0)) throw new InputError(`the scenarios add up to ${totalWeight} ${o.weightBy}; the plan needs a total > 0`);
  const { clusters, noise } = groupByLabel(labels, n);
  const k = clusters.length;

  // Medoids: validate, fall back to the member nearest the cluster mean when one is missing.
  if (input.medoids.length < k)
    throw new InputError(`medoids has ${input.medoids.length} entries but labels go up to ${k - 1}`, { column: "medoids", value: input.medoids.length });
  const medoids = new Int32Array(k).fill(-1);
  for (let c = 0; c < k; c++) {
    const members = clusters[c]!;
    const m = input.medoids[c]!;
    if (members.length === 0) {
      if (m >= 0) warnings.push(`cluster ${c} has a medoid (${m}) but no members; it is ignored`);
      continue;
    }
    if (m >= 0) {
      if (m >= n || labels[m] !== c) throw new InputError(`medoids[${c}]=${m} is not a member of cluster ${c}`, { column: "medoids", row: c + 1, value: m });
      medoids[c] = m;
    } else {
      medoids[c] = fallbackMedoid(members, embedding);
      warnings.push(`cluster ${c} came without a medoid; scenario ${medoids[c]} (${embedding ? "nearest the cluster mean" : "first member"}) represents it`);
    }
  }
  const isMedoid = new Uint8Array(n);
  for (let c = 0; c < k; c++) if (medoids[c]! >= 0) isMedoid[medoids[c]!] = 1;

  // Critical and rare scenarios.
  const critReasons: string[][] = scenarios.map((s) => criticalReasons(s, o));
  const isCritical = critReasons.map((r) => r.length > 0);
  const keyCount = new Map<string, number>();
  for (const key of typeKeys) keyCount.set(key, (keyCount.get(key) ?? 0) + 1);
  const rareReasons: string[][] = scenarios.map((_, i) => {
    const r: string[] = [];
    if (labels[i] === -1 && o.includeNoise) r.push("rare: DBSCAN noise (recurs in no cluster)");
    if (o.includeSingletonTypes && keyCount.get(typeKeys[i]!) === 1) r.push("rare: type key seen once");
    return r;
  });

  // Extras: must-keep scenarios that are not medoids. representedBy[i] = scenario index of the test
  // case that stands for i (filled below), -1 = left out.
  const representedBy = new Int32Array(n).fill(-1);
  const extras: number[] = [];
  const criticalGroups = new Map<string, number[]>();
  for (let i = 0; i < n; i++) {
    if (isMedoid[i]) continue;
    if (rareReasons[i]!.length > 0) extras.push(i);
    else if (isCritical[i]) {
      if (o.criticalPolicy === "each") extras.push(i);
      else {
        const g = `${labels[i]}\u0000${typeKeys[i]}`;
        const list = criticalGroups.get(g);
        if (list) list.push(i);
        else criticalGroups.set(g, [i]);
      }
    }
  }
  for (const list of [...criticalGroups.values()].sort((a, b) => a[0]! - b[0]!)) {
    const c = labels[list[0]!]!;
    const med = c >= 0 ? medoids[c]! : -1;
    // A critical medoid of the same type key stands for them; it is kept whatever the budget.
    if (med >= 0 && isCritical[med] && typeKeys[med] === typeKeys[list[0]!]) continue;
    list.sort((a, b) => moreCritical(scenarios[a]!, scenarios[b]!, a, b));
    const head = list[0]!;
    extras.push(head);
    for (const i of list) representedBy[i] = head;
  }
  for (const i of extras) representedBy[i] = i;

  // Cluster residual weights (what a medoid would stand for) and the order of the medoids.
  const residualWeight = new Float64Array(k);
  for (let c = 0; c < k; c++) {
    const rest: number[] = [];
    for (const i of clusters[c]!) if (representedBy[i] === -1) rest.push(i);
    residualWeight[c] = compensatedSum(weights, rest);
  }
  const clusterWeight = clusters.map((m) => compensatedSum(weights, m));
  const order = Array.from({ length: k }, (_, c) => c)
    .filter((c) => medoids[c]! >= 0)
    .sort((a, b) => clusterWeight[b]! - clusterWeight[a]! || a - b);

  step(1, "selection");
  const mustKeepMedoids = order.filter((c) => isCritical[medoids[c]!] || rareReasons[medoids[c]!]!.length > 0);
  const mustKeep = extras.length + mustKeepMedoids.length;
  const budget = o.budget ?? Infinity;
  const budgetExceeded = mustKeep > budget;
  if (budgetExceeded)
    warnings.push(
      `the budget of ${budget} test cases was exceeded: ${mustKeep} critical or rare scenarios must be kept (they are never averaged away); no further representatives were added`,
    );
  const selectedCluster = new Uint8Array(k);
  for (const c of mustKeepMedoids) selectedCluster[c] = 1;
  let count = mustKeep;
  const extraMembers: number[] = [];
  for (let i = 0; i < n; i++) if (representedBy[i]! >= 0) extraMembers.push(i);
  let represented = compensatedSum(weights, extraMembers);
  for (const c of mustKeepMedoids) represented += residualWeight[c]!;
  const leftReason = new Map<number, string>();
  for (const c of order) {
    if (selectedCluster[c]) continue;
    const targetReached = o.targetShare !== null && represented / totalWeight >= o.targetShare - 1e-12;
    if (count < budget && !targetReached) {
      selectedCluster[c] = 1;
      count++;
      represented += residualWeight[c]!;
    } else leftReason.set(c, targetReached ? "target share reached" : "budget");
  }
  for (let c = 0; c < k; c++) {
    if (!selectedCluster[c]) continue;
    for (const i of clusters[c]!) if (representedBy[i] === -1) representedBy[i] = medoids[c]!;
  }
  step(2, "test cases");
  // Test cases in plan order: representatives by share, then critical extras, then rare extras.
  const tcOrder: number[] = [];
  for (const c of order) if (selectedCluster[c]) tcOrder.push(medoids[c]!);
  const critExtras = extras.filter((i) => isCritical[i]).sort((a, b) => moreCritical(scenarios[a]!, scenarios[b]!, a, b));
  const rareExtras = extras.filter((i) => !isCritical[i]).sort((a, b) => a - b);
  tcOrder.push(...critExtras, ...rareExtras);
  const membersOf = new Map<number, number[]>();
  for (const t of tcOrder) membersOf.set(t, []);
  for (let i = 0; i < n; i++) if (representedBy[i] >= 0) membersOf.get(representedBy[i]!)!.push(i);
  const width = String(tcOrder.length).length > 4 ? String(tcOrder.length).length : 4;
  const testCases: TestCase[] = tcOrder.map((t, idx) => {
    const s = scenarios[t]!;
    const members = membersOf.get(t)!;
    const fig = describeExposure(ctx, members);
    const reasons: string[] = [];
    if (isMedoid[t]) reasons.push(`medoid of cluster ${labels[t]}`);
    reasons.push(...critReasons[t]!, ...rareReasons[t]!);
    const grouped = members.length > 1 && !isMedoid[t];
    if (grouped) reasons.push(`stands for ${members.length - 1} further critical scenario(s) of the same cluster and type key`);
    const role: TestCaseRole = isCritical[t] ? "critical" : isMedoid[t] ? "representative" : "rare";
    const listed: TestCaseMember[] = members
      .map((i) => ({ index: i, id: scenarios[i]!.id, distance: memberDistance(i, t, embedding, distances, isMedoid[t] === 1), critical: isCritical[i]! }))
      .sort((a, b) => (a.distance ?? Infinity) - (b.distance ?? Infinity) || a.index - b.index);
    // The test case's own scenario first.
    const selfAt = listed.findIndex((m) => m.index === t);
    if (selfAt > 0) listed.unshift(...listed.splice(selfAt, 1));
    const c = s.criticality;
    return {
      id: `TC-${String(idx + 1).padStart(width, "0")}`,
      role,
      reasons,
      scenarioIndex: t,
      scenarioId: s.id,
      source: { recording: s.recording, egoTrack: s.egoTrack, window: s.window, tStart: s.tStart, tEnd: s.tEnd },
      cluster: labels[t]!,
      typeKey: typeKeys[t]!,
      share: fig.share,
      timeShare: fig.timeShare,
      standsFor: {
        scenarios: fig.scenarios,
        km: fig.km,
        hours: fig.hours,
        drives: fig.drives,
        driveShare: fig.driveShare,
        ratePer1000km: fig.ratePer1000km,
        exposureClass: fig.exposureClass,
        frequency: fig.frequency,
      },
      criticality: {
        minTtc: finiteOrNull(c.minTtc),
        minThw: finiteOrNull(c.minThw),
        maxDrac: finiteOrNull(c.maxDrac),
        maxDecel: finiteOrNull(c.maxDecel),
        flags: [...c.flags],
        critical: isCritical[t]!,
      },
      members: Number.isFinite(o.maxMembersListed) ? listed.slice(0, o.maxMembersListed) : listed,
      memberCount: members.length,
    };
  });

  // What the budget left out, per cluster (noise last).
  const leftOut: LeftOutEntry[] = [];
  const leftGroups: { cluster: number; idx: number[] }[] = [];
  for (let c = 0; c < k; c++) {
    const idx = Array.from(clusters[c]!).filter((i) => representedBy[i] === -1);
    if (idx.length > 0) leftGroups.push({ cluster: c, idx });
  }
  const noiseLeft = Array.from(noise).filter((i) => representedBy[i] === -1);
  if (noiseLeft.length > 0) leftGroups.push({ cluster: -1, idx: noiseLeft });
  for (const g of leftGroups) {
    const fig = describeExposure(ctx, g.idx);
    const med = g.cluster >= 0 && medoids[g.cluster]! >= 0 ? medoids[g.cluster]! : null;
    leftOut.push({
      cluster: g.cluster,
      medoidIndex: med,
      medoidId: med === null ? null : scenarios[med]!.id,
      reason: g.cluster === -1 ? "noise not kept (includeNoise: false)" : (leftReason.get(g.cluster) ?? "budget"),
      scenarios: g.idx.length,
      km: fig.km,
      hours: fig.hours,
      share: fig.share,
      timeShare: fig.timeShare,
      critical: g.idx.filter((i) => isCritical[i]).length,
    });
  }
  if (leftOut.some((l) => l.critical > 0)) throw new Error("internal: a critical scenario was left out of the plan");

  const accounting = {
    testCasesShare: compensatedSum(testCases.map((t) => t.share)),
    leftOutShare: compensatedSum(leftOut.map((l) => l.share)),
    total: compensatedSum([...testCases.map((t) => t.share), ...leftOut.map((l) => l.share)]),
    testCasesTimeShare: compensatedSum(testCases.map((t) => t.timeShare)),
    leftOutTimeShare: compensatedSum(leftOut.map((l) => l.timeShare)),
    timeTotal: compensatedSum([...testCases.map((t) => t.timeShare), ...leftOut.map((l) => l.timeShare)]),
  };

  step(3, "coverage");
  const km = ctx.km;
  const typeCoverage = catalogueCoverage(typeKeys, km, o.coverage, "type keys");
  const ck = clusterKinds(labels, o.clusterNoise);
  const clusterCoverage =
    ck.kinds.length > 0
      ? catalogueCoverage(ck.kinds, Float64Array.from(ck.indices, (i) => km[i]!), o.coverage, "clusters")
      : catalogueCoverage(typeKeys.map(() => "noise"), km, o.coverage, "clusters");
  if (ck.kinds.length === 0) warnings.push("every scenario is noise and noise is excluded from cluster coverage; cluster coverage counts one kind");
  const zf: ZeroFailureLine = {
    confidence: o.zeroFailureConfidence,
    recordedKm: ctx.totalKm,
    rateBoundPerKm: zeroFailureRateBound(ctx.totalKm, o.zeroFailureConfidence),
    reference:
      o.zeroFailureReferencePerKm === null
        ? null
        : {
            label: o.zeroFailureReferenceLabel,
            ratePerKm: o.zeroFailureReferencePerKm,
            kmNeeded: zeroFailureDistance(o.zeroFailureReferencePerKm, o.zeroFailureConfidence),
            recordedShareOfNeeded: ctx.totalKm / zeroFailureDistance(o.zeroFailureReferencePerKm, o.zeroFailureConfidence),
          },
  };

  step(4, "exposure table");
  const table = clusterExposure({ scenarios, labels, medoids }, o.exposure, ctx);
  warnings.push(...table.warnings);
  if (Math.abs(accounting.total - 1) > 1e-12) warnings.push(`shares add up to ${accounting.total}, not 1 within 1e-12`);

  const recordings = new Set(scenarios.map((s) => s.recording)).size;
  const provenance: PlanProvenance = {
    tool: "roadsieve",
    version: VERSION,
    clusterMethod: input.clusterMethod,
    seed: input.provenance?.seed ?? null,
    inputChecksums: stableValue(input.provenance?.inputChecksums ?? {}) as Record<string, string>,
    createdAt: input.provenance?.createdAt ?? null,
    options: stableValue(o) as Record<string, unknown>,
    upstream: stableValue(input.provenance?.upstream ?? {}) as Record<string, unknown>,
  };
  const plan: TestPlan = {
    schemaVersion: PLAN_SCHEMA_VERSION,
    summary: "",
    cautions: [...PLAN_CAUTIONS],
    totals: { scenarios: n, km: ctx.totalKm, hours: ctx.totalSeconds / 3600, drives: ctx.drives, recordings },
    selection: {
      budget: o.budget,
      targetShare: o.targetShare,
      weightBy: o.weightBy,
      testCases: testCases.length,
      representatives: testCases.filter((t) => isMedoid[t.scenarioIndex]).length,
      critical: testCases.filter((t) => t.role === "critical").length,
      rare: testCases.filter((t) => t.role === "rare").length,
      mustKeep,
      budgetExceeded,
      clusters: clusters.filter((m) => m.length > 0).length,
      noiseScenarios: noise.length,
      criticalScenarios: isCritical.filter(Boolean).length,
    },
    accounting,
    coverage: { typeKeys: typeCoverage, clusters: clusterCoverage, clusterNoise: o.clusterNoise, zeroFailure: zf },
    exposureTable: table.rows,
    testCases,
    leftOut,
    provenance,
    warnings,
  };
  plan.summary = composeSummary(plan);
  step(5, "done");
  return plan;
}

function fallbackMedoid(members: Int32Array, embedding: Matrix | undefined): number {
  if (!embedding) return members[0]!;
  const d = embedding.cols;
  const mean = new Float64Array(d);
  for (const i of members) for (let j = 0; j < d; j++) mean[j]! += embedding.data[i * d + j]! / members.length;
  let best = members[0]!;
  let bestD = Infinity;
  for (const i of members) {
    let s = 0;
    for (let j = 0; j < d; j++) s += (embedding.data[i * d + j]! - mean[j]!) ** 2;
    if (s < bestD) {
      bestD = s;
      best = i;
    }
  }
  return best;
}

function memberDistance(i: number, rep: number, embedding: Matrix | undefined, distances: Float64Array | undefined, repIsMedoid: boolean): number | null {
  if (i === rep) return 0;
  if (embedding) {
    const d = embedding.cols;
    let s = 0;
    for (let j = 0; j < d; j++) s += (embedding.data[i * d + j]! - embedding.data[rep * d + j]!) ** 2;
    return Math.sqrt(s);
  }
  if (distances && repIsMedoid && Number.isFinite(distances[i]!)) return distances[i]!;
  return null;
}
