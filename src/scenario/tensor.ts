import { SLOTS } from "../scene/slots.js";

/** Actors of the scenario tensor: the ego first, then the eight neighbour slots in SLOTS order. */
export const TENSOR_ACTORS: readonly string[] = Object.freeze(["ego", ...SLOTS]);

/** A tensor channel: name, unit and one-line meaning (the same text as docs/scenario-tensor.md). */
export interface ChannelInfo {
  name: string;
  unit: string;
  meaning: string;
}

/**
 * Channels of the scenario tensor. Each step aggregates every sample of its time interval (shares
 * and means; 1/TTC and "changed" as maxima), so a change between two step centres is never lost.
 */
export const TENSOR_CHANNELS: readonly ChannelInfo[] = Object.freeze([
  { name: "occupied", unit: "1", meaning: "share of the step's samples in which the slot is occupied (ego: 1)" },
  {
    name: "gap",
    unit: "m",
    meaning:
      "bumper-to-bumper gap, + ahead / − behind; alongside slots: centre offset along x; clipped to ±range; empty ahead/behind: ±range, empty alongside: 0; ego: 0",
  },
  { name: "dv", unit: "m/s", meaning: "neighbour speed − ego speed; empty: 0; ego: 0" },
  { name: "speed", unit: "m/s", meaning: "longitudinal speed of the actor; empty: the ego's speed" },
  {
    name: "dy",
    unit: "m",
    meaning: "lateral offset neighbour − ego (+ left); empty: 0 same lane, ±lane width side lanes; ego: offset from its lane centre",
  },
  { name: "ax", unit: "m/s²", meaning: "longitudinal acceleration of the actor; empty: 0" },
  { name: "lon", unit: "1", meaning: "longitudinal maneuver, mean of +1 accelerate / 0 keep / −1 decelerate; empty: 0" },
  { name: "lat", unit: "1", meaning: "lateral maneuver, mean of +1 lane change left / 0 lane keep / −1 lane change right; empty: 0" },
  {
    name: "inverseTtc",
    unit: "1/s",
    meaning: "max over the step of closing speed / gap (ego closing on an ahead slot, a behind slot closing on the ego), capped; 0 when not closing; ego: 0",
  },
  { name: "changed", unit: "1", meaning: "1 when the slot's occupant (or the ego's lane, for the ego) changed during the step, else 0" },
]);

export const CH_OCCUPIED = 0;
export const CH_GAP = 1;
export const CH_DV = 2;
export const CH_SPEED = 3;
export const CH_DY = 4;
export const CH_AX = 5;
export const CH_LON = 6;
export const CH_LAT = 7;
export const CH_INVERSE_TTC = 8;
export const CH_CHANGED = 9;

/** Offset of element (scenario, step, actor, channel) in ScenarioSet.tensors. */
export function tensorOffset(shape: { steps: number; actors: number; channels: number }, scenario: number, step: number, actor: number, channel: number): number {
  return ((scenario * shape.steps + step) * shape.actors + actor) * shape.channels + channel;
}
