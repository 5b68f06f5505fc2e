import { detectAllManeuvers } from "../maneuvers/detectAllManeuvers.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import type { Recording } from "../recording/types.js";
import { buildScenes } from "../scene/buildScenes.js";
import type { EgoScene } from "../scene/types.js";

/** What roadsieve's chain measures for one ego, frame by frame, over a window. */
export interface EgoSeries {
  /** Frame numbers on the recording clock (round(t · frameRate)). */
  frame: Int32Array;
  /** Smoothed longitudinal speed (m/s), lateral position from the right road edge (m). */
  speed: Float64Array;
  lateral: Float64Array;
  /** Same-lane leader's track id (-1 none), bumper-to-bumper gap (m, NaN none), THW (s, Infinity none). */
  leader: Int32Array;
  gap: Float64Array;
  thw: Float64Array;
}

/** The chain's view of a recording: maneuvers (smoothed motion) and scenes, aligned with its tracks. */
export interface ChainView {
  recording: Recording;
  maneuvers: TrackManeuvers[];
  scenes: EgoScene[];
}

/** Run maneuver detection and scene building on a recording (the same stages the pipeline runs). */
export function chainView(recording: Recording): ChainView {
  const maneuvers = detectAllManeuvers(recording);
  return { recording, maneuvers, scenes: buildScenes(recording, maneuvers) };
}

/** The ego's series over [tStart, tEnd] (inclusive, on the recording clock); null when the track is absent. */
export function egoSeries(view: ChainView, egoTrack: number, tStart: number, tEnd: number): EgoSeries | null {
  const k = view.recording.tracks.findIndex((t) => t.id === egoTrack);
  if (k < 0) return null;
  const tr = view.recording.tracks[k]!;
  const m = view.maneuvers[k]!;
  const sc = view.scenes[k]!;
  const fr = view.recording.road.frameRate;
  const edge = view.recording.road.laneMarkings[0]!;
  const idx: number[] = [];
  for (let i = 0; i < tr.t.length; i++) if (tr.t[i]! >= tStart - 0.5 / fr && tr.t[i]! <= tEnd + 0.5 / fr) idx.push(i);
  const n = idx.length;
  const out: EgoSeries = { frame: new Int32Array(n), speed: new Float64Array(n), lateral: new Float64Array(n), leader: new Int32Array(n), gap: new Float64Array(n), thw: new Float64Array(n) };
  idx.forEach((i, j) => {
    out.frame[j] = Math.round(tr.t[i]! * fr);
    out.speed[j] = m.motion.vx[i]!;
    out.lateral[j] = m.motion.y[i]! - edge;
    out.leader[j] = sc.neighbours[i * 8]!;
    out.gap[j] = sc.gap[i * 8]!;
    out.thw[j] = sc.thw[i]!;
  });
  return out;
}
