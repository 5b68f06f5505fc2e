import type { SceneEventKind } from "./slots.js";

/** One event between an ego and another vehicle. */
export interface SceneEvent {
  kind: SceneEventKind;
  /** Ego sample index and time (s) of the event. */
  frame: number;
  t: number;
  /** Track id of the other vehicle. */
  other: number;
  /** Bumper-to-bumper gap to the other vehicle at the event (m; NaN when not defined). */
  gap: number;
}

/** Frame flags (bit masks of EgoScene.flags). */
export const FLAG_TTC = 1;
export const FLAG_THW = 2;
export const FLAG_HARSH_BRAKING = 4;

/**
 * The neighbourhood of one ego over its samples. Per-slot arrays are slot-major per sample:
 * index = sample * 8 + slot, slots in SLOTS order. Empty slots hold id -1 and NaN values.
 */
export interface EgoScene {
  trackId: number;
  /** Index of the ego track in recording.tracks. */
  trackIndex: number;
  /** Number of samples of the ego track. */
  samples: number;
  /** Track id of the nearest vehicle in each slot, -1 when empty. */
  neighbours: Int32Array;
  /** Index in recording.tracks and sample index of that vehicle, -1 when empty. */
  neighbourTrack: Int32Array;
  neighbourSample: Int32Array;
  /**
   * Bumper-to-bumper distance along x (m): for ahead slots from ego front to neighbour rear, for
   * behind slots from neighbour front to ego rear (>= 0); for alongside slots the negative overlap.
   */
  gap: Float32Array;
  /** Centre-to-centre offset along x, neighbour − ego (m). */
  dx: Float32Array;
  /** Lateral offset, neighbour − ego (m, positive to the left). */
  dy: Float32Array;
  /** Relative longitudinal speed, neighbour − ego (m/s). */
  dv: Float32Array;
  /** Criticality towards the same-lane leader per sample: TTC (s, Infinity when not closing), THW (s, Infinity without leader), DRAC (m/s², 0 when not closing). */
  ttc: Float64Array;
  thw: Float64Array;
  drac: Float64Array;
  /** Bit mask per sample: FLAG_TTC | FLAG_THW | FLAG_HARSH_BRAKING. */
  flags: Uint8Array;
  /** Events in time order. */
  events: SceneEvent[];
}
