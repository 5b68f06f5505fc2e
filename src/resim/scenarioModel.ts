import type { PlayerRoad } from "./readOpenDrive.js";

/** The subset of OpenSCENARIO the player runs, with every value resolved (parameters substituted). */
export type PositionDef =
  | { type: "world"; x: number; y: number; h: number }
  | { type: "lane"; laneId: number; s: number; offset: number }
  | { type: "relativeLane"; entity: string; dLane: number; ds: number; offset: number };

export type DynamicsShape = "step" | "linear" | "cubic" | "sinusoidal";

export interface Dynamics {
  shape: DynamicsShape;
  dimension: "time" | "rate" | "distance";
  value: number;
}

export type ActionDef =
  | { kind: "add"; entity: string; position: PositionDef }
  | { kind: "delete"; entity: string }
  | { kind: "teleport"; entity: string; position: PositionDef }
  | { kind: "speed"; entity: string; dynamics: Dynamics; target: { type: "absolute"; value: number } | { type: "relative"; entity: string; value: number; valueType: "delta" | "factor" } }
  | { kind: "laneChange"; entity: string; dynamics: Dynamics; target: { type: "relative"; entity: string; value: number } | { type: "absolute"; laneId: number }; offset: number }
  | { kind: "trajectory"; entity: string; vertices: { t: number; position: PositionDef }[]; offset: number; scale: number };

export type Rule = "greaterThan" | "lessThan" | "equalTo" | "greaterOrEqual" | "lessOrEqual" | "notEqualTo";

export type ConditionDef = { name: string; delay: number; edge: "none" | "rising" | "falling" | "risingOrFalling"; line: number } & (
  | { kind: "simulationTime"; rule: Rule; value: number }
  | {
      kind: "relativeDistance";
      triggering: string[];
      all: boolean;
      entity: string;
      distanceType: "longitudinal" | "lateral" | "euclidianDistance";
      freespace: boolean;
      rule: Rule;
      value: number;
    }
);

/** OR over groups, AND within a group; an empty list never fires. */
export type TriggerDef = ConditionDef[][];

export interface EventDef {
  name: string;
  priority: "override" | "parallel";
  actions: ActionDef[];
  start: TriggerDef | null;
}

export interface ActDef {
  name: string;
  start: TriggerDef;
  events: EventDef[];
}

export interface EntityDef {
  name: string;
  kind: "car" | "truck" | "motorcycle" | "other";
  length: number;
  width: number;
  /** Box centre relative to the reference point, entity frame (m). */
  centreX: number;
  centreY: number;
  properties: Record<string, string>;
  /** Properties of the entity's controller slot, null when it has none. */
  controller: Record<string, string> | null;
}

export interface ScenarioModel {
  file: string;
  /** FileHeader properties (roadsieve.* carry frame rate, recording and window start). */
  header: Record<string, string>;
  parameters: Record<string, string>;
  road: PlayerRoad;
  roadFile: string;
  entities: EntityDef[];
  init: ActionDef[];
  acts: ActDef[];
  /** Simulation stops at the first frame where this is true (we support SimulationTime only). */
  stopAfter: { rule: Rule; value: number };
}
