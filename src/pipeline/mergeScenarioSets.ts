import { InputError } from "../core/errors.js";
import type { ScenarioSet } from "../scenario/types.js";

/** Concatenate the scenario sets of several recordings into one catalogue, renumbering `index`. */
export function mergeScenarioSets(sets: ScenarioSet[]): ScenarioSet {
  if (sets.length === 0) throw new InputError("mergeScenarioSets needs at least one set");
  if (sets.length === 1) return sets[0]!;
  const first = sets[0]!;
  for (const s of sets)
    if (s.shape.steps !== first.shape.steps || s.shape.actors !== first.shape.actors || s.shape.channels !== first.shape.channels)
      throw new InputError(
        `scenario tensors differ in shape (${s.shape.steps}×${s.shape.actors}×${s.shape.channels} vs ${first.shape.steps}×${first.shape.actors}×${first.shape.channels}); build all sets with the same options`,
      );
  const total = sets.reduce((a, s) => a + s.scenarios.length, 0);
  const tensors = new Float32Array(total * first.shape.steps * first.shape.actors * first.shape.channels);
  const scenarios = [];
  let off = 0;
  for (const s of sets) {
    tensors.set(s.tensors, off);
    off += s.tensors.length;
    for (const sc of s.scenarios) scenarios.push({ ...sc, index: scenarios.length });
  }
  return { ...first, scenarios, tensors, warnings: sets.flatMap((s) => s.warnings) };
}
