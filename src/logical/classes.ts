/**
 * The functional level of the plan: a small, named set of scenario classes in plain words, one
 * table holding each class's id, name, definition and parameters (names and SI units fixed in
 * CONTRACT §1; docs/logical.md explains how each parameter is measured).
 */
import { InputError } from "../core/errors.js";

export const SCENARIO_CLASS_IDS = [
  "free-driving",
  "following",
  "leader-braking",
  "cut-in",
  "cut-out",
  "lane-change-left",
  "lane-change-right",
  "overtaken",
  "slow-traffic",
  "other",
] as const;
export type ScenarioClassId = (typeof SCENARIO_CLASS_IDS)[number];

/**
 * Which end of a parameter is the dangerous one: "low" (a small gap, a short headway), "high" (a
 * hard deceleration) or null (neither). Importance sampling shifts variations towards that end.
 */
export type CriticalSide = "low" | "high" | null;

export interface ParameterSpec {
  name: string;
  unit: string;
  description: string;
  /** Physical bounds every value (recorded or sampled) must respect. */
  lower: number;
  upper: number;
  /**
   * Tolerance within which a member counts as represented by its logical scenario's representative
   * (same unit). The reason for each value is in docs/logical.md ("Tolerances").
   */
  tolerance: number;
  critical: CriticalSide;
  /** A key parameter: the tolerance rule for k checks these (see docs/logical.md). */
  key?: boolean;
}

export interface ScenarioClass {
  id: ScenarioClassId;
  /** Plain-language name, our own words. */
  name: string;
  /** The rule that puts a scenario in this class, in words. */
  definition: string;
  parameters: readonly ParameterSpec[];
}

// Tolerances: ±3 m/s is about ±10 km/h, the usual step of speed variations in simulation test
// matrices (common practice); gaps ±10 m, about 0.4 s at motorway speed; headways ±0.5 s;
// decelerations ±1 m/s²; durations ±1.5 s; lateral speeds ±0.3 m/s; lateral distance ±0.75 m
// (a fifth of a lane). All common practice, no source; options can override them.
const egoSpeed: ParameterSpec = {
  name: "egoSpeed",
  unit: "m/s",
  description: "ego speed at the start of the window (or of the event, for event classes)",
  lower: 0,
  upper: 70,
  tolerance: 3,
  critical: "high",
  key: true,
};
const leaderSpeed = (description: string): ParameterSpec => ({ name: "leaderSpeed", unit: "m/s", description, lower: 0, upper: 70, tolerance: 3, critical: null });
const gap = (description: string): ParameterSpec => ({ name: "gap", unit: "m", description, lower: 0, upper: 2000, tolerance: 10, critical: "low", key: true });
const seconds = (name: string, description: string, tolerance: number, critical: CriticalSide, upper = 120): ParameterSpec => ({
  name,
  unit: "s",
  description,
  lower: 0,
  upper,
  tolerance,
  critical,
});
const speedSd: ParameterSpec = {
  name: "speedSd",
  unit: "m/s",
  description: "standard deviation of the ego speed over the window's samples",
  lower: 0,
  upper: 40,
  tolerance: 1,
  critical: "high",
  key: true,
};
const laneChangeParams: ParameterSpec[] = [
  egoSpeed,
  { ...seconds("laneChangeDuration", "duration of the ego's lane-change segment (start to end of the lateral movement)", 1.5, "low", 30), key: true },
  { name: "targetGapAhead", unit: "m", description: "bumper-to-bumper gap to the nearest vehicle ahead in the target lane at the start of the lane change; null when there is none", lower: 0, upper: 2000, tolerance: 10, critical: "low" },
  { name: "targetGapBehind", unit: "m", description: "bumper-to-bumper gap to the nearest vehicle behind in the target lane at the start of the lane change; null when there is none", lower: 0, upper: 2000, tolerance: 10, critical: "low" },
  { name: "lateralSpeed", unit: "m/s", description: "peak lateral speed of the ego towards the target lane", lower: 0, upper: 5, tolerance: 0.3, critical: "high" },
];

/** The class table. Order is the order of the classification rule (first match wins), "other" last. */
export const SCENARIO_CLASSES: readonly ScenarioClass[] = [
  {
    id: "cut-in",
    name: "a vehicle cuts in ahead of the ego",
    definition: "another vehicle's centre crosses into the ego lane ahead of the ego within the scene's cut-in gap (a cut-in event in the window)",
    parameters: [
      egoSpeed,
      { name: "cutterRelSpeed", unit: "m/s", description: "speed of the cutting vehicle minus ego speed at the crossing", lower: -70, upper: 70, tolerance: 3, critical: "low", key: true },
      { name: "gapAtCrossing", unit: "m", description: "bumper-to-bumper gap from the ego front to the cutting vehicle's rear when its centre crosses the marking", lower: 0, upper: 2000, tolerance: 10, critical: "low", key: true },
      seconds("thwAtCrossing", "gapAtCrossing divided by the ego speed at the crossing", 0.5, "low", 600),
      { name: "cutterLateralSpeed", unit: "m/s", description: "peak lateral speed of the cutting vehicle during its lane change (absolute)", lower: 0, upper: 5, tolerance: 0.3, critical: "high" },
      seconds("laneChangeDuration", "duration of the cutting vehicle's lane-change segment", 1.5, "low", 30),
    ],
  },
  {
    id: "leader-braking",
    name: "the vehicle ahead brakes",
    definition: "the vehicle ahead in the ego lane decelerates harder than the class threshold (default 3 m/s²) at some sample of the window",
    parameters: [
      { ...egoSpeed, description: "ego speed when the leader starts braking" },
      leaderSpeed("leader speed when it starts braking (start of its decelerate segment)"),
      gap("bumper-to-bumper gap to the leader when it starts braking"),
      { name: "leaderDecel", unit: "m/s²", description: "peak deceleration of the leader (positive)", lower: 0, upper: 12, tolerance: 1, critical: "high", key: true },
      seconds("brakeDuration", "duration of the leader's decelerate segment that holds the peak", 1.5, "high", 60),
      seconds("minTtc", "minimum time-to-collision to the leader from the start of braking to the window end; null when never closing", 1, "low", 600),
      seconds("minThw", "minimum time headway to the leader from the start of braking to the window end", 0.5, "low", 600),
    ],
  },
  {
    id: "cut-out",
    name: "the vehicle ahead leaves the ego lane",
    definition: "the leader's centre crosses out of the ego lane within the scene's cut-out gap (a cut-out event in the window)",
    parameters: [
      egoSpeed,
      leaderSpeed("speed of the leaving leader at its crossing"),
      gap("bumper-to-bumper gap to the leaving leader just before its crossing"),
      { name: "newLeaderGap", unit: "m", description: "gap to the next vehicle ahead in the ego lane just after the crossing; null when there is none within 2 s", lower: 0, upper: 2000, tolerance: 10, critical: "low" },
    ],
  },
  {
    id: "lane-change-left",
    name: "the ego changes lane to the left",
    definition: "the ego's centre crosses a marking to the left in the window",
    parameters: laneChangeParams,
  },
  {
    id: "lane-change-right",
    name: "the ego changes lane to the right",
    definition: "the ego's centre crosses a marking to the right in the window",
    parameters: laneChangeParams,
  },
  {
    id: "slow-traffic",
    name: "slow or stop-and-go traffic",
    definition: "the ego's mean speed over the window is below the slow-traffic threshold (default 60 km/h)",
    parameters: [egoSpeed, speedSd],
  },
  {
    id: "following",
    name: "following a vehicle ahead",
    definition: "a leader in the ego lane within the following headway (default 3 s) for at least half of the window's samples",
    parameters: [
      egoSpeed,
      leaderSpeed("median leader speed over the samples with a leader"),
      gap("median bumper-to-bumper gap to the leader over the samples with a leader"),
      { ...seconds("thw", "median time headway to the leader over the samples with a leader", 0.5, "low", 600), key: true },
    ],
  },
  {
    id: "overtaken",
    name: "the ego is overtaken",
    definition: "a vehicle passes the ego in a side lane (an overtaken event) while no leader is within the following headway for half of the window",
    parameters: [
      egoSpeed,
      { name: "overtakerRelSpeed", unit: "m/s", description: "speed of the passing vehicle minus ego speed when it moves ahead of the ego", lower: -70, upper: 70, tolerance: 3, critical: "high", key: true },
      { name: "lateralDistance", unit: "m", description: "absolute lateral centre-to-centre offset of the passing vehicle at that moment", lower: 0, upper: 20, tolerance: 0.75, critical: "low" },
    ],
  },
  {
    id: "free-driving",
    name: "driving freely",
    definition: "none of the above: no leader within the following headway for at least half of the window",
    parameters: [egoSpeed, speedSd],
  },
  {
    id: "other",
    name: "other (cannot be judged)",
    definition: "windows too short to judge (below the minimum window length) or of an ego too short-lived (below the minimum track length)",
    parameters: [egoSpeed],
  },
];

const BY_ID = new Map<string, ScenarioClass>(SCENARIO_CLASSES.map((c) => [c.id, c]));

/** The class of an id; throws for an unknown id. */
export function scenarioClass(id: ScenarioClassId): ScenarioClass {
  const c = BY_ID.get(id);
  if (!c) throw new InputError(`unknown scenario class "${id}"`);
  return c;
}

export function isScenarioClassId(id: unknown): id is ScenarioClassId {
  return typeof id === "string" && BY_ID.has(id);
}
