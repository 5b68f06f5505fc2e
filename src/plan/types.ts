import type { CoverageEstimate } from "../coverage/catalogueCoverage.js";
import type { ClusterExposureRow } from "../exposure/clusterExposure.js";
import type { RatePer1000km } from "../exposure/describeExposure.js";
import type { DurationClass, FrequencyReading } from "../exposure/exposureClass.js";

/**
 * Version of the plan.json layout (semantic versioning: a new optional field raises the minor
 * number, a renamed or removed field the major number). docs/plan.md and docs/plan.schema.json
 * describe every field.
 */
export const PLAN_SCHEMA_VERSION = "1.0.0";

/** Why a test case is in the plan; when several reasons apply, critical wins over representative over rare. */
export type TestCaseRole = "representative" | "critical" | "rare";

/** A scenario a test case stands for. */
export interface TestCaseMember {
  index: number;
  id: string;
  /** Euclidean distance to the test case's scenario in the embedding; null when no embedding or distance was given. */
  distance: number | null;
  critical: boolean;
}

/** What a test case stands for (its own scenario plus its members). */
export interface StandsFor {
  scenarios: number;
  km: number;
  hours: number;
  drives: number;
  driveShare: number;
  ratePer1000km: RatePer1000km;
  /** ISO 26262-3 reading by share of operating time; an aid for hazard analysis only. */
  exposureClass: DurationClass;
  frequency: FrequencyReading;
}

export interface TestCaseCriticality {
  /** null stands for "never closing" (Infinity) or "no leader". */
  minTtc: number | null;
  minThw: number | null;
  maxDrac: number | null;
  maxDecel: number | null;
  flags: string[];
  /** True when a plan threshold (TTC, THW, deceleration, flag) was crossed. */
  critical: boolean;
}

export interface TestCase {
  /** "TC-0001" …: representatives by share, then critical, then rare test cases. */
  id: string;
  role: TestCaseRole;
  /** Every reason that applies, in words with the numbers. */
  reasons: string[];
  scenarioIndex: number;
  scenarioId: string;
  source: { recording: string; egoTrack: number; window: number; tStart: number; tEnd: number };
  /** Cluster label; -1 = DBSCAN noise. */
  cluster: number;
  typeKey: string;
  /** Share of the recorded vehicle-kilometres this test case stands for (fraction). */
  share: number;
  /** Share of the recorded time it stands for (fraction). */
  timeShare: number;
  standsFor: StandsFor;
  criticality: TestCaseCriticality;
  /** Scenarios it stands for, nearest first (its own scenario first, distance 0). */
  members: TestCaseMember[];
  /** Number of members (may exceed members.length when the listing was capped). */
  memberCount: number;
}

/** A part of the recordings no test case stands for, by cluster. */
export interface LeftOutEntry {
  /** Cluster label; -1 = noise scenarios that were not kept. */
  cluster: number;
  medoidIndex: number | null;
  medoidId: string | null;
  /** "budget", "target share reached" or "noise not kept". */
  reason: string;
  scenarios: number;
  km: number;
  hours: number;
  share: number;
  timeShare: number;
  /** Critical scenarios among them (non-zero only if critical scenarios were grouped away, which the plan never does). */
  critical: number;
}

export interface PlanSelection {
  budget: number | null;
  targetShare: number | null;
  weightBy: "km" | "hours";
  testCases: number;
  representatives: number;
  critical: number;
  rare: number;
  /** Scenarios that had to be in the plan (critical and rare), counted as test cases. */
  mustKeep: number;
  /** True when the must-keep test cases alone exceed the budget (they are kept anyway). */
  budgetExceeded: boolean;
  clusters: number;
  noiseScenarios: number;
  criticalScenarios: number;
}

/** Sum over test cases + what the budget left out = 1. */
export interface PlanAccounting {
  testCasesShare: number;
  leftOutShare: number;
  total: number;
  testCasesTimeShare: number;
  leftOutTimeShare: number;
  timeTotal: number;
}

export interface ZeroFailureLine {
  confidence: number;
  recordedKm: number;
  /** Rate (per km) that the recorded km would demonstrate with no event at that confidence. */
  rateBoundPerKm: number;
  /** Reference rate to compare with, or null when none was set. */
  reference: { label: string; ratePerKm: number; kmNeeded: number; recordedShareOfNeeded: number } | null;
}

export interface PlanProvenance {
  tool: string;
  version: string;
  clusterMethod: string;
  seed: number | null;
  /** Checksums of the inputs (file name → SHA-256), as passed in, in key order. */
  inputChecksums: Record<string, string>;
  /** Time stamp passed in by the caller; null by default so that reruns are byte-identical. */
  createdAt: string | null;
  /** The plan options as resolved (defaults filled in), in key order. */
  options: Record<string, unknown>;
  /** Options of upstream stages, as passed in. */
  upstream: Record<string, unknown>;
}

export interface TestPlan {
  schemaVersion: string;
  summary: string;
  cautions: string[];
  totals: { scenarios: number; km: number; hours: number; drives: number; recordings: number };
  selection: PlanSelection;
  accounting: PlanAccounting;
  coverage: { typeKeys: CoverageEstimate; clusters: CoverageEstimate; clusterNoise: "singletons" | "excluded"; zeroFailure: ZeroFailureLine };
  exposureTable: ClusterExposureRow[];
  testCases: TestCase[];
  leftOut: LeftOutEntry[];
  provenance: PlanProvenance;
  warnings: string[];
}
