import { scenarioTypeKeys, type TypeKeyOptions } from "../coverage/typeKey.js";
import type { Scenario } from "../scenario/types.js";

/** What a category is: the scenario class (functional level) when extraction measured it, else the type key. */
export type CategoryKind = "class" | "type key";

/**
 * A scenario as the catalogue functions read it: the extraction fields plus, when the logical
 * stage ran, its class (`scenarioClass`).
 */
export type CategorisedScenario = Scenario & { scenarioClass?: string };

/**
 * The category of every scenario: its class when every scenario has one (`scenario.scenarioClass`),
 * else its type key (given, or computed with `typeKey` options). Classes are preferred because a
 * handful of named situations gives tests and breakdowns enough counts per cell; type keys are finer.
 */
export function scenarioCategories(
  scenarios: readonly CategorisedScenario[],
  options: { typeKeys?: readonly string[]; typeKey?: TypeKeyOptions } = {},
): { kind: CategoryKind; categories: string[] } {
  if (scenarios.length > 0 && scenarios.every((s) => typeof s.scenarioClass === "string"))
    return { kind: "class", categories: scenarios.map((s) => s.scenarioClass!) };
  if (options.typeKeys) {
    if (options.typeKeys.length !== scenarios.length) throw new RangeError(`typeKeys has ${options.typeKeys.length} entries for ${scenarios.length} scenarios`);
    return { kind: "type key", categories: [...options.typeKeys] };
  }
  return { kind: "type key", categories: scenarioTypeKeys(scenarios as Scenario[], options.typeKey) };
}
