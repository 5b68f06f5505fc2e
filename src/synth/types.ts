/**
 * Ground truth written by the traffic generator beside each recording. It is the yardstick for the
 * maneuver and event detection (see DEVELOPERS.md, "Ground truth definitions").
 */

/** A lane change as executed by the generator. Times in seconds on the recording clock. */
export interface TruthLaneChange {
  trackId: number;
  direction: "left" | "right";
  /** Start and end of the lateral movement; tCross is when the vehicle centre crosses the marking. */
  tStart: number;
  tCross: number;
  tEnd: number;
  fromLane: number;
  toLane: number;
  /**
   * True when only part of [tStart, tEnd] lies inside the track's recorded span (the vehicle entered
   * or left the observed section, or the recording started or ended, during the movement).
   */
  partial?: boolean;
  /** Lateral profile; written only when the generator's variety options (issue 11) are on. */
  profile?: "minimum-jerk" | "constant-speed" | "sinusoidal";
  /**
   * Variety case (issue 11): first or second change of a double lane change, or a change started
   * just before the section's edge so that the vehicle enters or leaves mid-maneuver.
   */
  case?: "double-first" | "double-second" | "edge";
}

/**
 * A cut-in: another vehicle's lane change whose crossing puts it ahead of the ego in the ego's lane
 * with a bumper-to-bumper gap no larger than the generator's cutInMaxGap (m).
 */
export interface TruthCutIn {
  egoTrack: number;
  cutterTrack: number;
  /** Crossing time of the cutter (s). */
  t: number;
  /** Bumper-to-bumper gap from ego front to cutter rear at the crossing (m). */
  gap: number;
}

/** A critical situation the generator planted on purpose. */
export interface PlantedEvent {
  kind: "hard-braking" | "tight-cut-in";
  /** The vehicle that brakes hard, or that cuts in. */
  trackId: number;
  /** The vehicle directly affected (the follower), when there is one. */
  affectedTrack?: number;
  tStart: number;
  tEnd: number;
  /** Deceleration for hard braking (m/s², positive), gap at the crossing for tight cut-ins (m). */
  magnitude: number;
}

/** Per-frame labels of one track, aligned with the track's samples. */
export interface TrackTruth {
  trackId: number;
  /** Codes from LONGITUDINAL. */
  longitudinal: Int8Array;
  /** Codes from LATERAL. */
  lateral: Int8Array;
}

export interface GroundTruth {
  tracks: TrackTruth[];
  laneChanges: TruthLaneChange[];
  cutIns: TruthCutIn[];
  planted: PlantedEvent[];
  /** The parameters of the label definitions (thresholds, cutInMaxGap …) so that a detector can be judged fairly. */
  definitions: Record<string, number>;
  /**
   * Tracks of vehicles that drift onto a lane marking, ride it and drift back without changing lane
   * (variety option markingRiderShare; absent when off). Any lane change detected on them is false.
   */
  markingRiders?: number[];
}
