import { fidelityBlock, type FidelityRow } from "./fidelityTable.js";

/**
 * A copy of a plan (plan.json's object) whose test cases carry a `fidelity` block (fidelityBlock) where
 * a re-simulation row exists for them; other test cases get `fidelity: null`. The plan's own fields
 * are left as they are, so the integrator can attach re-simulation results to any plan schema that
 * has `testCases[].id`.
 */
export function attachFidelity<P extends { testCases: readonly { id: string }[] }>(plan: P, rows: readonly FidelityRow[]): P {
  const byId = new Map(rows.map((r) => [r.testCase, r]));
  return { ...plan, testCases: plan.testCases.map((tc) => ({ ...tc, fidelity: byId.has(tc.id) ? fidelityBlock(byId.get(tc.id)!) : null })) };
}
