import type { Recording, Track } from "../recording/types.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import type { EgoScene } from "../scene/types.js";
import type { Progress } from "../core/progress.js";
import { throttleProgress } from "../core/progress.js";
import { InputError } from "../core/errors.js";
import { medianStep } from "../kinematics/deriveMotion.js";
import { splitAtGaps } from "../kinematics/splitAtGaps.js";
import { LATERAL, LAT_LEFT, LAT_RIGHT, LONGITUDINAL, LON_ACCELERATE, LON_DECELERATE, type LateralManeuver, type LongitudinalManeuver } from "../maneuvers/labels.js";
import { SLOTS } from "../scene/slots.js";
import { FLAG_HARSH_BRAKING, FLAG_THW, FLAG_TTC } from "../scene/types.js";
import { cutWindows } from "./cutWindows.js";
import { resolveScenarioOptions, type ResolvedScenarioOptions, type ScenarioOptions } from "./options.js";
import {
  CH_AX,
  CH_CHANGED,
  CH_DV,
  CH_DY,
  CH_GAP,
  CH_INVERSE_TTC,
  CH_LAT,
  CH_LON,
  CH_OCCUPIED,
  CH_SPEED,
  TENSOR_ACTORS,
  TENSOR_CHANNELS,
} from "./tensor.js";
import type { Scenario, ScenarioEvent, ScenarioSet, ScenarioStats } from "./types.js";

const NS = SLOTS.length;
const NA = NS + 1;
const NC = TENSOR_CHANNELS.length;
/** Sign of the gap channel per slot: + ahead, − behind, 0 alongside (centre offset instead). */
const SLOT_SIDE = SLOTS.map((s) => (s.endsWith("ahead") ? 1 : s.endsWith("behind") ? -1 : 0));
/** Nominal lateral direction of each slot's lane: 0 same lane, +1 left, −1 right. */
const SLOT_LANE = SLOTS.map((s) => (s.startsWith("left") ? 1 : s.startsWith("right") ? -1 : 0));

/**
 * Every ego drive cut into windows that tile it, each with its summary and its fixed-shape tensor
 * [steps × actors × channels] (see tensor.ts and docs/scenario-tensor.md).
 *
 * A drive is a run of an ego track without time gaps (a step above maxGapFactor × the median frame
 * interval ends it). Window k covers samples [startFrame, endFrame] and the next starts at endFrame;
 * km = (x[endFrame] − x[startFrame]) / 1000 with the recorded x (the distance along the carriageway),
 * so the windows' km add up exactly to each drive's length. Runs of a single sample carry neither
 * distance nor time and produce no window.
 *
 * Steps: the window's time span is divided into `steps` equal intervals and each step aggregates
 * every sample of its interval: occupancy as a share, continuous channels as means over the
 * occupied samples, 1/TTC and "changed" as maxima. Averaging over intervals instead of sampling at
 * points means that a brief occupant, lane change or closing peak always shows in the tensor. A step
 * interval with no sample (windows shorter than `steps` frames) takes the sample nearest its centre.
 */
export function buildScenarios(
  recording: Recording,
  maneuvers: TrackManeuvers[],
  scenes: EgoScene[],
  options: ScenarioOptions = {},
  progress?: Progress,
): ScenarioSet {
  const tracks = recording.tracks;
  if (maneuvers.length !== tracks.length || scenes.length !== tracks.length)
    throw new InputError(
      `maneuvers (${maneuvers.length}) and scenes (${scenes.length}) should have one entry per track (${tracks.length}); pass the outputs of detectAllManeuvers and buildScenes unchanged`,
    );
  for (let k = 0; k < tracks.length; k++)
    if (scenes[k]!.trackId !== tracks[k]!.id || scenes[k]!.samples !== tracks[k]!.t.length || maneuvers[k]!.trackId !== tracks[k]!.id)
      throw new InputError(`scenes[${k}] / maneuvers[${k}] do not belong to track ${tracks[k]!.id}`);
  const o = resolveScenarioOptions(options);
  const markings = recording.road.laneMarkings;
  const laneWidth = markings.length >= 2 ? (markings[markings.length - 1]! - markings[0]!) / (markings.length - 1) : 3.75;
  const report = progress ? throttleProgress(progress) : undefined;
  const warnings: string[] = [];
  const scenarios: Scenario[] = [];
  const chunks: Float32Array[] = [];
  const per = o.steps * NA * NC;
  let singles = 0;
  for (let k = 0; k < tracks.length; k++) {
    report?.({ stage: "scenarios", done: k, total: tracks.length });
    const tr = tracks[k]!;
    const n = tr.t.length;
    if (n === 0) continue;
    const dt = medianStep(tr.t);
    const runs = dt > 0 ? splitAtGaps(tr.t, o.maxGapFactor * dt) : [[0, n] as [number, number]];
    let ordinal = 0;
    for (const [s, e] of runs) {
      if (e - s < 2) {
        singles++;
        continue;
      }
      const cuts = o.window.mode === "events" ? eventCuts(tr, maneuvers[k]!, scenes[k]!, s, e, o.window.leadS) : [];
      const windows = cutWindows(tr.t, s, e, o.window, cuts);
      for (let w = 0; w < windows.length; w++) {
        const [a, b] = windows[w]!;
        const isLast = w === windows.length - 1;
        const tensor = new Float32Array(per);
        const sc = summarize(recording, maneuvers, scenes[k]!, k, a, b, isLast, ordinal++, scenarios.length, o);
        fillTensor(recording, maneuvers, scenes[k]!, k, a, b, isLast, o, laneWidth, markings, o.maxGapFactor * dt, tensor);
        scenarios.push(sc);
        chunks.push(tensor);
      }
    }
  }
  report?.({ stage: "scenarios", done: tracks.length, total: tracks.length });
  if (singles > 0) warnings.push(`${singles} drive piece(s) of a single sample carry no distance or time and produced no scenario`);
  const partial = scenarios.filter((s) => s.partial).length;
  if (partial > 0) warnings.push(`${partial} of ${scenarios.length} scenarios are shorter than the nominal window because their drive ended (marked partial)`);
  const tensors = new Float32Array(scenarios.length * per);
  for (let i = 0; i < chunks.length; i++) tensors.set(chunks[i]!, i * per);
  return {
    scenarios,
    tensors,
    shape: { steps: o.steps, actors: NA, channels: NC },
    actorNames: [...TENSOR_ACTORS],
    channelNames: TENSOR_CHANNELS.map((c) => c.name),
    channelUnits: TENSOR_CHANNELS.map((c) => c.unit),
    options: { ...o, window: { ...o.window } },
    warnings,
  };
}

/** Cut points of the events mode: leadS before each ego lane-change start and each scene event. */
function eventCuts(tr: Track, m: TrackManeuvers, scene: EgoScene, s: number, e: number, lead: number): number[] {
  const times: number[] = [];
  for (const g of m.segments) if (g.axis === "lateral" && g.maneuver !== "lane-keep" && g.startFrame >= s && g.startFrame < e) times.push(g.tStart - lead);
  for (const ev of scene.events) if (ev.frame >= s && ev.frame < e) times.push(ev.t - lead);
  const cuts: number[] = [];
  for (const time of times) {
    // First sample at or after the cut time.
    let lo = s;
    let hi = e - 1;
    while (lo < hi) {
      const mid = (lo + hi) >> 1;
      if (tr.t[mid]! < time) lo = mid + 1;
      else hi = mid;
    }
    cuts.push(lo);
  }
  return cuts;
}

function collapse<T>(names: readonly T[], codes: Int8Array, a: number, b: number): T[] {
  const out: T[] = [];
  let prev = -1;
  for (let i = a; i < b; i++) {
    const c = codes[i]!;
    if (c !== prev) out.push(names[c]!);
    prev = c;
  }
  return out;
}

function summarize(
  recording: Recording,
  man: TrackManeuvers[],
  scene: EgoScene,
  k: number,
  a: number,
  b: number,
  isLast: boolean,
  ordinal: number,
  index: number,
  o: ResolvedScenarioOptions,
): Scenario {
  const tr = recording.tracks[k]!;
  const m = man[k]!;
  // Per-sample aggregates use [a, b) so that the shared boundary sample counts once; the drive's last window includes b.
  const end = isLast ? b + 1 : b;
  const count = end - a;
  const seconds = tr.t[b]! - tr.t[a]!;
  const km = (tr.x[b]! - tr.x[a]!) / 1000;
  const occupancy = new Array<number>(NS).fill(0);
  let minTtc = Infinity;
  let minThw = Infinity;
  let maxDrac = 0;
  let flags = 0;
  let vMin = Infinity;
  let vMax = -Infinity;
  let vSum = 0;
  let vSq = 0;
  let vN = 0;
  let maxAccel = 0;
  let maxDecel = 0;
  let maxVy = 0;
  let nAcc = 0;
  let nDec = 0;
  let nLc = 0;
  for (let i = a; i < end; i++) {
    for (let s = 0; s < NS; s++) if (scene.neighbours[i * NS + s]! >= 0) occupancy[s]!++;
    minTtc = Math.min(minTtc, scene.ttc[i]!);
    minThw = Math.min(minThw, scene.thw[i]!);
    maxDrac = Math.max(maxDrac, scene.drac[i]!);
    flags |= scene.flags[i]!;
    const v = m.motion.vx[i]!;
    if (Number.isFinite(v)) {
      vMin = Math.min(vMin, v);
      vMax = Math.max(vMax, v);
      vSum += v;
      vSq += v * v;
      vN++;
    }
    const acc = m.motion.ax[i]!;
    if (Number.isFinite(acc)) {
      maxAccel = Math.max(maxAccel, acc);
      maxDecel = Math.max(maxDecel, -acc);
    }
    const vy = Math.abs(m.motion.vy[i]!);
    if (Number.isFinite(vy)) maxVy = Math.max(maxVy, vy);
    const lon = m.longitudinal[i]!;
    if (lon === LON_ACCELERATE) nAcc++;
    else if (lon === LON_DECELERATE) nDec++;
    const lat = m.lateral[i]!;
    if (lat === LAT_LEFT || lat === LAT_RIGHT) nLc++;
  }
  let left = 0;
  let right = 0;
  for (let i = a + 1; i <= b; i++) {
    const p = m.lane[i - 1]!;
    const q = m.lane[i]!;
    if (p >= 0 && q >= 0 && q - p === 1) left++;
    else if (p >= 0 && q >= 0 && p - q === 1) right++;
  }
  const events: ScenarioEvent[] = [];
  for (const ev of scene.events) if (ev.frame >= a && ev.frame < end) events.push({ kind: ev.kind, t: ev.t, other: ev.other });
  const flagNames: string[] = [];
  if (flags & FLAG_TTC) flagNames.push("ttc");
  if (flags & FLAG_THW) flagNames.push("thw");
  if (flags & FLAG_HARSH_BRAKING) flagNames.push("harsh-braking");
  const mean = vN > 0 ? vSum / vN : 0;
  const stats: ScenarioStats = {
    speedStart: finiteOr(m.motion.vx[a]!, mean),
    speedEnd: finiteOr(m.motion.vx[b]!, mean),
    speedMin: vN > 0 ? vMin : 0,
    speedMax: vN > 0 ? vMax : 0,
    speedSd: vN > 1 ? Math.sqrt(Math.max(0, vSq / vN - mean * mean)) : 0,
    maxAccel,
    maxLateralSpeed: maxVy,
    shareAccelerate: nAcc / count,
    shareDecelerate: nDec / count,
    shareLaneChange: nLc / count,
    laneChangesLeft: left,
    laneChangesRight: right,
  };
  const nominal = o.window.mode === "fixed" ? o.window.lengthS : o.window.minS;
  const sc: Scenario = {
    index,
    id: `${recording.id}/${tr.id}/${ordinal}`,
    recording: recording.id,
    egoTrack: tr.id,
    egoKind: tr.kind,
    window: ordinal,
    startFrame: a,
    endFrame: b,
    tStart: tr.t[a]!,
    tEnd: tr.t[b]!,
    seconds,
    km,
    meanSpeed: seconds > 0 ? (km * 1000) / seconds : mean,
    laneStart: m.lane[a]!,
    laneEnd: m.lane[b]!,
    lateral: collapse<LateralManeuver>(LATERAL, m.lateral, a, end),
    longitudinal: collapse<LongitudinalManeuver>(LONGITUDINAL, m.longitudinal, a, end),
    slotOccupancy: occupancy.map((c) => c / count),
    events,
    criticality: { minTtc, minThw, maxDrac, maxDecel, flags: flagNames },
    stats,
  };
  if (seconds < nominal - 1e-9) sc.partial = true;
  return sc;
}

function finiteOr(v: number, fallback: number): number {
  return Number.isFinite(v) ? v : fallback;
}

const LON_SIGN = [0, 1, -1];
const LAT_SIGN = [0, 1, -1];

/** Fill one scenario's tensor (steps × actors × channels) by aggregating the samples of each step. */
function fillTensor(
  recording: Recording,
  man: TrackManeuvers[],
  scene: EgoScene,
  k: number,
  a: number,
  b: number,
  isLast: boolean,
  o: ResolvedScenarioOptions,
  laneWidth: number,
  markings: number[],
  maxStep: number,
  out: Float32Array,
): void {
  const tr = recording.tracks[k]!;
  const m = man[k]!;
  const S = o.steps;
  const end = isLast ? b + 1 : b;
  const t0 = tr.t[a]!;
  const span = tr.t[b]! - t0;
  const width = span / S;
  // Assign samples to steps; a step with no sample borrows the sample nearest its centre.
  const stepOf = new Int32Array(end - a);
  const counts = new Int32Array(S);
  for (let i = a; i < end; i++) {
    // The small tolerance puts a sample lying on a step boundary (up to rounding) into the later step.
    const s = width > 0 ? Math.min(S - 1, Math.floor((tr.t[i]! - t0) / width + 1e-9)) : 0;
    stepOf[i - a] = s;
    counts[s]!++;
  }
  const sums = new Float64Array(S * NA * NC);
  const occ = new Float64Array(S * NA);
  const maxInv = new Float64Array(S * NA);
  const changed = new Uint8Array(S * NA);
  const egoSpeed = new Float64Array(S);
  const egoSpeedN = new Float64Array(S);
  const add = (s: number, i: number, prev: number): void => {
    const base = s * NA;
    // Ego
    const vE = finiteOr(m.motion.vx[i]!, 0);
    const lane = m.lane[i]!;
    const centre = lane >= 0 && lane + 1 < markings.length ? 0.5 * (markings[lane]! + markings[lane + 1]!) : m.motion.y[i]!;
    const ego = base * NC;
    occ[base]! += 1;
    sums[ego + CH_SPEED]! += vE;
    sums[ego + CH_DY]! += m.motion.y[i]! - centre;
    sums[ego + CH_AX]! += finiteOr(m.motion.ax[i]!, 0);
    sums[ego + CH_LON]! += LON_SIGN[m.longitudinal[i]!]!;
    sums[ego + CH_LAT]! += LAT_SIGN[m.lateral[i]!]!;
    if (prev >= 0 && m.lane[prev] !== lane) changed[base] = 1;
    egoSpeed[s]! += vE;
    egoSpeedN[s]! += 1;
    for (let sl = 0; sl < NS; sl++) {
      const p = i * NS + sl;
      const id = scene.neighbours[p]!;
      const actor = base + 1 + sl;
      if (prev >= 0 && scene.neighbours[prev * NS + sl] !== id) changed[actor] = 1;
      if (id < 0) continue;
      const kn = scene.neighbourTrack[p]!;
      const j = scene.neighbourSample[p]!;
      const nm = man[kn]!;
      const c = actor * NC;
      occ[actor]! += 1;
      const side = SLOT_SIDE[sl]!;
      const g = scene.gap[p]!;
      const gapCh = side === 0 ? scene.dx[p]! : side * g;
      sums[c + CH_GAP]! += clip(gapCh, o.range);
      const dv = finiteOr(scene.dv[p]!, 0);
      sums[c + CH_DV]! += dv;
      sums[c + CH_SPEED]! += vE + dv;
      sums[c + CH_DY]! += scene.dy[p]!;
      sums[c + CH_AX]! += finiteOr(nm.motion.ax[j]!, 0);
      sums[c + CH_LON]! += LON_SIGN[nm.longitudinal[j]!]!;
      sums[c + CH_LAT]! += LAT_SIGN[nm.lateral[j]!]!;
      // Closing speed over gap: the ego closing on a vehicle ahead, or a vehicle behind closing on the ego.
      const closing = side > 0 ? -dv : side < 0 ? dv : 0;
      if (closing > 0) {
        const inv = Math.min(o.maxInverseTtc, closing / Math.max(g, 1e-6));
        if (inv > maxInv[actor]!) maxInv[actor] = inv;
      }
    }
  };
  // "changed" compares each sample with the one before it (also across step and window boundaries
  // within a drive), so a change is counted in the step of the first sample after it.
  for (let i = a; i < end; i++) {
    const prev = i > 0 && tr.t[i]! - tr.t[i - 1]! <= maxStep ? i - 1 : -1;
    add(stepOf[i - a]!, i, prev);
  }
  for (let s = 0; s < S; s++) {
    if (counts[s]! > 0) continue;
    const centre = t0 + (s + 0.5) * width;
    let best = a;
    for (let i = a; i < end; i++) if (Math.abs(tr.t[i]! - centre) < Math.abs(tr.t[best]! - centre)) best = i;
    add(s, best, -1);
  }
  for (let s = 0; s < S; s++) {
    const nE = occ[s * NA]!;
    const vEgo = egoSpeedN[s]! > 0 ? egoSpeed[s]! / egoSpeedN[s]! : 0;
    for (let actor = 0; actor < NA; actor++) {
      const idx = s * NA + actor;
      const c = idx * NC;
      const nOcc = occ[idx]!;
      const dst = idx * NC;
      if (actor === 0) {
        out[dst + CH_OCCUPIED] = 1;
        out[dst + CH_GAP] = 0;
        out[dst + CH_DV] = 0;
        for (const ch of [CH_SPEED, CH_DY, CH_AX, CH_LON, CH_LAT]) out[dst + ch] = sums[c + ch]! / nE;
        out[dst + CH_INVERSE_TTC] = 0;
        out[dst + CH_CHANGED] = changed[idx]!;
        continue;
      }
      const sl = actor - 1;
      out[dst + CH_OCCUPIED] = nOcc / nE;
      out[dst + CH_CHANGED] = changed[idx]!;
      out[dst + CH_INVERSE_TTC] = maxInv[idx]!;
      if (nOcc === 0) {
        out[dst + CH_GAP] = SLOT_SIDE[sl]! * o.range;
        out[dst + CH_DV] = 0;
        out[dst + CH_SPEED] = vEgo;
        out[dst + CH_DY] = SLOT_LANE[sl]! * laneWidth;
        out[dst + CH_AX] = 0;
        out[dst + CH_LON] = 0;
        out[dst + CH_LAT] = 0;
        continue;
      }
      for (const ch of [CH_GAP, CH_DV, CH_SPEED, CH_DY, CH_AX, CH_LON, CH_LAT]) out[dst + ch] = sums[c + ch]! / nOcc;
    }
  }
}

function clip(v: number, r: number): number {
  return v > r ? r : v < -r ? -r : v;
}
