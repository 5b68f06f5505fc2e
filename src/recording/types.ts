/**
 * The data model at the recording boundary. Everything downstream works in the road frame:
 * x along the carriageway in the driving direction (m), y to the left of it (m).
 */

import type { RecordingConditions } from "./conditions.js";

/** Description of the recorded road section. */
export interface Road {
  /** Free-form name of the section (fictional for our demo data). */
  name: string;
  /**
   * Lateral positions of the lane markings in the road frame (m), strictly ascending: the right edge
   * line first, the left edge line last. N lanes have N + 1 markings. Lane 0 is the rightmost lane;
   * a lane change to the left raises the lane index by one.
   */
  laneMarkings: number[];
  /** Frame rate of the recording (Hz). */
  frameRate: number;
  /** Posted speed limit (m/s), when known. */
  speedLimit?: number;
  /** Observed stretch along x, [start, end] (m), when known. */
  xRange?: [number, number];
  /**
   * Driving direction in the file's coordinates. "-x" (traffic moves towards smaller x, e.g. one
   * carriageway of an aerial image) makes the reader rotate everything by 180° into the road frame
   * (x' = -x, y' = -y, markings mirrored). Default "+x". A Road inside a Recording is always in the
   * road frame, i.e. "+x".
   */
  direction?: "+x" | "-x";
  /**
   * Conditions of the recording (site, road type, traffic density, time of day, weather, lighting,
   * recording method), when stated; see docs/recording.md. Carried into the recording summary, the
   * plan's provenance and the catalogue, so that shares can be broken down by them.
   */
  conditions?: RecordingConditions;
}

/** Object classes the tools know; anything else is kept as "other". */
export type ObjectKind = "car" | "truck" | "motorcycle" | "other";

/** One object's trajectory, columnar, in the road frame, sorted by time with no duplicate times. */
export interface Track {
  /** Track identifier as in the recording. */
  id: number;
  /** Identifier of the recording this track comes from. */
  recording: string;
  kind: ObjectKind;
  /** Vehicle length and width (m). */
  length: number;
  width: number;
  /** Time (s) of each sample. */
  t: Float64Array;
  /** Position of the vehicle's centre (m). */
  x: Float64Array;
  y: Float64Array;
  /** Velocity and acceleration in the road frame (m/s, m/s²); derived when the file has none. */
  vx: Float64Array;
  vy: Float64Array;
  ax: Float64Array;
  ay: Float64Array;
  /** Lane index per sample (0 = rightmost), -1 when outside all lanes. */
  lane: Int32Array;
}

/** A track that failed validation, kept with its reason so nothing is dropped silently. */
export interface RejectedTrack {
  trackId: number | string;
  reason: string;
  /** 1-based data row of the first offending sample, when there is one. */
  row?: number;
  rows: number;
}

/** A recording read and validated: tracks in the road frame plus provenance. */
export interface Recording {
  /** Short identifier used in scenario ids and test cases. */
  id: string;
  /** Path of the tracks file (or "generated" for in-memory synthetic data). */
  source: string;
  /** SHA-256 of the tracks file's bytes (or of the generator's options). */
  checksum: string;
  road: Road;
  tracks: Track[];
  rejected: RejectedTrack[];
  warnings: string[];
}
