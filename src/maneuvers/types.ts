import type { LateralManeuver, LongitudinalManeuver } from "./labels.js";
import type { LaneChangeProfile } from "./laneChangeShapes.js";

/** How a lane change's start and end were placed: a fitted profile shape, or the lateral-speed threshold. */
export type LaneChangeBoundaryMethod = LaneChangeProfile | "threshold";

/** Shape of one lane change's lateral movement. */
export interface LaneChangeShape {
  fromLane: number;
  toLane: number;
  /** Sample index and time (s) where the vehicle centre crosses the marking. */
  crossFrame: number;
  tCross: number;
  /** Lateral displacement end − start of the smoothed y (m; positive to the left). */
  displacement: number;
  /** Peak lateral speed towards the new lane (m/s, positive). */
  peakLateralSpeed: number;
  /**
   * Coefficients c0..cd of the least-squares polynomial y(τ) − y(start) = Σ c_k τ^k with
   * τ = (t − tStart) / duration in [0, 1] (m).
   */
  poly: number[];
  /** Root-mean-square residual of that fit (m). */
  polyResidual: number;
  /** Which profile shape (or the threshold) placed start and end (docs/maneuvers.md, "Boundaries"). */
  boundaryMethod: LaneChangeBoundaryMethod;
  /**
   * The movement is cut by the start or end of the observed run: the crossing was observed, start or
   * end are where the observation stops (the segment also carries the flag "partial").
   */
  partial: boolean;
}

/** One basic maneuver of one track: a contiguous run of samples with the same label. */
export interface ManeuverSegment {
  axis: "longitudinal" | "lateral";
  maneuver: LongitudinalManeuver | LateralManeuver;
  /** First and last sample index (inclusive) in the track. */
  startFrame: number;
  endFrame: number;
  tStart: number;
  tEnd: number;
  /** tEnd − tStart (s). */
  duration: number;
  /** Smoothed longitudinal speed at the first and last sample (m/s). */
  startSpeed: number;
  endSpeed: number;
  /** Mean and peak (largest |a|, signed) longitudinal acceleration over the segment (m/s²). */
  meanAccel: number;
  peakAccel: number;
  /** Lane-change geometry; only for lane-change-left / lane-change-right. */
  laneChange?: LaneChangeShape;
  /**
   * Remarks: "too-short" / "too-long" (lane change outside the duration bounds), "harsh-braking",
   * "at-track-start" / "at-track-end" (the segment touches the end of the observed run, so its true
   * extent is unknown), "partial" (a lane change cut by the start or end of the run; its duration is
   * not judged).
   */
  flags: string[];
}

/** Smoothed motion used by the detector (and reused by scene/): one value per sample. */
export interface SmoothedMotion {
  x: Float64Array;
  y: Float64Array;
  vx: Float64Array;
  vy: Float64Array;
  ax: Float64Array;
}

/** The basic maneuvers of one track. */
export interface TrackManeuvers {
  trackId: number;
  /** Per-sample codes of LONGITUDINAL / LATERAL (src/maneuvers/labels.ts). */
  longitudinal: Int8Array;
  lateral: Int8Array;
  /** Lane per sample after smoothing and removal of marking touches (-1 outside all lanes). */
  lane: Int32Array;
  motion: SmoothedMotion;
  /** Longitudinal and lateral segments, each axis tiling the judged samples, sorted by start. */
  segments: ManeuverSegment[];
  warnings: string[];
}
