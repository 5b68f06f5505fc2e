import { renameDeprecated } from "../core/aliases.js";
import { InputError } from "../core/errors.js";

/** Options of {@link detectManeuvers}; every field has a documented default (docs/maneuvers.md). */
export interface ManeuverOptions {
  /**
   * Savitzky–Golay window for positions and speeds (s). Default 2.0: with a cubic fit and 0.1 m
   * position noise at 25 Hz this leaves a speed noise of about 0.05 m/s, below the lateral-speed
   * threshold, while a 3–8 s lane change keeps its shape.
   */
  windowS?: number;
  /** Savitzky–Golay window for the longitudinal acceleration (s). Default 3.0. */
  accelWindowS?: number;
  /** Degree of the Savitzky–Golay polynomials. Default 3. */
  order?: number;
  /**
   * A keep phase turns into accelerate when a >= keepAccel, into decelerate when a <= −keepAccel
   * (m/s²). Default 0.25 (common practice: |a| below about 0.2–0.3 m/s² counts as keeping speed).
   */
  keepAccel?: number;
  /**
   * Hysteresis (m/s²): an accelerate phase ends only when a < keepAccel − hysteresis, a decelerate
   * phase only when a > −(keepAccel − hysteresis), so that noise around the threshold does not make
   * the label flicker. Default 0.1.
   */
  hysteresis?: number;
  /**
   * Minimum duration of a longitudinal phase (s): shorter accelerate/decelerate phases become keep,
   * then shorter keep phases between two phases of the same kind take that kind. Default 1.0.
   */
  minLongitudinalS?: number;
  /** Braking harder than this is flagged "harsh-braking" (m/s², positive). Default 3.0 (common practice); the same name as the scene's and the plan's. */
  decelAbove?: number;
  /** @deprecated use decelAbove (accepted for one version). */
  harshDecel?: number;
  /**
   * A lane change starts and ends where the lateral speed towards the new lane falls back below this
   * (m/s), on either side of the crossing. Default 0.1.
   */
  lateralSpeed?: number;
  /**
   * How the start and end of a lane change are placed. "threshold": where the lateral speed towards
   * the new lane falls below `lateralSpeed`. "auto" (default): those threshold boundaries seed
   * least-squares fits of three lateral profiles (minimum-jerk, constant lateral speed, sinusoidal;
   * src/maneuvers/laneChangeShapes.ts) to the positions; the plausible fit with the smallest residual
   * gives the onset and settling times. "profile": the minimum-jerk fit only (the behaviour before
   * issue 11; it stretches a constant-speed ramp of duration T by about 0.44·T on each side). When
   * no fit is plausible the threshold boundaries are kept; `laneChange.boundaryMethod` says which.
   */
  boundary?: "auto" | "profile" | "threshold";
  /**
   * Which marking crossings count. "lasting" (default): an episode in the new lane must take the
   * centre at least `minExcursion` past the marking, and when the vehicle comes back across the same
   * marking it must have stayed `minDwellS`; an episode cut by the run's start or end with less
   * excursion counts only when the vehicle moves across at `minCrossingSpeed` or more on average over it. "touch": only
   * the `minLaneHoldS` rule (the behaviour before issue 11: a vehicle riding on a marking gives a
   * lane change at every flip that outlasts it).
   */
  crossingRule?: "lasting" | "touch";
  /** Lasting crossing: minimum distance of the smoothed centre past the crossed marking (m). Default 0.5. */
  minExcursion?: number;
  /** Lasting crossing: minimum stay in the new lane before coming back across the same marking (s). Default 1.0. */
  minDwellS?: number;
  /** Lasting crossing: mean lateral speed across the marking that keeps an episode cut by the run's start or end (m/s). Default 0.2. */
  minCrossingSpeed?: number;
  /** Lane changes shorter than this are flagged or rejected (s). Default 1.0. */
  minLaneChangeS?: number;
  /** Lane changes longer than this are flagged or rejected (s). Default 12. */
  maxLaneChangeS?: number;
  /** What to do with lane changes outside [minLaneChangeS, maxLaneChangeS]. Default "flag". */
  outOfRange?: "flag" | "reject";
  /**
   * Lane episodes shorter than this between two episodes in the same lane are treated as a touch of
   * the marking, not as two lane changes (s). Default 0.6.
   */
  minLaneHoldS?: number;
  /** Degree of the polynomial fitted to the lateral profile of each lane change. Default 5. */
  polyDegree?: number;
  /**
   * Lane-marking offsets (m, right edge first). When given, lanes are assigned from the smoothed y,
   * which removes flicker from position noise; otherwise the track's `lane` column is used.
   */
  laneMarkings?: number[];
  /** A time step above maxGapFactor × the median frame interval splits the track. Default 1.5. */
  maxGapFactor?: number;
  /** Runs shorter than this are too short to judge: labelled keep / lane-keep, with a warning (s). Default 1.0. */
  minJudgeS?: number;
}

type Defaults = Required<Omit<ManeuverOptions, "laneMarkings" | "harshDecel">>;
export type ResolvedManeuverOptions = Defaults & { laneMarkings?: number[] };

export const MANEUVER_DEFAULTS: Readonly<Defaults> = Object.freeze({
  windowS: 2.0,
  accelWindowS: 3.0,
  order: 3,
  keepAccel: 0.25,
  hysteresis: 0.1,
  minLongitudinalS: 1.0,
  decelAbove: 3.0,
  lateralSpeed: 0.1,
  boundary: "auto",
  crossingRule: "lasting",
  minExcursion: 0.5,
  minDwellS: 1.0,
  minCrossingSpeed: 0.2,
  minLaneChangeS: 1.0,
  maxLaneChangeS: 12,
  outOfRange: "flag",
  minLaneHoldS: 0.6,
  polyDegree: 5,
  maxGapFactor: 1.5,
  minJudgeS: 1.0,
});

/** Defaults resolved and every option validated once, at the boundary. */
export function resolveManeuverOptions(options: ManeuverOptions = {}): ResolvedManeuverOptions {
  const o: ResolvedManeuverOptions = { ...MANEUVER_DEFAULTS };
  for (const [k, v] of Object.entries(renameDeprecated(options, { harshDecel: "decelAbove" }, "maneuver options"))) if (v !== undefined) (o as unknown as Record<string, unknown>)[k] = v;
  const positive = (name: keyof Defaults): void => {
    const v = o[name] as number;
    if (typeof v !== "number" || !(v > 0) || !Number.isFinite(v))
      throw new InputError(`${name}=${String(v)} should be a finite number > 0`);
  };
  for (const k of ["windowS", "accelWindowS", "keepAccel", "minLongitudinalS", "decelAbove", "lateralSpeed", "minLaneChangeS", "maxLaneChangeS", "minLaneHoldS", "minJudgeS", "minExcursion", "minDwellS", "minCrossingSpeed"] as const)
    positive(k);
  if (!(o.hysteresis >= 0 && o.hysteresis <= o.keepAccel))
    throw new InputError(`hysteresis=${o.hysteresis} should be >= 0 and <= keepAccel=${o.keepAccel}`);
  if (!(o.maxLaneChangeS > o.minLaneChangeS))
    throw new InputError(`maxLaneChangeS=${o.maxLaneChangeS} should be > minLaneChangeS=${o.minLaneChangeS}`);
  if (!Number.isInteger(o.order) || o.order < 2 || o.order > 6) throw new InputError(`order=${o.order} should be an integer between 2 and 6`);
  if (!Number.isInteger(o.polyDegree) || o.polyDegree < 1 || o.polyDegree > 7)
    throw new InputError(`polyDegree=${o.polyDegree} should be an integer between 1 and 7`);
  if (o.boundary !== "auto" && o.boundary !== "profile" && o.boundary !== "threshold")
    throw new InputError(`boundary=${JSON.stringify(o.boundary)} should be "auto", "profile" or "threshold"`);
  if (o.crossingRule !== "lasting" && o.crossingRule !== "touch")
    throw new InputError(`crossingRule=${JSON.stringify(o.crossingRule)} should be "lasting" or "touch"`);
  if (o.outOfRange !== "flag" && o.outOfRange !== "reject")
    throw new InputError(`outOfRange=${JSON.stringify(o.outOfRange)} should be "flag" or "reject"`);
  if (!(o.maxGapFactor >= 1)) throw new InputError(`maxGapFactor=${o.maxGapFactor} should be a number >= 1`);
  return o;
}
