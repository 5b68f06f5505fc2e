/**
 * The parts of a plan's logical scenario (CONTRACT.md §2, owned by src/plan/ of the "logical" work)
 * that the template writer reads: a local structural copy so that this module builds on its own; the
 * integrator switches it to the plan's own LogicalScenario type.
 */
export interface LogicalScenarioParameter {
  name: string;
  unit: string;
  description: string;
  min: number;
  max: number;
  p05: number;
  p50: number;
  p95: number;
  measurable: number;
  histogram: { edges: number[]; weights: number[] };
}

export interface LogicalScenarioLike {
  id: string;
  classId: string;
  className: string;
  name: string;
  parameters: LogicalScenarioParameter[];
  dependence: { method: "gaussian-copula"; parameters: string[]; correlation: number[][] } | null;
  representative: { scenarioId: string; recording: string; egoTrack: number; tStart: number; tEnd: number; values: Record<string, number | null> };
}

/** A concrete test case of the plan as far as the distribution files need it (CONTRACT.md §2). */
export interface TestCaseLike {
  id: string;
  logicalScenario: string;
  kind: "representative" | "critical" | "variation";
  values: Record<string, number | null>;
}
