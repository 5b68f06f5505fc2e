import { InputError } from "../core/errors.js";
import type { ScenarioSet } from "../scenario/types.js";
import { FIGURE_CONFIG, baseLayout, round, type Figure } from "./figure.js";

/** One channel of one scenario tensor as a heat map: actors (ego and slots) × time steps. */
export function tensorFigure(set: ScenarioSet, scenario: number, channel: string): Figure {
  const c = set.channelNames.indexOf(channel);
  if (c < 0) throw new InputError(`channel "${channel}" is not one of ${set.channelNames.join(", ")}`);
  if (!(scenario >= 0 && scenario < set.scenarios.length)) throw new InputError(`scenario=${scenario} should be in [0, ${set.scenarios.length - 1}]`);
  const { steps, actors, channels } = set.shape;
  const z: number[][] = [];
  for (let a = 0; a < actors; a++) {
    const row: number[] = [];
    for (let s = 0; s < steps; s++) row.push(round(set.tensors[((scenario * steps + s) * actors + a) * channels + c]!, 4));
    z.push(row);
  }
  const unit = set.channelUnits?.[c] ?? "";
  return {
    data: [{ type: "heatmap", z, x: Array.from({ length: steps }, (_, s) => s), y: set.actorNames, colorscale: "RdBu", reversescale: true, colorbar: { title: { text: unit } } }],
    layout: baseLayout(`Scenario ${set.scenarios[scenario]!.id}: channel "${channel}" (${unit}) per actor and step`, {
      xaxis: { title: { text: "step" } },
      yaxis: { automargin: true },
      height: 380,
    }),
    config: FIGURE_CONFIG,
  };
}
