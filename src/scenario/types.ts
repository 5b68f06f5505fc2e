import type { ObjectKind } from "../recording/types.js";
import type { LateralManeuver, LongitudinalManeuver } from "../maneuvers/labels.js";
import type { SceneEventKind } from "../scene/slots.js";
import type { ScenarioClassId } from "../logical/classes.js";

/** Criticality of a scenario: extremes over its window. */
export interface ScenarioCriticality {
  /** Minimum time-to-collision with the leader while closing (s); Infinity when never closing. */
  minTtc: number;
  /** Minimum time headway to the leader (s); Infinity when there is no leader. */
  minThw: number;
  /** Maximum deceleration rate to avoid a crash (m/s², positive); 0 when never closing. */
  maxDrac: number;
  /** Ego's peak deceleration (m/s², positive). */
  maxDecel: number;
  /** Which thresholds were crossed, e.g. "ttc", "thw", "harsh-braking". Empty when none. */
  flags: string[];
}

/** One event between the ego and a neighbour inside the window. */
export interface ScenarioEvent {
  kind: SceneEventKind;
  /** Time of the event on the recording clock (s). */
  t: number;
  /** Track id of the other vehicle. */
  other: number;
}

/**
 * A scenario: one window of one ego drive. Windows tile every drive without gaps or overlap, so the
 * kilometres and seconds of all scenarios add up to the recorded vehicle-kilometres and hours.
 */
export interface Scenario {
  /** Position in the catalogue (0-based). */
  index: number;
  /** Stable identifier "<recording>/<egoTrack>/<window>". */
  id: string;
  recording: string;
  egoTrack: number;
  egoKind: ObjectKind;
  /** Ordinal of this window within the ego drive (0-based). */
  window: number;
  /** Sample indices into the ego track, [startFrame, endFrame]; the next window starts at endFrame. */
  startFrame: number;
  endFrame: number;
  /** Start and end time on the recording clock (s). */
  tStart: number;
  tEnd: number;
  /** Duration (s) and distance travelled (km) by the ego in the window. */
  seconds: number;
  km: number;
  /** Mean ego speed (m/s). */
  meanSpeed: number;
  /** Ego lane at the start and at the end of the window (0 = rightmost). */
  laneStart: number;
  laneEnd: number;
  /** Ego basic maneuvers in order of occurrence, consecutive repeats collapsed. */
  lateral: LateralManeuver[];
  longitudinal: LongitudinalManeuver[];
  /** Share of the window's time each neighbour slot is occupied, in SLOTS order. */
  slotOccupancy: number[];
  events: ScenarioEvent[];
  criticality: ScenarioCriticality;
  /** Ego motion summary over the window (filled by buildScenarios; the embedding reads it). */
  stats?: ScenarioStats;
  /**
   * True when the window is shorter than the nominal length (fixed mode) or minS (event mode)
   * because the drive ended or was interrupted by a time gap.
   */
  partial?: boolean;
  /** Functional class (filled by measureScenarioParameters, src/logical/). */
  scenarioClass?: ScenarioClassId;
  /** The class's parameters in SI units; null = not measurable in this window (never NaN). */
  parameters?: Record<string, number | null>;
  /** Who and when behind the window's criticality extremes, for counting critical events once. */
  criticalContext?: CriticalContext;
}

/** One critical episode as the ego saw it: the other vehicle and the time span around the extreme. */
export interface CriticalEpisode {
  /** Track id of the other vehicle of the pair; -1 when there is none. */
  other: number;
  /** Span of consecutive flagged samples around the extreme (s, recording clock), and the extreme's time. */
  tFrom: number;
  tTo: number;
  tPeak: number;
  /** True when the ego is the one behind in the pair (the other is its leader). */
  egoFollows?: boolean;
}

export interface CriticalContext {
  /** Seconds the ego track is observed in total. */
  trackSeconds: number;
  /** Episode behind the minimum TTC (or minimum THW): the pair is ego and its leader. */
  leader: CriticalEpisode | null;
  /** Episode behind the peak ego deceleration: the pair is ego and its leader when it was following closely, else ego and its follower. */
  braking: CriticalEpisode | null;
  /** The first cut-in of the window: the pair is the ego and the cutting vehicle. */
  cutIn?: CriticalEpisode | null;
  /** Peak absolute acceleration of the ego and of its leader over the window (m/s², smoothed), for the physical-bound check. */
  maxAbsAccel: number;
  leaderMaxAbsAccel: number;
}

/** Ego motion summary of one scenario window. Speeds in m/s, accelerations in m/s². */
export interface ScenarioStats {
  speedStart: number;
  speedEnd: number;
  speedMin: number;
  speedMax: number;
  /** Standard deviation of the ego speed over the window's samples. */
  speedSd: number;
  /** Peak acceleration (positive) and peak lateral speed (absolute). */
  maxAccel: number;
  maxLateralSpeed: number;
  /** Share of the window's samples labelled accelerate, decelerate, and lane change (either side). */
  shareAccelerate: number;
  shareDecelerate: number;
  shareLaneChange: number;
  /** Lane-change crossings of the ego inside the window, to the left and to the right. */
  laneChangesLeft: number;
  laneChangesRight: number;
}

/** Shape of the fixed scenario tensor. */
export interface TensorShape {
  steps: number;
  actors: number;
  channels: number;
}

/** All scenarios of a catalogue with their tensors packed in one array. */
export interface ScenarioSet {
  scenarios: Scenario[];
  /** n × steps × actors × channels, row-major, float32. */
  tensors: Float32Array;
  shape: TensorShape;
  /** Actor order (ego first, then SLOTS) and channel names, for labelling. */
  actorNames: string[];
  channelNames: string[];
  /** Unit of each channel, aligned with channelNames. */
  channelUnits?: string[];
  /** The options the set was built with (resolved), for provenance. */
  options?: Record<string, unknown>;
  warnings: string[];
}
