import { InputError } from "../core/errors.js";

/**
 * Everything that shapes a generated recording. Units: metres, seconds, m/s, m/s², vehicles per hour.
 * Defaults live in DEFAULT_TRAFFIC_OPTIONS; `resolveTrafficOptions` validates a partial set once.
 */
export interface TrafficOptions {
  /** Name written into road.json (fictional). */
  roadName: string;
  /** Recording identifier (used in scenario ids downstream). */
  recordingId: string;

  // --- road -------------------------------------------------------------------------------------
  /** Number of lanes of the straight carriageway. */
  lanes: number;
  /** Lane width (m); 3.75 m is common practice on motorways. */
  laneWidth: number;
  /** Length of the observed (recorded) section, x in [0, length] (m). */
  length: number;
  /** Simulated road before the observed section, so that traffic is steady when it is recorded (m). */
  warmupLength: number;
  /** Simulated road after the observed section, so that vehicles leaving it still have leaders (m). */
  runoutLength: number;
  /** Simulated time before recording starts (s); 0 = automatic (twice the time to drive the whole road at 30 m/s). */
  warmupTime: number;
  /** Posted speed limit written into road.json (m/s); 0 = none. Informational: desired speeds come from the options below. */
  speedLimit: number;

  // --- size and clock --------------------------------------------------------------------------
  /** The run stops once vehicles have driven this many kilometres inside the observed section. */
  vehicleKm: number;
  /** Output frame rate (Hz); the frame interval must be a whole number of milliseconds. */
  frameRate: number;
  /** Integration steps per frame (ballistic update with dt = 1 / (frameRate · substeps)). */
  substeps: number;

  // --- demand ------------------------------------------------------------------------------------
  /** Inflow per lane at the upstream end (veh/h), arrivals as a Poisson process. */
  flowPerLane: number;
  /** Share of trucks in the inflow, 0..1. */
  truckShare: number;
  /** Trucks may use only this many rightmost lanes (lane 0 … truckLanes-1). */
  truckLanes: number;

  // --- desired speeds (normal, truncated by redrawing) -------------------------------------------
  carSpeedMean: number;
  carSpeedSd: number;
  carSpeedMin: number;
  carSpeedMax: number;
  truckSpeedMean: number;
  truckSpeedSd: number;
  truckSpeedMin: number;
  /** Speed-limiter cap of trucks (m/s). */
  truckSpeedMax: number;

  // --- Intelligent Driver Model (Treiber, Hennecke & Helbing 2000) -------------------------------
  /** Desired time gap T (s): per-driver normal with this mean and sd, truncated to [0.8, 2.5]. */
  carTimeGapMean: number;
  carTimeGapSd: number;
  truckTimeGapMean: number;
  truckTimeGapSd: number;
  /** Maximum acceleration a (m/s²). */
  carMaxAccel: number;
  truckMaxAccel: number;
  /** Comfortable deceleration b (m/s²). */
  carComfortDecel: number;
  truckComfortDecel: number;
  /** Minimum standstill gap s0 (m). */
  minGap: number;
  /** Acceleration exponent δ. */
  accelExponent: number;
  /** Physical braking limit applied to every commanded acceleration (m/s², positive). */
  maxDecel: number;
  /** Standard deviation of a slowly varying (Ornstein–Uhlenbeck) acceleration fluctuation added to IDM (m/s²); 0 = none. */
  accelNoiseSd: number;
  /** Correlation time of that fluctuation (s). */
  accelNoiseTau: number;

  // --- MOBIL lane changes (Kesting, Treiber & Helbing 2007) -------------------------------------
  /** Politeness factor p. */
  politeness: number;
  /** Changing threshold Δa_th (m/s²). */
  changeThreshold: number;
  /** Safe braking limit b_safe for the new follower and the changer itself (m/s², positive). */
  safeDecel: number;
  /** European rules: asymmetric criterion with a keep-right bias and no passing on the right. */
  keepRight: boolean;
  /** Keep-right bias Δa_bias (m/s²), used when keepRight is set. */
  keepRightBias: number;
  /** Above this speed a vehicle may not pass a slower vehicle on its left (m/s), when keepRight is set. */
  noPassingRightSpeed: number;
  /** How often each vehicle evaluates a lane change (s). */
  laneChangeCheckInterval: number;
  /** No new lane change decision for this long after one ends (s). */
  laneChangeCooldown: number;
  /** Lane-change duration: log-normal with this mean and sd, redrawn outside [min, max] (s). */
  laneChangeDurationMean: number;
  laneChangeDurationSd: number;
  laneChangeDurationMin: number;
  laneChangeDurationMax: number;

  // --- traffic unlike our defaults (issue 11; all off by default, see VARIETY_DEFAULTS) -----------
  /** Share of lane changes with constant lateral speed (a ramp) instead of the minimum-jerk profile, 0..1. */
  constantSpeedShare: number;
  /** Duration of constant-speed lane changes: log-normal mean and sd (s), redrawn outside [laneChangeDurationMin, Max]. */
  constantSpeedDurationMean: number;
  constantSpeedDurationSd: number;
  /** Share of lane changes with the half-cosine profile (1 − cos πτ)/2, 0..1 (constantSpeedShare + this <= 1). */
  sinusoidalShare: number;
  sinusoidalDurationMean: number;
  sinusoidalDurationSd: number;
  /** Probability that a lane change is followed, after a short pause, by a second one in the same direction, 0..1. */
  doubleLaneChangeShare: number;
  /** Pause between the two changes of a double lane change: uniform in [0, this] (s); while the target lane has no room the second waits up to 3 s more, then is dropped. */
  doubleLaneChangePauseMax: number;
  /** Share of cars that drift onto a lane marking, ride it for a while and drift back, never changing lane, 0..1. */
  markingRiderShare: number;
  /** Share of vehicles that start a lane change shortly before the section's start or end, so that they enter or leave mid-maneuver, 0..1. */
  edgeLaneChangeShare: number;
  /** Lane changes of trucks last this many times longer (>= 1). */
  truckLaneChangeFactor: number;

  // --- lateral position within the lane ----------------------------------------------------------
  /** Per-driver constant offset from the lane centre: normal sd (m), clipped to ±0.4 m. */
  laneOffsetSd: number;
  /** Amplitude of a slow sinusoidal weave around that offset (m); period drawn in [8, 20] s. */
  weaveAmplitude: number;

  // --- planted critical situations (rates per vehicle-km in the observed section) ---------------
  hardBrakingRate: number;
  hardBrakingDecelMin: number;
  hardBrakingDecelMax: number;
  hardBrakingDurationMin: number;
  hardBrakingDurationMax: number;
  tightCutInRate: number;
  /** Target bumper-to-bumper gap at the crossing of a planted cut-in (m). */
  tightCutInGapMin: number;
  tightCutInGapMax: number;

  // --- ground-truth definitions --------------------------------------------------------------------
  /** A lane change counts as a cut-in for the follower in the target lane when the gap at the crossing is at most this (m). */
  cutInMaxGap: number;
  /** Longitudinal label: enter accelerate/decelerate when |a| >= this (m/s²). */
  lonEnterThreshold: number;
  /** Leave accelerate/decelerate when |a| falls below this (m/s²) (hysteresis). */
  lonExitThreshold: number;
  /** Accelerate/decelerate runs shorter than this become keep; shorter keep runs between equal runs are filled (s). */
  lonMinDuration: number;
  /** Longitudinal label: the clean acceleration is averaged over a centred window of this length first (s); 0 = instantaneous values. */
  lonAverageWindow: number;

  // --- output ------------------------------------------------------------------------------------
  /** Gaussian noise added to the written x and y positions only (m); 0 = none. */
  positionNoiseSd: number;
  /** Write vx, vy, ax, ay columns; false leaves them for the reader to derive. */
  writeVelocities: boolean;
}

export const DEFAULT_TRAFFIC_OPTIONS: Readonly<TrafficOptions> = Object.freeze({
  roadName: "Orrowind Motorway",
  recordingId: "synth",
  lanes: 3,
  laneWidth: 3.75,
  length: 1500,
  warmupLength: 1000,
  runoutLength: 300,
  warmupTime: 0,
  speedLimit: 0,
  vehicleKm: 50,
  frameRate: 25,
  substeps: 1,
  flowPerLane: 800,
  truckShare: 0.15,
  truckLanes: 2,
  carSpeedMean: 33,
  carSpeedSd: 3.5,
  carSpeedMin: 22,
  carSpeedMax: 45,
  truckSpeedMean: 24,
  truckSpeedSd: 1,
  truckSpeedMin: 20,
  truckSpeedMax: 25,
  carTimeGapMean: 1.4,
  carTimeGapSd: 0.25,
  truckTimeGapMean: 1.8,
  truckTimeGapSd: 0.2,
  carMaxAccel: 1.4,
  truckMaxAccel: 0.6,
  carComfortDecel: 2,
  truckComfortDecel: 1.5,
  minGap: 2,
  accelExponent: 4,
  maxDecel: 9,
  accelNoiseSd: 0.1,
  accelNoiseTau: 2,
  politeness: 0.3,
  changeThreshold: 0.1,
  safeDecel: 4,
  keepRight: true,
  keepRightBias: 0.3,
  noPassingRightSpeed: 60 / 3.6,
  laneChangeCheckInterval: 0.4,
  laneChangeCooldown: 3,
  laneChangeDurationMean: 5.5,
  laneChangeDurationSd: 2,
  laneChangeDurationMin: 1.5,
  laneChangeDurationMax: 14,
  constantSpeedShare: 0,
  constantSpeedDurationMean: 4.5,
  constantSpeedDurationSd: 1.5,
  sinusoidalShare: 0,
  sinusoidalDurationMean: 5,
  sinusoidalDurationSd: 1.5,
  doubleLaneChangeShare: 0,
  doubleLaneChangePauseMax: 2.4,
  markingRiderShare: 0,
  edgeLaneChangeShare: 0,
  truckLaneChangeFactor: 1,
  laneOffsetSd: 0.15,
  weaveAmplitude: 0.1,
  hardBrakingRate: 0.03,
  hardBrakingDecelMin: 5,
  hardBrakingDecelMax: 8,
  hardBrakingDurationMin: 1,
  hardBrakingDurationMax: 3,
  tightCutInRate: 0.03,
  tightCutInGapMin: 5,
  tightCutInGapMax: 15,
  cutInMaxGap: 50,
  lonEnterThreshold: 0.25,
  lonExitThreshold: 0.15,
  lonMinDuration: 1,
  lonAverageWindow: 1,
  positionNoiseSd: 0,
  writeVelocities: true,
});

type Check = [keyof TrafficOptions, (v: number) => boolean, string];

const gt0 = (v: number): boolean => v > 0;
const ge0 = (v: number): boolean => v >= 0;
const int1 = (v: number): boolean => Number.isInteger(v) && v >= 1;

const NUMERIC_CHECKS: Check[] = [
  ["lanes", (v) => Number.isInteger(v) && v >= 1 && v <= 8, "an integer in [1, 8]"],
  ["laneWidth", (v) => v >= 2 && v <= 6, "in [2, 6] m"],
  ["length", (v) => v >= 100, ">= 100 m"],
  ["warmupLength", (v) => v >= 100, ">= 100 m"],
  ["runoutLength", (v) => v >= 50, ">= 50 m"],
  ["warmupTime", ge0, ">= 0 s (0 = automatic)"],
  ["speedLimit", ge0, ">= 0 m/s (0 = none)"],
  ["vehicleKm", gt0, "> 0"],
  ["frameRate", (v) => v > 0 && v <= 1000 && Number.isInteger(1000 / v), "> 0 with a whole number of milliseconds per frame (e.g. 10, 20, 25, 50)"],
  ["substeps", int1, "an integer >= 1"],
  ["flowPerLane", (v) => v > 0 && v <= 3000, "in (0, 3000] veh/h"],
  ["truckShare", (v) => v >= 0 && v <= 1, "in [0, 1]"],
  ["truckLanes", int1, "an integer >= 1"],
  ["carSpeedMean", gt0, "> 0 m/s"],
  ["carSpeedSd", ge0, ">= 0"],
  ["carSpeedMin", gt0, "> 0 m/s"],
  ["carSpeedMax", gt0, "> 0 m/s"],
  ["truckSpeedMean", gt0, "> 0 m/s"],
  ["truckSpeedSd", ge0, ">= 0"],
  ["truckSpeedMin", gt0, "> 0 m/s"],
  ["truckSpeedMax", gt0, "> 0 m/s"],
  ["carTimeGapMean", (v) => v >= 0.8 && v <= 2.5, "in [0.8, 2.5] s"],
  ["carTimeGapSd", ge0, ">= 0"],
  ["truckTimeGapMean", (v) => v >= 0.8 && v <= 2.5, "in [0.8, 2.5] s"],
  ["truckTimeGapSd", ge0, ">= 0"],
  ["carMaxAccel", gt0, "> 0 m/s²"],
  ["truckMaxAccel", gt0, "> 0 m/s²"],
  ["carComfortDecel", gt0, "> 0 m/s²"],
  ["truckComfortDecel", gt0, "> 0 m/s²"],
  ["minGap", (v) => v >= 0.5, ">= 0.5 m"],
  ["accelExponent", gt0, "> 0"],
  ["maxDecel", (v) => v >= 3, ">= 3 m/s²"],
  ["accelNoiseSd", (v) => v >= 0 && v <= 1, "in [0, 1] m/s²"],
  ["accelNoiseTau", gt0, "> 0 s"],
  ["politeness", (v) => v >= 0 && v <= 2, "in [0, 2]"],
  ["changeThreshold", ge0, ">= 0 m/s²"],
  ["safeDecel", gt0, "> 0 m/s²"],
  ["keepRightBias", ge0, ">= 0 m/s²"],
  ["noPassingRightSpeed", ge0, ">= 0 m/s"],
  ["laneChangeCheckInterval", gt0, "> 0 s"],
  ["laneChangeCooldown", ge0, ">= 0 s"],
  ["laneChangeDurationMean", gt0, "> 0 s"],
  ["laneChangeDurationSd", gt0, "> 0 s"],
  ["laneChangeDurationMin", (v) => v >= 0.5, ">= 0.5 s"],
  ["laneChangeDurationMax", gt0, "> 0 s"],
  ["constantSpeedShare", (v) => v >= 0 && v <= 1, "in [0, 1]"],
  ["constantSpeedDurationMean", gt0, "> 0 s"],
  ["constantSpeedDurationSd", gt0, "> 0 s"],
  ["sinusoidalShare", (v) => v >= 0 && v <= 1, "in [0, 1]"],
  ["sinusoidalDurationMean", gt0, "> 0 s"],
  ["sinusoidalDurationSd", gt0, "> 0 s"],
  ["doubleLaneChangeShare", (v) => v >= 0 && v <= 1, "in [0, 1]"],
  ["doubleLaneChangePauseMax", (v) => v >= 0 && v <= 30, "in [0, 30] s"],
  ["markingRiderShare", (v) => v >= 0 && v <= 1, "in [0, 1]"],
  ["edgeLaneChangeShare", (v) => v >= 0 && v <= 1, "in [0, 1]"],
  ["truckLaneChangeFactor", (v) => v >= 1 && v <= 5, "in [1, 5]"],
  ["laneOffsetSd", (v) => v >= 0 && v <= 0.5, "in [0, 0.5] m"],
  ["weaveAmplitude", (v) => v >= 0 && v <= 0.5, "in [0, 0.5] m"],
  ["hardBrakingRate", (v) => v >= 0 && v <= 1, "in [0, 1] per vehicle-km"],
  ["hardBrakingDecelMin", gt0, "> 0 m/s²"],
  ["hardBrakingDecelMax", gt0, "> 0 m/s²"],
  ["hardBrakingDurationMin", gt0, "> 0 s"],
  ["hardBrakingDurationMax", gt0, "> 0 s"],
  ["tightCutInRate", (v) => v >= 0 && v <= 1, "in [0, 1] per vehicle-km"],
  ["tightCutInGapMin", (v) => v >= 1, ">= 1 m"],
  ["tightCutInGapMax", gt0, "> 0 m"],
  ["cutInMaxGap", gt0, "> 0 m"],
  ["lonEnterThreshold", gt0, "> 0 m/s²"],
  ["lonExitThreshold", ge0, ">= 0 m/s²"],
  ["lonMinDuration", ge0, ">= 0 s"],
  ["lonAverageWindow", (v) => v >= 0 && v <= 10, "in [0, 10] s (0 = instantaneous)"],
  ["positionNoiseSd", (v) => v >= 0 && v <= 5, "in [0, 5] m"],
];

/** Fill defaults and validate once; messages quote the value and what was expected. */
export function resolveTrafficOptions(options: Partial<TrafficOptions> = {}): TrafficOptions {
  for (const key of Object.keys(options)) {
    if (!(key in DEFAULT_TRAFFIC_OPTIONS)) {
      throw new InputError(`unknown traffic option "${key}"; known options: ${Object.keys(DEFAULT_TRAFFIC_OPTIONS).join(", ")}`);
    }
  }
  const o: TrafficOptions = { ...DEFAULT_TRAFFIC_OPTIONS };
  for (const [k, v] of Object.entries(options)) {
    if (v !== undefined) (o as unknown as Record<string, unknown>)[k] = v;
  }
  for (const [key, ok, expected] of NUMERIC_CHECKS) {
    const v = o[key];
    if (typeof v !== "number" || !Number.isFinite(v) || !ok(v)) {
      throw new InputError(`${key}=${String(v)} should be ${expected}`);
    }
  }
  for (const key of ["keepRight", "writeVelocities"] as const) {
    if (typeof o[key] !== "boolean") throw new InputError(`${key}=${String(o[key])} should be true or false`);
  }
  for (const key of ["roadName", "recordingId"] as const) {
    if (typeof o[key] !== "string" || o[key].length === 0) throw new InputError(`${key}=${JSON.stringify(o[key])} should be a non-empty string`);
  }
  const pairs: [keyof TrafficOptions, keyof TrafficOptions][] = [
    ["carSpeedMin", "carSpeedMax"],
    ["truckSpeedMin", "truckSpeedMax"],
    ["laneChangeDurationMin", "laneChangeDurationMax"],
    ["hardBrakingDecelMin", "hardBrakingDecelMax"],
    ["hardBrakingDurationMin", "hardBrakingDurationMax"],
    ["tightCutInGapMin", "tightCutInGapMax"],
    ["lonExitThreshold", "lonEnterThreshold"],
  ];
  for (const [lo, hi] of pairs) {
    if ((o[lo] as number) > (o[hi] as number)) throw new InputError(`${lo}=${String(o[lo])} should be <= ${hi}=${String(o[hi])}`);
  }
  if (o.carSpeedMean < o.carSpeedMin || o.carSpeedMean > o.carSpeedMax)
    throw new InputError(`carSpeedMean=${o.carSpeedMean} should lie in [carSpeedMin=${o.carSpeedMin}, carSpeedMax=${o.carSpeedMax}]`);
  if (o.truckSpeedMean < o.truckSpeedMin || o.truckSpeedMean > o.truckSpeedMax)
    throw new InputError(`truckSpeedMean=${o.truckSpeedMean} should lie in [truckSpeedMin=${o.truckSpeedMin}, truckSpeedMax=${o.truckSpeedMax}]`);
  if (o.laneChangeDurationMean < o.laneChangeDurationMin || o.laneChangeDurationMean > o.laneChangeDurationMax)
    throw new InputError(
      `laneChangeDurationMean=${o.laneChangeDurationMean} should lie in [laneChangeDurationMin=${o.laneChangeDurationMin}, laneChangeDurationMax=${o.laneChangeDurationMax}]`,
    );
  if (o.hardBrakingDecelMax > o.maxDecel)
    throw new InputError(`hardBrakingDecelMax=${o.hardBrakingDecelMax} should be <= maxDecel=${o.maxDecel}`);
  if (o.constantSpeedShare + o.sinusoidalShare > 1)
    throw new InputError(`constantSpeedShare=${o.constantSpeedShare} + sinusoidalShare=${o.sinusoidalShare} should be <= 1`);
  const frameMs = 1000 / o.frameRate;
  if (!Number.isInteger(frameMs / o.substeps))
    throw new InputError(`substeps=${o.substeps} should divide the frame interval of ${frameMs} ms into whole milliseconds`);
  return o;
}

/**
 * The options that make traffic unlike the default generator (issue 11), with their off values.
 * Written to meta.json and the recording checksum only when one differs, so that runs without them
 * (the bundled sample among them) stay byte-identical to those made before the options existed.
 */
export const VARIETY_KEYS = [
  "constantSpeedShare",
  "constantSpeedDurationMean",
  "constantSpeedDurationSd",
  "sinusoidalShare",
  "sinusoidalDurationMean",
  "sinusoidalDurationSd",
  "doubleLaneChangeShare",
  "doubleLaneChangePauseMax",
  "markingRiderShare",
  "edgeLaneChangeShare",
  "truckLaneChangeFactor",
] as const satisfies ReadonlyArray<keyof TrafficOptions>;

/** True when any variety option is switched on (a share above 0 or slower trucks). */
export function varietyActive(o: TrafficOptions): boolean {
  return o.constantSpeedShare > 0 || o.sinusoidalShare > 0 || o.doubleLaneChangeShare > 0 || o.markingRiderShare > 0 || o.edgeLaneChangeShare > 0 || o.truckLaneChangeFactor !== 1;
}

/** The options as recorded in meta.json and checksums: variety options left out while all are off. */
export function recordedOptions(o: TrafficOptions): Partial<TrafficOptions> {
  if (varietyActive(o)) return o;
  const out: Partial<TrafficOptions> = { ...o };
  for (const k of VARIETY_KEYS) delete out[k];
  return out;
}

/**
 * The extended generator of the maneuver benchmark (issue 11): every variety case at a rate that
 * gives each a few hundred instances in a 1,000 vehicle-km run. Half the lane changes are not
 * minimum-jerk (30 % constant speed, 20 % half-cosine), 15 % are followed by a second change in the
 * same direction after a pause of up to 2.4 s, 3 % of cars ride a marking, 15 % of vehicles start a lane
 * change up to 150 m before a section edge, and trucks change lanes 1.6 times slower.
 */
export const VARIETY_TRAFFIC_OPTIONS: Readonly<Partial<TrafficOptions>> = Object.freeze({
  constantSpeedShare: 0.3,
  sinusoidalShare: 0.2,
  doubleLaneChangeShare: 0.15,
  doubleLaneChangePauseMax: 2.4,
  markingRiderShare: 0.03,
  edgeLaneChangeShare: 0.15,
  truckLaneChangeFactor: 1.6,
});
