import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { SCENE_EVENTS, SLOTS } from "../scene/slots.js";
import { CH_DV, CH_GAP, CH_INVERSE_TTC, CH_LAT, CH_LON, CH_OCCUPIED, CH_SPEED, TENSOR_CHANNELS } from "../scenario/tensor.js";
import type { ScenarioSet, TensorShape } from "../scenario/types.js";
import { standardize } from "./scale.js";

/** Feature groups of the embedding, in column order; each can be weighted. */
export const FEATURE_GROUPS = ["ego", "maneuvers", "neighbours", "events", "criticality", "timeline"] as const;
export type FeatureGroup = (typeof FEATURE_GROUPS)[number];

/** One column of the embedding. */
export interface FeatureInfo {
  name: string;
  unit: string;
  /** One line, for reports. */
  meaning: string;
  group: FeatureGroup;
}

/** Caps that keep unbounded criticality values finite. */
export const THW_CAP_S = 5;
export const DRAC_CAP = 10;
export const INVERSE_TTC_CAP = 10;

/**
 * The embedding's columns for a tensor with `steps` time steps, in order. The same list is the
 * run-time catalogue for reports (name, unit, meaning, group).
 */
export function describeFeatures(steps: number): FeatureInfo[] {
  if (!Number.isInteger(steps) || steps < 1) throw new InputError(`steps=${steps} should be an integer >= 1`);
  const f: FeatureInfo[] = [];
  const add = (group: FeatureGroup, name: string, unit: string, meaning: string): void => {
    f.push({ name, unit, meaning, group });
  };
  add("ego", "ego.speed.mean", "m/s", "mean ego speed over the window (distance / time)");
  add("ego", "ego.speed.min", "m/s", "lowest ego speed in the window");
  add("ego", "ego.speed.max", "m/s", "highest ego speed in the window");
  add("ego", "ego.speed.sd", "m/s", "standard deviation of the ego speed in the window");
  add("ego", "ego.speed.change", "m/s", "ego speed at the end minus at the start of the window");
  add("ego", "ego.accel.max", "m/s²", "peak ego acceleration (0 when it never accelerates)");
  add("ego", "ego.decel.max", "m/s²", "peak ego deceleration, positive (0 when it never brakes)");
  add("ego", "ego.lateralSpeed.max", "m/s", "peak absolute lateral speed of the ego");
  add("ego", "ego.lane.start", "lane", "ego lane at the window start (0 = rightmost, -1 outside)");
  add("maneuvers", "man.share.accelerate", "1", "share of the window's samples labelled accelerate");
  add("maneuvers", "man.share.decelerate", "1", "share of the window's samples labelled decelerate");
  add("maneuvers", "man.share.laneChange", "1", "share of the window's samples inside a lane change");
  add("maneuvers", "man.laneChanges.left", "count", "ego lane crossings to the left inside the window");
  add("maneuvers", "man.laneChanges.right", "count", "ego lane crossings to the right inside the window");
  for (let s = 0; s < SLOTS.length; s++) {
    const slot = SLOTS[s]!;
    add("neighbours", `nb.${slot}.occupancy`, "1", `share of the window with a vehicle in the ${slot} slot`);
  }
  for (const slot of SLOTS)
    add("neighbours", `nb.${slot}.gap`, "m", `mean over the steps of the tensor gap channel of the ${slot} slot (± range when empty)`);
  for (const slot of SLOTS) add("neighbours", `nb.${slot}.dv`, "m/s", `mean over the steps of the speed of the ${slot} vehicle relative to the ego (0 when empty)`);
  for (const kind of SCENE_EVENTS) add("events", `ev.${kind}`, "count", `number of ${kind} events of the ego in the window`);
  add("criticality", "crit.inverseTtc.max", "1/s", `1 / minimum TTC to the leader while closing (0 never closing), capped at ${INVERSE_TTC_CAP}`);
  add("criticality", "crit.thw.min", "s", `minimum time headway to the leader, capped at ${THW_CAP_S} s (no leader: ${THW_CAP_S})`);
  add("criticality", "crit.drac.max", "m/s²", `maximum deceleration rate to avoid a crash, capped at ${DRAC_CAP}`);
  add("criticality", "crit.flag.ttc", "1", "1 when a frame had TTC below the threshold");
  add("criticality", "crit.flag.thw", "1", "1 when a frame had time headway below the threshold");
  add("criticality", "crit.flag.harsh", "1", "1 when the ego braked harder than the harsh-braking threshold");
  for (let k = 0; k < steps; k++) {
    const s = `tl.${String(k).padStart(2, "0")}`;
    add("timeline", `${s}.ego.speed`, "m/s", `step ${k}: ego speed minus the window's mean speed`);
    add("timeline", `${s}.ego.lat`, "1", `step ${k}: ego lateral maneuver (+1 left, −1 right, mean over the step)`);
    add("timeline", `${s}.ego.lon`, "1", `step ${k}: ego longitudinal maneuver (+1 accelerate, −1 decelerate, mean)`);
    add("timeline", `${s}.ahead.gap`, "m", `step ${k}: gap to the vehicle ahead in the ego lane (range when none)`);
    add("timeline", `${s}.ahead.dv`, "m/s", `step ${k}: speed of the vehicle ahead relative to the ego (0 when none)`);
    add("timeline", `${s}.left.occupancy`, "1", `step ${k}: mean occupancy of the three left-lane slots`);
    add("timeline", `${s}.right.occupancy`, "1", `step ${k}: mean occupancy of the three right-lane slots`);
    add("timeline", `${s}.inverseTtc`, "1/s", `step ${k}: largest 1/TTC over all neighbours`);
  }
  return f;
}

/** Options of {@link embedScenarios}. */
export interface EmbedOptions {
  /** Weight per feature group (>= 0); missing groups weigh 1. See standardize(). */
  groupWeights?: Partial<Record<FeatureGroup, number>>;
  /** Divide each group by sqrt(its column count) so that groups count equally. Default true. */
  balanceGroups?: boolean;
}

/** The named embedding of a scenario set. */
export interface Embedding {
  /** Standardized and group-weighted features, one row per scenario: the input of PCA and clustering. */
  matrix: Matrix;
  /** The same features in their physical units (before standardization). */
  raw: Matrix;
  features: FeatureInfo[];
  groups: FeatureGroup[];
  /** Standardization parameters (per column), to embed new scenarios the same way. */
  mean: Float64Array;
  scale: Float64Array;
  weight: Float64Array;
  warnings: string[];
}

/**
 * Embed every scenario of a set as a named feature vector: scenario-level facts (ego speed profile,
 * maneuver shares and counts, events, criticality extremes) plus summaries of the tensor (mean slot
 * gaps and relative speeds, a per-step timeline of the ego and its leader), then z-scored and
 * weighted per group (see standardize). The column catalogue is describeFeatures(steps).
 */
export function embedScenarios(set: ScenarioSet, options: EmbedOptions = {}): Embedding {
  const features = describeFeatures(set.shape.steps);
  const raw = rawFeatures(set);
  for (const g of Object.keys(options.groupWeights ?? {}))
    if (!(FEATURE_GROUPS as readonly string[]).includes(g))
      throw new InputError(`groupWeights names group "${g}"; known groups: ${FEATURE_GROUPS.join(", ")}`);
  const groups = features.map((f) => f.group);
  if (raw.rows === 0) {
    return {
      matrix: { data: new Float64Array(0), rows: 0, cols: features.length },
      raw,
      features,
      groups: [...FEATURE_GROUPS],
      mean: new Float64Array(features.length),
      scale: new Float64Array(features.length).fill(1),
      weight: new Float64Array(features.length).fill(1),
      warnings: ["no scenarios to embed"],
    };
  }
  const st = standardize(raw, { groups, weights: options.groupWeights as Record<string, number> | undefined, balanceGroups: options.balanceGroups });
  return { matrix: st.matrix, raw, features, groups: [...FEATURE_GROUPS], mean: st.mean, scale: st.scale, weight: st.weight, warnings: st.warnings };
}

/** The features in physical units, columns as describeFeatures(set.shape.steps). */
export function rawFeatures(set: ScenarioSet): Matrix {
  const shape = set.shape;
  checkShape(set);
  const cols = describeFeatures(shape.steps).length;
  const n = set.scenarios.length;
  const data = new Float64Array(n * cols);
  const S = shape.steps;
  const A = shape.actors;
  const C = shape.channels;
  const at = (i: number, s: number, a: number, c: number): number => set.tensors[((i * S + s) * A + a) * C + c]!;
  for (let i = 0; i < n; i++) {
    const sc = set.scenarios[i]!;
    const st = sc.stats;
    if (!st) throw new InputError(`scenario ${sc.id} has no stats; build the set with buildScenarios`);
    let p = i * cols;
    const put = (v: number): void => {
      data[p++] = Number.isFinite(v) ? v : 0;
    };
    put(sc.meanSpeed);
    put(st.speedMin);
    put(st.speedMax);
    put(st.speedSd);
    put(st.speedEnd - st.speedStart);
    put(st.maxAccel);
    put(sc.criticality.maxDecel);
    put(st.maxLateralSpeed);
    put(sc.laneStart);
    put(st.shareAccelerate);
    put(st.shareDecelerate);
    put(st.shareLaneChange);
    put(st.laneChangesLeft);
    put(st.laneChangesRight);
    for (let s = 0; s < SLOTS.length; s++) put(sc.slotOccupancy[s] ?? 0);
    for (let s = 0; s < SLOTS.length; s++) {
      let g = 0;
      for (let k = 0; k < S; k++) g += at(i, k, s + 1, CH_GAP);
      put(g / S);
    }
    for (let s = 0; s < SLOTS.length; s++) {
      let d = 0;
      for (let k = 0; k < S; k++) d += at(i, k, s + 1, CH_DV);
      put(d / S);
    }
    for (const kind of SCENE_EVENTS) put(sc.events.filter((e) => e.kind === kind).length);
    const c = sc.criticality;
    put(c.minTtc > 0 ? Math.min(INVERSE_TTC_CAP, 1 / c.minTtc) : INVERSE_TTC_CAP);
    put(Math.min(THW_CAP_S, c.minThw));
    put(Math.min(DRAC_CAP, c.maxDrac));
    put(c.flags.includes("ttc") ? 1 : 0);
    put(c.flags.includes("thw") ? 1 : 0);
    put(c.flags.includes("harsh-braking") ? 1 : 0);
    for (let k = 0; k < S; k++) {
      put(at(i, k, 0, CH_SPEED) - sc.meanSpeed);
      put(at(i, k, 0, CH_LAT));
      put(at(i, k, 0, CH_LON));
      put(at(i, k, 1, CH_GAP));
      put(at(i, k, 1, CH_DV));
      put((at(i, k, 3, CH_OCCUPIED) + at(i, k, 4, CH_OCCUPIED) + at(i, k, 5, CH_OCCUPIED)) / 3);
      put((at(i, k, 6, CH_OCCUPIED) + at(i, k, 7, CH_OCCUPIED) + at(i, k, 8, CH_OCCUPIED)) / 3);
      let inv = 0;
      for (let a = 1; a < A; a++) inv = Math.max(inv, at(i, k, a, CH_INVERSE_TTC));
      put(inv);
    }
  }
  return { data, rows: n, cols };
}

function checkShape(set: ScenarioSet): void {
  const s: TensorShape = set.shape;
  if (s.actors !== SLOTS.length + 1 || s.channels !== TENSOR_CHANNELS.length)
    throw new InputError(
      `tensor shape actors=${s.actors}, channels=${s.channels} should be actors=${SLOTS.length + 1}, channels=${TENSOR_CHANNELS.length} (as buildScenarios makes it)`,
    );
  if (set.tensors.length !== set.scenarios.length * s.steps * s.actors * s.channels)
    throw new InputError(`tensors.length=${set.tensors.length} should be scenarios × steps × actors × channels = ${set.scenarios.length * s.steps * s.actors * s.channels}`);
}
