import type { Recording } from "../recording/types.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import type { Progress } from "../core/progress.js";
import { throttleProgress } from "../core/progress.js";
import { InputError } from "../core/errors.js";
import { SCENE_EVENTS, SLOTS } from "./slots.js";
import { buildFrameIndex, laneRange, upperBoundX, type FrameIndex } from "./frameIndex.js";
import { drac, timeHeadway, timeToCollision } from "./criticality.js";
import { resolveSceneOptions, type ResolvedSceneOptions, type SceneOptions } from "./options.js";
import { FLAG_HARSH_BRAKING, FLAG_THW, FLAG_TTC, type EgoScene, type SceneEvent } from "./types.js";

const NS = SLOTS.length;
const AHEAD = 0;
const BEHIND = 1;
/** Slot numbers of each side lane: [ahead, alongside, behind] for left and right. */
const SIDE: Array<{ dLane: number; slots: [number, number, number] }> = [
  { dLane: 1, slots: [2, 3, 4] },
  { dLane: -1, slots: [5, 6, 7] },
];

/**
 * The neighbours of every vehicle as ego, frame by frame, with criticality and events.
 *
 * Samples of all tracks are put on one frame clock (frame = round(t · frameRate)) and indexed per
 * frame sorted by lane and x (see frameIndex.ts), so each ego sample finds its eight neighbours by
 * binary search: O(rows · log(vehicles per frame)) instead of a scan over all tracks. Positions,
 * speeds and lanes are the smoothed ones from the maneuver stage. Gaps are bumper to bumper from the
 * vehicle lengths. A same-lane vehicle that overlaps the ego along x (only possible for a moment
 * during a lane change) is neither ahead nor behind.
 *
 * `maneuvers` must be aligned with `recording.tracks` (as detectAllManeuvers returns them).
 */
export function buildScenes(recording: Recording, maneuvers: TrackManeuvers[], options: SceneOptions = {}, progress?: Progress): EgoScene[] {
  const tracks = recording.tracks;
  if (maneuvers.length !== tracks.length)
    throw new InputError(`maneuvers has ${maneuvers.length} entries, expected one per track (${tracks.length}); pass detectAllManeuvers(recording) unchanged`);
  for (let k = 0; k < tracks.length; k++)
    if (maneuvers[k]!.trackId !== tracks[k]!.id || maneuvers[k]!.lane.length !== tracks[k]!.t.length)
      throw new InputError(`maneuvers[${k}] belongs to track ${maneuvers[k]!.trackId}, expected track ${tracks[k]!.id} with ${tracks[k]!.t.length} samples`);
  const o = resolveSceneOptions(options, recording.road.frameRate);
  const ix = buildFrameIndex(
    maneuvers.map((m, k) => ({ t: tracks[k]!.t, x: m.motion.x, lane: m.lane })),
    o.frameRate,
  );
  const report = progress ? throttleProgress(progress) : undefined;
  const crossingEvents = laneCrossingEvents(recording, maneuvers, ix, o);
  const out: EgoScene[] = [];
  for (let k = 0; k < tracks.length; k++) {
    report?.({ stage: "scenes", done: k, total: tracks.length });
    out.push(egoScene(recording, maneuvers, ix, k, o, crossingEvents[k]!));
  }
  report?.({ stage: "scenes", done: tracks.length, total: tracks.length });
  return out;
}

function egoScene(
  recording: Recording,
  man: TrackManeuvers[],
  ix: FrameIndex,
  k: number,
  o: ResolvedSceneOptions,
  crossingEvents: SceneEvent[],
): EgoScene {
  const tracks = recording.tracks;
  const ego = tracks[k]!;
  const em = man[k]!;
  const n = ego.t.length;
  const neighbours = new Int32Array(n * NS).fill(-1);
  const nbTrack = new Int32Array(n * NS).fill(-1);
  const nbSample = new Int32Array(n * NS).fill(-1);
  const gap = new Float32Array(n * NS).fill(NaN);
  const dx = new Float32Array(n * NS).fill(NaN);
  const dy = new Float32Array(n * NS).fill(NaN);
  const dv = new Float32Array(n * NS).fill(NaN);
  const ttc = new Float64Array(n).fill(Infinity);
  const thw = new Float64Array(n).fill(Infinity);
  const dracA = new Float64Array(n);
  const flags = new Uint8Array(n);
  const frameOf = ix.frameOf[k]!;
  const halfE = ego.length / 2;

  const put = (i: number, slot: number, q: number, g: number): void => {
    const kn = ix.track[q]!;
    const j = ix.sample[q]!;
    const p = i * NS + slot;
    neighbours[p] = tracks[kn]!.id;
    nbTrack[p] = kn;
    nbSample[p] = j;
    gap[p] = g;
    dx[p] = ix.x[q]! - em.motion.x[i]!;
    dy[p] = man[kn]!.motion.y[j]! - em.motion.y[i]!;
    dv[p] = man[kn]!.motion.vx[j]! - em.motion.vx[i]!;
  };

  for (let i = 0; i < n; i++) {
    const L = em.lane[i]!;
    if (L < 0) continue;
    const f = frameOf[i]!;
    const xE = em.motion.x[i]!;
    // Same lane: nearest non-overlapping vehicle ahead and behind.
    {
      const [a, b] = laneRange(ix, f, L);
      const p = upperBoundX(ix, a, b, xE);
      for (let q = p; q < b; q++) {
        if (ix.track[q] === k) continue;
        const g = ix.x[q]! - tracks[ix.track[q]!]!.length / 2 - (xE + halfE);
        if (g >= 0) {
          put(i, AHEAD, q, g);
          break;
        }
      }
      for (let q = p - 1; q >= a; q--) {
        if (ix.track[q] === k) continue;
        const g = xE - halfE - (ix.x[q]! + tracks[ix.track[q]!]!.length / 2);
        if (g >= 0) {
          put(i, BEHIND, q, g);
          break;
        }
      }
    }
    // Side lanes: ahead (rear beyond ego front), alongside (overlap, smallest |dx|), behind.
    for (const side of SIDE) {
      const lane = L + side.dLane;
      if (lane < 0) continue;
      const [a, b] = laneRange(ix, f, lane);
      if (a === b) continue;
      const p = upperBoundX(ix, a, b, xE);
      let along = -1;
      let alongGap = 0;
      for (let q = p; q < b; q++) {
        const g = ix.x[q]! - tracks[ix.track[q]!]!.length / 2 - (xE + halfE);
        if (g >= 0) {
          put(i, side.slots[0], q, g);
          break;
        }
        if (along < 0 || Math.abs(ix.x[q]! - xE) < Math.abs(ix.x[along]! - xE)) {
          along = q;
          alongGap = g;
        }
      }
      for (let q = p - 1; q >= a; q--) {
        const g = xE - halfE - (ix.x[q]! + tracks[ix.track[q]!]!.length / 2);
        if (g >= 0) {
          put(i, side.slots[2], q, g);
          break;
        }
        if (along < 0 || Math.abs(ix.x[q]! - xE) < Math.abs(ix.x[along]! - xE)) {
          along = q;
          alongGap = g;
        }
      }
      if (along >= 0) put(i, side.slots[1], along, alongGap);
    }
    // Criticality towards the same-lane leader.
    const vE = em.motion.vx[i]!;
    if (neighbours[i * NS + AHEAD]! >= 0 && Number.isFinite(vE)) {
      const g = gap[i * NS + AHEAD]!;
      const vL = vE + dv[i * NS + AHEAD]!;
      ttc[i] = timeToCollision(g, vE, vL);
      thw[i] = timeHeadway(g, vE);
      dracA[i] = drac(g, vE, vL);
    }
    let fl = 0;
    if (ttc[i]! < o.ttcBelow) fl |= FLAG_TTC;
    if (thw[i]! < o.thwBelow) fl |= FLAG_THW;
    if (em.motion.ax[i]! < -o.decelAbove) fl |= FLAG_HARSH_BRAKING;
    flags[i] = fl;
  }

  const events = findEvents(recording, man, ix, k, o, { neighbours, nbTrack, nbSample, gap, dv, ttc }, crossingEvents);
  return { trackId: ego.id, trackIndex: k, samples: n, neighbours, neighbourTrack: nbTrack, neighbourSample: nbSample, gap, dx, dy, dv, ttc, thw, drac: dracA, flags, events };
}

interface SlotArrays {
  neighbours: Int32Array;
  nbTrack: Int32Array;
  nbSample: Int32Array;
  gap: Float32Array;
  dv: Float32Array;
  ttc: Float64Array;
}

/**
 * Cut-ins and cut-outs, found from the lane changer's side so that they follow the definition
 * exactly: when a vehicle's centre crosses into lane B, the nearest vehicle in lane B whose centre is
 * behind the changer's centre is the ego of a cut-in, if the bumper-to-bumper gap (changer rear to
 * ego front) is at most cutInMaxGap; when it leaves lane A, the nearest vehicle behind it in lane A
 * (one frame earlier) is the ego of a cut-out if that gap is at most cutOutMaxGap. A crossing is a
 * step of the lane index between two adjacent lanes on consecutive frames. Returns events per track.
 */
function laneCrossingEvents(recording: Recording, man: TrackManeuvers[], ix: FrameIndex, o: ResolvedSceneOptions): SceneEvent[][] {
  const tracks = recording.tracks;
  const out: SceneEvent[][] = tracks.map(() => []);
  const nearestBehind = (frame: number, lane: number, x: number, self: number): number => {
    const [a, b] = laneRange(ix, frame, lane);
    for (let q = upperBoundX(ix, a, b, x) - 1; q >= a; q--) if (ix.track[q] !== self) return q;
    return -1;
  };
  for (let kc = 0; kc < tracks.length; kc++) {
    const lane = man[kc]!.lane;
    const fr = ix.frameOf[kc]!;
    const x = man[kc]!.motion.x;
    const half = tracks[kc]!.length / 2;
    for (let i = 1; i < lane.length; i++) {
      const A = lane[i - 1]!;
      const B = lane[i]!;
      if (A < 0 || B < 0 || Math.abs(A - B) !== 1 || fr[i - 1] !== fr[i]! - 1) continue;
      const q = nearestBehind(fr[i]!, B, x[i]!, kc);
      if (q >= 0) {
        const ke = ix.track[q]!;
        const gap = x[i]! - half - (ix.x[q]! + tracks[ke]!.length / 2);
        if (gap <= o.cutInMaxGap) out[ke]!.push({ kind: "cut-in", frame: ix.sample[q]!, t: tracks[ke]!.t[ix.sample[q]!]!, other: tracks[kc]!.id, gap });
      }
      const r = nearestBehind(fr[i - 1]!, A, x[i - 1]!, kc);
      if (r >= 0) {
        const ke = ix.track[r]!;
        const gap = x[i - 1]! - half - (ix.x[r]! + tracks[ke]!.length / 2);
        let j = ix.sample[r]!;
        if (j + 1 < ix.frameOf[ke]!.length && ix.frameOf[ke]![j + 1] === fr[i]) j++;
        if (gap <= o.cutOutMaxGap) out[ke]!.push({ kind: "cut-out", frame: j, t: tracks[ke]!.t[j]!, other: tracks[kc]!.id, gap });
      }
    }
  }
  return out;
}

/**
 * Events of one ego: the cut-ins and cut-outs found at the lane changers' crossings, plus
 * - overtaken: a vehicle moves from the alongside or behind slot of a side into that side's ahead
 *   slot while both keep their lanes;
 * - closing-in: closing speed >= closingSpeed and TTC <= closingTtc towards the same leader for at
 *   least closingMinS; the event is placed at the first frame of that episode.
 * The same kind with the same other vehicle is not repeated within refractoryS.
 */
function findEvents(
  recording: Recording,
  man: TrackManeuvers[],
  ix: FrameIndex,
  k: number,
  o: ResolvedSceneOptions,
  s: SlotArrays,
  crossingEvents: SceneEvent[],
): SceneEvent[] {
  const ego = recording.tracks[k]!;
  const lane = man[k]!.lane;
  const vx = man[k]!.motion.vx;
  const frameOf = ix.frameOf[k]!;
  const n = ego.t.length;
  const raw: SceneEvent[] = [...crossingEvents];
  const emit = (kind: SceneEvent["kind"], i: number, other: number, gap: number): void => {
    raw.push({ kind, frame: i, t: ego.t[i]!, other, gap });
  };
  /** Lane of track kn at its sample j − 1 when that sample is the previous frame, else -2. */
  const prevLane = (kn: number, j: number): number =>
    j > 0 && ix.frameOf[kn]![j - 1] === ix.frameOf[kn]![j]! - 1 ? man[kn]!.lane[j - 1]! : -2;
  let closeStart = -1;
  let closeOther = -1;
  let closeDone = false;
  for (let i = 0; i < n; i++) {
    const L = lane[i]!;
    const hasPrev = i > 0 && frameOf[i - 1] === frameOf[i]! - 1;
    const steady = hasPrev && lane[i - 1] === L && L >= 0;
    const p = i * NS;
    if (steady) {
      for (const side of SIDE) {
        const id = s.neighbours[p + side.slots[0]]!;
        if (id < 0) continue;
        if (s.neighbours[p - NS + side.slots[1]] !== id && s.neighbours[p - NS + side.slots[2]] !== id) continue;
        const kn = s.nbTrack[p + side.slots[0]]!;
        const j = s.nbSample[p + side.slots[0]]!;
        if (prevLane(kn, j) !== man[kn]!.lane[j]) continue;
        emit("overtaken", i, id, s.gap[p + side.slots[0]]!);
      }
    }
    const leader = s.neighbours[p + AHEAD]!;
    const closing =
      leader >= 0 && -s.dv[p + AHEAD]! >= o.closingSpeed && s.ttc[i]! <= o.closingTtc && Number.isFinite(vx[i]!);
    if (closing && leader === closeOther && hasPrev) {
      if (!closeDone && ego.t[i]! - ego.t[closeStart]! >= o.closingMinS) {
        emit("closing-in", closeStart, leader, s.gap[closeStart * NS + AHEAD]!);
        closeDone = true;
      }
    } else if (closing) {
      closeStart = i;
      closeOther = leader;
      closeDone = false;
    } else {
      closeOther = -1;
    }
  }
  raw.sort((a, b) => a.frame - b.frame || SCENE_EVENTS.indexOf(a.kind) - SCENE_EVENTS.indexOf(b.kind) || a.other - b.other);
  const last = new Map<string, number>();
  const events: SceneEvent[] = [];
  for (const e of raw) {
    const key = `${e.kind}/${e.other}`;
    const prev = last.get(key);
    if (prev !== undefined && e.t - prev < o.refractoryS) continue;
    last.set(key, e.t);
    events.push(e);
  }
  return events;
}
