import type { RatePer1000km } from "../exposure/describeExposure.js";
import type { ScenarioClassId } from "../logical/classes.js";
import type { ClassFit, LogicalParameter } from "../logical/fitLogicalScenarios.js";
import type { PlanProvenance, TestPlan } from "./types.js";

/** Version of the plan.json layout (2.0.0: logical scenarios and concrete test cases). */
export const PLAN_V2_SCHEMA_VERSION = "2.0.0";

export interface CriticalAnchor {
  eventId: string;
  scenarioIndex: number;
  scenarioId: string;
  rule: string;
  minTtc: number | null;
  minThw: number | null;
  maxDrac: number | null;
  maxDecel: number | null;
  scheduled: boolean;
}

export interface LogicalScenario {
  id: string;
  classId: ScenarioClassId;
  className: string;
  name: string;
  share: number;
  timeShare: number;
  km: number;
  hours: number;
  scenarios: number;
  ratePer1000km: RatePer1000km;
  parameters: LogicalParameter[];
  dependence: { method: "gaussian-copula"; parameters: string[]; correlation: number[][] } | null;
  representative: { scenarioIndex: number; scenarioId: string; recording: string; egoTrack: number; tStart: number; tEnd: number; values: Record<string, number | null> };
  representationError: Record<string, { median: number; p90: number }>;
  criticalAnchors: CriticalAnchor[];
  membersPerRecording: Record<string, number>;
  /** Concrete test cases the budget gave it. */
  testCases: number;
}

export type ConcreteKind = "representative" | "critical" | "variation";

export interface ConcreteTestCase {
  id: string;
  logicalScenario: string;
  classId: ScenarioClassId;
  kind: ConcreteKind;
  scenarioIndex: number | null;
  scenarioId: string | null;
  source: { recording: string; egoTrack: number; window: number; tStart: number; tEnd: number } | null;
  values: Record<string, number | null>;
  /** Importance weight (likelihood ratio); 1 when none. */
  weight: number;
  reasons: string[];
  /** The critical event for kind "critical", else null. */
  eventId: string | null;
}

export interface LogicalLeftOut {
  logicalScenario: string;
  classId: ScenarioClassId;
  name: string;
  scenarios: number;
  km: number;
  hours: number;
  share: number;
  timeShare: number;
  reason: string;
}

export interface LogicalSelection {
  budget: number;
  /** True when the budget came from the default rule rather than the caller. */
  defaultBudget: boolean;
  testCases: number;
  representatives: number;
  critical: number;
  variations: number;
  /** Logical scenarios with critical anchors: one test case each is the least any budget must allow. */
  mustKeep: number;
  minShare: number;
  logicalScenarios: number;
  withTestCases: number;
  criticalEvents: number;
  unscheduledAnchors: number;
  rejectedCritical: number;
  importanceShift: number;
  rule: string;
}

/** Shares of the logical scenarios with a test case plus what is left out: exactly 1 (compensated sums). */
export interface LogicalAccounting {
  testedShare: number;
  leftOutShare: number;
  total: number;
  testedTimeShare: number;
  leftOutTimeShare: number;
  timeTotal: number;
}

export interface ClassSummary extends ClassFit {
  definition: string;
  share: number;
  timeShare: number;
  km: number;
}

export interface PlanCriticalEvent {
  id: string;
  recording: string;
  tracks: number[];
  tFrom: number;
  tTo: number;
  rules: string[];
  minTtc: number | null;
  minThw: number | null;
  maxDrac: number | null;
  maxDecel: number | null;
  observedIn: string[];
  anchorScenarioId: string;
  logicalScenario: string;
  scheduled: boolean;
}

/** plan.json, schema 2.0.0 (docs/plan.md, docs/plan.schema.json). */
export interface Plan {
  schemaVersion: string;
  summary: string;
  cautions: string[];
  totals: TestPlan["totals"];
  selection: LogicalSelection;
  accounting: LogicalAccounting;
  classes: ClassSummary[];
  logicalScenarios: LogicalScenario[];
  testCases: ConcreteTestCase[];
  leftOut: LogicalLeftOut[];
  criticalEvents: PlanCriticalEvent[];
  rejectedCritical: { scenarioIndex: number; scenarioId: string; reason: string; rules: string[] }[];
  /** The global embedding's clusters, DBSCAN noise and type keys, kept for exploration and novelty (1.x layout). */
  exploration: TestPlan;
  provenance: PlanProvenance;
  warnings: string[];
}
