/** The test plan: test cases under a budget, what each stands for, and its exports. */
export { buildTestPlan, stableValue } from "./buildTestPlan.js";
export type { TestPlanInput } from "./buildTestPlan.js";
export { resolveTestPlanOptions, PLAN_DEFAULTS } from "./options.js";
export type { TestPlanOptions, ResolvedTestPlanOptions, CriticalPolicy } from "./options.js";
export { criticalReasons } from "./criticality.js";
export { PLAN_SCHEMA_VERSION } from "./types.js";
export type {
  TestPlan,
  TestCase,
  TestCaseRole,
  TestCaseMember,
  TestCaseCriticality,
  StandsFor,
  LeftOutEntry,
  PlanSelection,
  PlanAccounting,
  PlanProvenance,
  ZeroFailureLine,
} from "./types.js";
export { planSummary, composeSummary, PLAN_CAUTIONS, formatPercent, formatQuantity } from "./planSummary.js";
export { testPlanToJson } from "./planJson.js";
export { testPlanToCsv, PLAN_CSV_COLUMNS } from "./planCsv.js";
export { writeTestPlan } from "./writeTestPlan.js";
export { buildPlan, buildPlanDetailed, logicalSummary, testCaseId, DEFAULT_BUDGET } from "./buildPlan.js";
export type { LogicalPlanOptions, PlanInput } from "./buildPlan.js";
export { PLAN_V2_SCHEMA_VERSION } from "./logicalTypes.js";
export type { Plan, LogicalScenario, ConcreteTestCase, ConcreteKind, CriticalAnchor, LogicalLeftOut, LogicalSelection, LogicalAccounting, ClassSummary, PlanCriticalEvent } from "./logicalTypes.js";
export { planToCsv, logicalScenariosToCsv, CONCRETE_CSV_COLUMNS, LOGICAL_CSV_COLUMNS } from "./logicalCsv.js";
export { planToJson, writePlan } from "./writePlan.js";
