import { InputError } from "../core/errors.js";
import type { Scenario } from "../scenario/types.js";

/** What a scenario's weight is: its kilometres, its hours, or one per scenario. */
export type WeightBy = "km" | "hours" | "count";
export const WEIGHT_BY: readonly WeightBy[] = ["km", "hours", "count"];

export function checkWeightBy(by: string, name = "weightBy"): asserts by is WeightBy {
  if (!(WEIGHT_BY as readonly string[]).includes(by))
    throw new InputError(`${name}="${by}" should be one of ${WEIGHT_BY.map((w) => `"${w}"`).join(", ")}`, { column: name, value: by });
}

/**
 * Per-scenario weights for clustering and shares. Weighting by kilometres or hours keeps a long, slow
 * jam window from counting like a short, fast free-flow one: each scenario weighs what it stands for.
 * Throws InputError naming the scenario when km or seconds is negative or not finite.
 */
export function scenarioWeights(scenarios: readonly Scenario[], by: WeightBy = "km"): Float64Array {
  checkWeightBy(by);
  const w = new Float64Array(scenarios.length);
  for (let i = 0; i < scenarios.length; i++) {
    const s = scenarios[i]!;
    let v: number;
    switch (by) {
      case "km":
        v = s.km;
        break;
      case "hours":
        v = s.seconds / 3600;
        break;
      case "count":
        v = 1;
        break;
      default: {
        const never: never = by;
        throw new Error(`unhandled weightBy ${String(never)}`);
      }
    }
    if (!(v >= 0) || !Number.isFinite(v))
      throw new InputError(`scenario ${i} ("${s.id}") has an invalid ${by === "km" ? "km" : "seconds"}; expected a finite number >= 0`, {
        column: by === "km" ? "km" : "seconds",
        value: by === "km" ? s.km : s.seconds,
      });
    w[i] = v;
  }
  return w;
}
