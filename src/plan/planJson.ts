import type { TestPlan } from "./types.js";

/**
 * plan.json text: two-space indentation, keys in the order the plan builds them (fixed), numbers in
 * JavaScript's shortest round-trip form, non-finite numbers as null, a final newline. The same plan
 * always gives the same bytes.
 */
export function testPlanToJson(plan: TestPlan): string {
  return `${JSON.stringify(plan, (_k, v: unknown) => {
    if (typeof v === "number" && !Number.isFinite(v)) return null;
    if (ArrayBuffer.isView(v)) return Array.from(v as unknown as ArrayLike<number>);
    return v;
  }, 2)}\n`;
}
