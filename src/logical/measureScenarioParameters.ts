import { InputError } from "../core/errors.js";
import type { ManeuverSegment, TrackManeuvers } from "../maneuvers/types.js";
import type { Recording } from "../recording/types.js";
import type { CriticalEpisode, Scenario, ScenarioSet } from "../scenario/types.js";
import { SLOTS } from "../scene/slots.js";
import { FLAG_HARSH_BRAKING, FLAG_THW, FLAG_TTC, type EgoScene, type SceneEvent } from "../scene/types.js";
import { scenarioClass, type ScenarioClassId } from "./classes.js";
import { resolveMeasureOptions, type MeasureOptions, type ResolvedMeasureOptions } from "./options.js";

const NS = SLOTS.length;
const AHEAD = 0;
const BEHIND = 1;
/** Slots [ahead, alongside, behind] of the left and right neighbour lanes. */
const LEFT = [2, 3, 4] as const;
const RIGHT = [5, 6, 7] as const;

/** A finite number, or null ("not measurable"): the plan never carries NaN or Infinity. */
const val = (x: number | undefined): number | null => (x !== undefined && Number.isFinite(x) ? x : null);

/** First index i with t[i] >= x (t ascending); t.length when none. */
function lowerBound(t: Float64Array, x: number): number {
  let lo = 0;
  let hi = t.length;
  while (lo < hi) {
    const mid = (lo + hi) >>> 1;
    if (t[mid]! < x) lo = mid + 1;
    else hi = mid;
  }
  return lo;
}

/** Sample of t nearest to x. */
function nearest(t: Float64Array, x: number): number {
  const i = lowerBound(t, x);
  if (i >= t.length) return t.length - 1;
  if (i > 0 && x - t[i - 1]! <= t[i]! - x) return i - 1;
  return i;
}

function median(v: number[]): number | null {
  if (v.length === 0) return null;
  const s = [...v].sort((a, b) => a - b);
  const h = s.length >> 1;
  return s.length % 2 ? s[h]! : (s[h - 1]! + s[h]!) / 2;
}

interface Ctx {
  rec: Recording;
  man: TrackManeuvers[];
  scenes: EgoScene[];
  indexOf: Map<number, number>;
  o: ResolvedMeasureOptions;
}

/**
 * Classify every scenario of a recording and measure its class's parameters (CONTRACT §1), in
 * place: sets `scenarioClass`, `parameters` (SI units, null when not measurable) and
 * `criticalContext` (who and when behind the criticality extremes, so that the plan counts one
 * physical event once). Runs per recording right after buildScenarios, with the tracks, maneuvers
 * and scenes at hand. The rule is deterministic, first match wins, in SCENARIO_CLASSES order:
 * other (too short to judge) → cut-in → leader-braking → cut-out → lane-change-left/right →
 * slow-traffic → following → overtaken → free-driving. docs/logical.md states every parameter.
 */
export function measureScenarioParameters(
  recording: Recording,
  maneuvers: TrackManeuvers[],
  scenes: EgoScene[],
  scenarioSet: ScenarioSet,
  options: MeasureOptions = {},
): ScenarioSet {
  const o = resolveMeasureOptions(options);
  const tracks = recording.tracks;
  if (maneuvers.length !== tracks.length || scenes.length !== tracks.length)
    throw new InputError(`measureScenarioParameters needs one maneuver result and one scene per track (${tracks.length}); got ${maneuvers.length} and ${scenes.length}`);
  const indexOf = new Map<number, number>();
  tracks.forEach((t, k) => indexOf.set(t.id, k));
  const ctx: Ctx = { rec: recording, man: maneuvers, scenes, indexOf, o };
  for (const s of scenarioSet.scenarios) {
    if (s.recording !== recording.id) continue;
    const k = indexOf.get(s.egoTrack);
    if (k === undefined) throw new InputError(`scenario ${s.id}: ego track ${s.egoTrack} is not in recording ${recording.id}`);
    measureOne(ctx, s, k);
  }
  return scenarioSet;
}

function measureOne(c: Ctx, s: Scenario, k: number): void {
  const tr = c.rec.tracks[k]!;
  const m = c.man[k]!;
  const scene = c.scenes[k]!;
  const a = s.startFrame;
  const n = tr.t.length;
  const e = s.endFrame >= n - 1 ? n : Math.max(a + 1, s.endFrame); // [a, e)
  const vx = m.motion.vx;
  const ax = m.motion.ax;
  const trackSeconds = tr.t[n - 1]! - tr.t[0]!;

  // Leader samples and the leader's smoothed acceleration.
  const leaderAccel = (i: number): number => {
    const lt = scene.neighbourTrack[i * NS + AHEAD]!;
    if (lt < 0) return NaN;
    const la = c.man[lt]!.motion.ax[scene.neighbourSample[i * NS + AHEAD]!]!;
    // Beyond the physical bound: an artefact of a short or noisy leader track, not braking.
    return Math.abs(la) > c.o.maxAccel ? NaN : la;
  };
  let following = 0;
  let brakePeak = -1;
  let brakePeakDecel = c.o.leaderBrakeDecel;
  let maxAbs = 0;
  let leaderMaxAbs = 0;
  for (let i = a; i < e; i++) {
    const thw = scene.thw[i]!;
    const hasLeader = scene.neighbours[i * NS + AHEAD]! >= 0;
    if (hasLeader && thw <= c.o.followHeadway) following++;
    if (Number.isFinite(ax[i]!)) maxAbs = Math.max(maxAbs, Math.abs(ax[i]!));
    const la = leaderAccel(i);
    if (Number.isFinite(la)) {
      leaderMaxAbs = Math.max(leaderMaxAbs, Math.abs(la));
      if (hasLeader && thw <= c.o.followHeadway && -la > brakePeakDecel) {
        brakePeakDecel = -la;
        brakePeak = i;
      }
    }
  }
  const followingShare = following / (e - a);
  const sceneEvent = (kind: SceneEvent["kind"]): SceneEvent | undefined => scene.events.find((ev) => ev.kind === kind && ev.frame >= a && ev.frame < e);

  let cls: ScenarioClassId;
  const p: Record<string, number | null> = {};
  const speedAt = (i: number): number | null => val(vx[Math.min(Math.max(i, 0), n - 1)]);
  p.egoSpeed = speedAt(a);
  const cutIn = sceneEvent("cut-in");
  const cutOut = sceneEvent("cut-out");
  const overtaken = sceneEvent("overtaken");
  const egoLc = m.segments.find(
    (g) => g.axis === "lateral" && g.laneChange !== undefined && g.laneChange.crossFrame >= a && g.laneChange.crossFrame < e,
  );
  if (s.seconds < c.o.minWindowSeconds || trackSeconds < c.o.minTrackSeconds) cls = "other";
  else if (cutIn) {
    cls = "cut-in";
    measureCutIn(c, k, cutIn, p);
  } else if (brakePeak >= 0) {
    cls = "leader-braking";
    measureLeaderBraking(c, k, a, e, brakePeak, p);
  } else if (cutOut) {
    cls = "cut-out";
    measureCutOut(c, k, cutOut, p);
  } else if (egoLc) {
    cls = egoLc.maneuver === "lane-change-left" ? "lane-change-left" : "lane-change-right";
    measureLaneChange(c, k, a, egoLc, p);
  } else if (s.meanSpeed < c.o.slowSpeed) {
    cls = "slow-traffic";
    p.speedSd = val(s.stats?.speedSd);
  } else if (followingShare >= c.o.followShare) {
    cls = "following";
    const ls: number[] = [];
    const gs: number[] = [];
    const hs: number[] = [];
    for (let i = a; i < e; i++) {
      if (scene.neighbours[i * NS + AHEAD]! < 0 || !(scene.thw[i]! <= c.o.followHeadway)) continue;
      const lv = vx[i]! + scene.dv[i * NS + AHEAD]!;
      if (Number.isFinite(lv)) ls.push(lv);
      if (Number.isFinite(scene.gap[i * NS + AHEAD]!)) gs.push(scene.gap[i * NS + AHEAD]!);
      hs.push(scene.thw[i]!);
    }
    p.leaderSpeed = val(median(ls) ?? NaN);
    p.gap = val(median(gs) ?? NaN);
    p.thw = val(median(hs) ?? NaN);
  } else if (overtaken) {
    cls = "overtaken";
    const f = overtaken.frame;
    p.egoSpeed = speedAt(f);
    let slot = -1;
    for (const q of [LEFT[0], RIGHT[0], LEFT[1], RIGHT[1]]) if (scene.neighbours[f * NS + q] === overtaken.other) slot = q;
    p.overtakerRelSpeed = slot >= 0 ? val(scene.dv[f * NS + slot]) : null;
    p.lateralDistance = slot >= 0 ? val(Math.abs(scene.dy[f * NS + slot]!)) : null;
  } else {
    cls = "free-driving";
    p.speedSd = val(s.stats?.speedSd);
  }
  // Every parameter of the class is present (null when not measurable), in table order.
  const params: Record<string, number | null> = {};
  for (const spec of scenarioClass(cls).parameters) params[spec.name] = p[spec.name] ?? null;
  s.scenarioClass = cls;
  s.parameters = params;
  s.criticalContext = {
    trackSeconds,
    leader: leaderEpisode(scene, tr.t, a, e),
    braking: brakingEpisode(scene, tr.t, ax, a, e, c.o.followHeadway, c.o.leaderBrakeDecel, leaderAccel),
    cutIn: cutIn ? { other: cutIn.other, tFrom: cutIn.t, tTo: cutIn.t, tPeak: cutIn.t } : null,
    maxAbsAccel: maxAbs,
    leaderMaxAbsAccel: leaderMaxAbs,
  };
}

function measureCutIn(c: Ctx, k: number, ev: SceneEvent, p: Record<string, number | null>): void {
  const m = c.man[k]!;
  const f = ev.frame;
  const ve = m.motion.vx[f]!;
  p.egoSpeed = val(ve);
  const kc = c.indexOf.get(ev.other);
  p.gapAtCrossing = val(ev.gap);
  p.thwAtCrossing = ve > 0.1 ? val(ev.gap / ve) : null;
  if (kc === undefined) return;
  const ct = c.rec.tracks[kc]!;
  const mc = c.man[kc]!;
  const j = nearest(ct.t, ev.t);
  p.cutterRelSpeed = val(mc.motion.vx[j]! - ve);
  const seg = laneChangeAt(mc.segments, ev.t);
  if (seg) {
    p.cutterLateralSpeed = val(Math.abs(seg.laneChange!.peakLateralSpeed));
    p.laneChangeDuration = val(seg.duration);
  }
}

/** The lane-change segment of a track whose crossing is nearest to t (within its own span). */
function laneChangeAt(segments: ManeuverSegment[], t: number): ManeuverSegment | undefined {
  let best: ManeuverSegment | undefined;
  let bestD = Infinity;
  for (const g of segments) {
    if (g.axis !== "lateral" || !g.laneChange) continue;
    const d = Math.abs(g.laneChange.tCross - t);
    if (d < bestD && t >= g.tStart - 1 && t <= g.tEnd + 1) {
      best = g;
      bestD = d;
    }
  }
  return best;
}

function measureLeaderBraking(c: Ctx, k: number, a: number, e: number, peak: number, p: Record<string, number | null>): void {
  const tr = c.rec.tracks[k]!;
  const m = c.man[k]!;
  const scene = c.scenes[k]!;
  const lt = scene.neighbourTrack[peak * NS + AHEAD]!;
  const ls = scene.neighbourSample[peak * NS + AHEAD]!;
  const leaderId = scene.neighbours[peak * NS + AHEAD]!;
  const lm = c.man[lt]!;
  const seg = lm.segments.find((g) => g.axis === "longitudinal" && g.maneuver === "decelerate" && g.startFrame <= ls && g.endFrame >= ls);
  // Start of braking: the start of the leader's decelerate segment, clamped into the window; the
  // first window sample with that same leader when the segment started before it.
  let f = seg ? lowerBound(tr.t, seg.tStart) : peak;
  f = Math.min(Math.max(f, a), peak);
  while (f < peak && scene.neighbours[f * NS + AHEAD] !== leaderId) f++;
  let peakDecel = 0;
  // Samples beyond the physical bound are artefacts and do not make the peak (options.maxAccel).
  const plausible = (x: number): number => (Math.abs(x) > c.o.maxAccel ? 0 : x);
  if (seg) for (let j = seg.startFrame; j <= seg.endFrame; j++) peakDecel = Math.max(peakDecel, -plausible(lm.motion.ax[j]!));
  else peakDecel = -plausible(lm.motion.ax[ls]!);
  p.egoSpeed = val(m.motion.vx[f]);
  p.leaderSpeed = seg ? val(seg.startSpeed) : val(m.motion.vx[f]! + scene.dv[f * NS + AHEAD]!);
  p.gap = val(scene.gap[f * NS + AHEAD]);
  p.leaderDecel = val(peakDecel);
  p.brakeDuration = seg ? val(seg.duration) : null;
  let minTtc = Infinity;
  let minThw = Infinity;
  for (let i = f; i < e; i++) {
    if (scene.neighbours[i * NS + AHEAD] !== leaderId) continue;
    minTtc = Math.min(minTtc, scene.ttc[i]!);
    minThw = Math.min(minThw, scene.thw[i]!);
  }
  p.minTtc = val(minTtc);
  p.minThw = val(minThw);
}

function measureCutOut(c: Ctx, k: number, ev: SceneEvent, p: Record<string, number | null>): void {
  const tr = c.rec.tracks[k]!;
  const m = c.man[k]!;
  const scene = c.scenes[k]!;
  const f = ev.frame;
  p.egoSpeed = val(m.motion.vx[f]);
  p.gap = val(ev.gap);
  const kl = c.indexOf.get(ev.other);
  if (kl !== undefined) p.leaderSpeed = val(c.man[kl]!.motion.vx[nearest(c.rec.tracks[kl]!.t, ev.t)]);
  // The next leader: the first vehicle ahead in the ego lane other than the leaving one, within 2 s.
  p.newLeaderGap = null;
  const until = tr.t[f]! + 2;
  for (let i = f; i < tr.t.length && tr.t[i]! <= until; i++) {
    const id = scene.neighbours[i * NS + AHEAD]!;
    if (id >= 0 && id !== ev.other) {
      p.newLeaderGap = val(scene.gap[i * NS + AHEAD]);
      break;
    }
  }
}

function measureLaneChange(c: Ctx, k: number, a: number, seg: ManeuverSegment, p: Record<string, number | null>): void {
  const m = c.man[k]!;
  const scene = c.scenes[k]!;
  const f = Math.max(seg.startFrame, a);
  const side = seg.maneuver === "lane-change-left" ? LEFT : RIGHT;
  p.egoSpeed = val(m.motion.vx[f]);
  p.laneChangeDuration = val(seg.duration);
  p.targetGapAhead = scene.neighbours[f * NS + side[0]]! >= 0 ? val(scene.gap[f * NS + side[0]]) : null;
  p.targetGapBehind = scene.neighbours[f * NS + side[2]]! >= 0 ? val(scene.gap[f * NS + side[2]]) : null;
  p.lateralSpeed = val(Math.abs(seg.laneChange!.peakLateralSpeed));
}

/** Span of consecutive samples around `peak` whose flags match `mask` and whose `slot` neighbour stays the same. */
function span(scene: EgoScene, t: Float64Array, a: number, e: number, peak: number, mask: number, slot: number): [number, number] {
  const id = scene.neighbours[peak * NS + slot]!;
  let lo = peak;
  let hi = peak;
  while (lo > a && scene.flags[lo - 1]! & mask && scene.neighbours[(lo - 1) * NS + slot] === id) lo--;
  while (hi < e - 1 && scene.flags[hi + 1]! & mask && scene.neighbours[(hi + 1) * NS + slot] === id) hi++;
  return [t[lo]!, t[hi]!];
}

function leaderEpisode(scene: EgoScene, t: Float64Array, a: number, e: number): CriticalEpisode | null {
  let best = -1;
  let bestTtc = Infinity;
  let bestThw = Infinity;
  for (let i = a; i < e; i++) {
    if (scene.neighbours[i * NS + AHEAD]! < 0) continue;
    const ttc = scene.ttc[i]!;
    const thw = scene.thw[i]!;
    if (ttc < bestTtc || (ttc === bestTtc && thw < bestThw)) {
      best = i;
      bestTtc = ttc;
      bestThw = thw;
    }
  }
  if (best < 0) return null;
  const [tFrom, tTo] = span(scene, t, a, e, best, FLAG_TTC | FLAG_THW, AHEAD);
  return { other: scene.neighbours[best * NS + AHEAD]!, tFrom, tTo, tPeak: t[best]! };
}

function brakingEpisode(
  scene: EgoScene,
  t: Float64Array,
  ax: Float64Array,
  a: number,
  e: number,
  followHeadway: number,
  leaderBrakeDecel: number,
  leaderAccel: (i: number) => number,
): CriticalEpisode | null {
  let best = -1;
  let bestDecel = 0;
  for (let i = a; i < e; i++) {
    const d = -ax[i]!;
    if (d > bestDecel) {
      best = i;
      bestDecel = d;
    }
  }
  if (best < 0) return null;
  // Braking while following a leader that itself brakes (within 2 s before the peak) is the ego's
  // response to it; otherwise the ego starts the braking and the pair is the ego and its follower.
  let leaderBrakes = false;
  for (let i = best; i >= a && t[i]! >= t[best]! - 2; i--) if (-leaderAccel(i) > leaderBrakeDecel) leaderBrakes = true;
  const closeLeader = leaderBrakes && scene.neighbours[best * NS + AHEAD]! >= 0 && scene.thw[best]! <= followHeadway;
  const slot = closeLeader ? AHEAD : BEHIND;
  const [tFrom, tTo] = span(scene, t, a, e, best, FLAG_HARSH_BRAKING, slot);
  return { other: scene.neighbours[best * NS + slot]!, tFrom, tTo, tPeak: t[best]!, egoFollows: closeLeader };
}
