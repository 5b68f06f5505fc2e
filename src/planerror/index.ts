/** The plan's own error: outcome metrics of closed-loop runs (catalogue truth and plan estimate build on these). */
export { runOutcome, OUTCOME_THRESHOLDS } from "./runOutcome.js";
export type { RunOutcome, OutcomeThresholds } from "./runOutcome.js";
