import type { IdmParams } from "./idm.js";
import { Series } from "./series.js";

/** Clean per-frame samples of a recorded vehicle. */
export interface VehicleRecord {
  x: Series;
  y: Series;
  v: Series;
  vy: Series;
  a: Series;
  ay: Series;
  lane: Series;
}

export type VehicleKind = "car" | "truck";

/**
 * Mutable state of one simulated vehicle. A plain class with fixed fields keeps the hot loop
 * monomorphic. Times are integer milliseconds on the simulation clock.
 */
export class Vehicle {
  readonly id: number;
  readonly kind: VehicleKind;
  readonly length: number;
  readonly width: number;
  readonly idm: IdmParams;
  /** Centre position along the road (m), speed (m/s), commanded acceleration for the current step (m/s²). */
  x: number;
  v: number;
  a = 0;
  /** IDM acceleration before noise and planted braking (m/s²); the value lane-change decisions use. */
  aIdm = 0;
  /** Lane that holds the vehicle centre (0 = rightmost). */
  lane: number;
  /** Index in the simulator's list of that lane for the current step. */
  listIndex = -1;
  /** Ornstein–Uhlenbeck acceleration fluctuation (m/s²). */
  noise = 0;

  // lateral position
  readonly offset: number;
  readonly weaveAmp: number;
  readonly weaveOmega: number;
  readonly weavePhase: number;
  y = 0;
  vy = 0;
  ay = 0;

  // lane change in progress (lcTo < 0: none); the vehicle occupies both lanes until lcEndMs
  lcFrom = -1;
  lcTo = -1;
  lcStartMs = 0;
  lcCrossMs = 0;
  lcEndMs = 0;
  lcY0 = 0;
  lcY1 = 0;
  crossed = false;
  /** Index into the simulator's lane-change log. */
  lcIndex = -1;
  /** Profile of the lane change in progress (ShapeCode: 0 minimum-jerk, 1 constant speed, 2 half-cosine). */
  lcShape: 0 | 1 | 2 = 0;
  /** Double lane change: lane of the second change (-1 none), its pause (ms) and due time (ms). */
  secondTo = -1;
  secondPauseMs = 0;
  secondAtMs = -1;
  /** Marking ride: side of the lane whose marking is ridden (+1 left, −1 right, 0 none) and its times (ms). */
  rideSide = 0;
  /** Chosen at creation to ride a marking once it has entered a lane. */
  rider = false;
  rideStartMs = 0;
  rideEndMs = 0;
  /** Edge lane change: start one once x reaches this (m); NaN = none. */
  edgeTriggerX = Number.NaN;
  nextDecisionMs = 0;
  noChangeUntilMs = 0;

  // planted events
  brakeUntilMs = -1;
  brakeDecel = 0;
  /** A planted cut-in is invisible to this follower until the crossing (late reaction). */
  hiddenFrom: Vehicle | null = null;
  plantedIndex = -1;

  /** Test hook: hold the initial speed (a leader at constant speed). */
  held = false;
  allowLaneChange = true;

  // recording
  trackId = -1;
  firstFrame = -1;
  rec: VehicleRecord | null = null;

  constructor(init: {
    id: number;
    kind: VehicleKind;
    length: number;
    width: number;
    idm: IdmParams;
    x: number;
    v: number;
    lane: number;
    offset: number;
    weaveAmp: number;
    weaveOmega: number;
    weavePhase: number;
  }) {
    this.id = init.id;
    this.kind = init.kind;
    this.length = init.length;
    this.width = init.width;
    this.idm = init.idm;
    this.x = init.x;
    this.v = init.v;
    this.lane = init.lane;
    this.offset = init.offset;
    this.weaveAmp = init.weaveAmp;
    this.weaveOmega = init.weaveOmega;
    this.weavePhase = init.weavePhase;
  }

  /** Start recording at frame `frame` (allocates the sample buffers on first use). */
  startRecording(trackId: number, frame: number): VehicleRecord {
    this.trackId = trackId;
    this.firstFrame = frame;
    const c = 2048;
    this.rec = { x: new Series(c), y: new Series(c), v: new Series(c), vy: new Series(c), a: new Series(c), ay: new Series(c), lane: new Series(c) };
    return this.rec;
  }

  get changing(): boolean {
    return this.lcTo >= 0;
  }
}
