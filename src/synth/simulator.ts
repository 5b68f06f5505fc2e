import type { Rng } from "../core/rng.js";
import { idmAcceleration, idmFreeAcceleration, type IdmParams } from "./idm.js";
import { quinticCurvature, quinticShape, quinticSlope, sampleLaneChangeDuration, shapeCurvature, shapeInverse, shapeSlope, shapeValue, type ShapeCode } from "./lateral.js";
import { mobilIncentive, mobilIsSafe, type MobilAccelerations, type MobilParams } from "./mobil.js";
import { varietyActive, type TrafficOptions } from "./options.js";
import { Vehicle, type VehicleKind } from "./vehicle.js";

/** A lane change as executed, on the simulation clock (ms). */
export interface LaneChangeLog {
  vehicle: Vehicle;
  from: number;
  to: number;
  startMs: number;
  crossMs: number;
  endMs: number;
  /** Lateral profile (ShapeCode). */
  shape: ShapeCode;
  /** Set for the variety cases of issue 11. */
  tag?: "double-first" | "double-second" | "edge";
}

/** A lane change whose crossing put the changer within cutInMaxGap ahead of the follower in the target lane. */
export interface CutInLog {
  ego: Vehicle;
  cutter: Vehicle;
  tMs: number;
  gap: number;
}

export interface PlantedLog {
  kind: "hard-braking" | "tight-cut-in";
  vehicle: Vehicle;
  affected: Vehicle | null;
  startMs: number;
  endMs: number;
  magnitude: number;
}

/** Where the simulated road starts and ends, and what is recorded. */
export interface SimulatorSetup {
  /** Upstream end where the inflow enters (m). */
  xEntry: number;
  /** Downstream end where vehicles leave (m). */
  xExit: number;
  /** Generate arrivals at xEntry. */
  inflow: boolean;
  /** Record vehicles whose centre lies in [start, end] (m) on frame steps; null = record nothing. */
  recordRange: [number, number] | null;
}

/** Initial state for a vehicle placed by hand (tests, scripted scenes). */
export interface PlacedVehicle {
  kind?: VehicleKind;
  x: number;
  v: number;
  lane: number;
  idm: IdmParams;
  length?: number;
  width?: number;
  /** Keep the initial speed forever (a leader held at constant speed). */
  held?: boolean;
  allowLaneChange?: boolean;
}

const TWO_PI = 2 * Math.PI;

function truncNormal(rng: Rng, mean: number, sd: number, lo: number, hi: number): number {
  if (sd === 0) return Math.min(hi, Math.max(lo, mean));
  for (let i = 0; i < 100; i++) {
    const v = rng.normal(mean, sd);
    if (v >= lo && v <= hi) return v;
  }
  return Math.min(hi, Math.max(lo, mean));
}

/** First index in `list` (sorted by x ascending) whose x is greater than `x`. */
function upperBound(list: Vehicle[], x: number): number {
  let lo = 0;
  let hi = list.length;
  while (lo < hi) {
    const mid = (lo + hi) >> 1;
    if (list[mid]!.x > x) hi = mid;
    else lo = mid + 1;
  }
  return lo;
}

function gapBetween(follower: Vehicle, leader: Vehicle): number {
  return leader.x - follower.x - 0.5 * (leader.length + follower.length);
}

/**
 * Microscopic simulation of a straight multi-lane carriageway: IDM car-following, MOBIL lane-change
 * decisions, minimum-jerk lateral movement, ballistic integration with a fixed step. A vehicle that is
 * changing lanes occupies both lanes (followers in both react to it, and it follows the nearer
 * constraint of the leaders in both), which is common practice for collision-free lane changes.
 * Every random draw comes from named forks of the seed, so the stream of one concern (inflow, driver
 * parameters, lane changes, accelerations, planted events) does not shift when another changes.
 */
export class Simulator {
  readonly o: TrafficOptions;
  readonly setup: SimulatorSetup;
  readonly dtMs: number;
  readonly dt: number;
  readonly frameMs: number;
  /** Simulation clock (ms) of the state held now. */
  tMs = 0;
  /** All vehicles on the road, sorted by x ascending after each step's sort. */
  vehicles: Vehicle[] = [];
  /** Vehicles that were recorded, in track id order. */
  readonly recorded: Vehicle[] = [];
  readonly laneChanges: LaneChangeLog[] = [];
  readonly cutIns: CutInLog[] = [];
  readonly planted: PlantedLog[] = [];
  readonly warnings: string[] = [];
  /** Metres driven inside the recorded range, summed over vehicles (clean speeds). */
  observedMeters = 0;
  /** Frames recorded so far. */
  frames = 0;
  /** Longest entry queue seen (vehicles waiting for a gap at xEntry). */
  maxQueue = 0;

  private readonly lanes: Vehicle[][];
  private nextId = 1;
  private nextTrack = 1;
  private readonly rngInflow: Rng;
  private readonly rngDriver: Rng;
  private readonly rngLc: Rng;
  private readonly rngAccel: Rng;
  private readonly rngPlant: Rng;
  /** Draws of the variety options (issue 11); unused, and the other streams untouched, while they are off. */
  private readonly rngVar: Rng;
  private readonly variety: boolean;
  private nextArrivalMs = 0;
  private readonly queue: Vehicle[] = [];
  private nextBrakeKm: number;
  private nextCutInKm: number;
  private pendingBrakes = 0;
  private pendingCutIns = 0;
  private readonly mobil: MobilParams;
  private readonly noisePhi: number;
  private readonly noiseStep: number;
  private readonly checkSteps: number;

  constructor(options: TrafficOptions, rng: Rng, setup: SimulatorSetup) {
    this.o = options;
    this.setup = setup;
    this.frameMs = 1000 / options.frameRate;
    this.dtMs = this.frameMs / options.substeps;
    this.dt = this.dtMs / 1000;
    this.lanes = Array.from({ length: options.lanes }, () => []);
    this.rngInflow = rng.fork("inflow");
    this.rngDriver = rng.fork("driver");
    this.rngLc = rng.fork("lane-change");
    this.rngAccel = rng.fork("acceleration");
    this.rngPlant = rng.fork("planted");
    this.rngVar = rng.fork("variety");
    this.variety = varietyActive(options);
    this.mobil = {
      politeness: options.politeness,
      threshold: options.changeThreshold,
      safeDecel: options.safeDecel,
      keepRight: options.keepRight,
      bias: options.keepRightBias,
    };
    // Exact discretisation of an Ornstein–Uhlenbeck process with stationary sd accelNoiseSd.
    this.noisePhi = Math.exp(-this.dt / options.accelNoiseTau);
    this.noiseStep = options.accelNoiseSd * Math.sqrt(1 - this.noisePhi * this.noisePhi);
    this.checkSteps = Math.max(1, Math.round((options.laneChangeCheckInterval * 1000) / this.dtMs));
    this.nextBrakeKm = options.hardBrakingRate > 0 ? this.rngPlant.exponential(options.hardBrakingRate) : Infinity;
    this.nextCutInKm = options.tightCutInRate > 0 ? this.rngPlant.exponential(options.tightCutInRate) : Infinity;
    if (setup.inflow) this.nextArrivalMs = this.drawHeadwayMs();
  }

  // ---------------------------------------------------------------------------------------------
  // Setup

  /** Place a vehicle by hand (no inflow needed); returns it so that tests can follow its state. */
  addVehicle(p: PlacedVehicle): Vehicle {
    const kind = p.kind ?? "car";
    const u = new Vehicle({
      id: this.nextId++,
      kind,
      length: p.length ?? (kind === "truck" ? 16.5 : 4.5),
      width: p.width ?? (kind === "truck" ? 2.5 : 1.8),
      idm: p.idm,
      x: p.x,
      v: p.v,
      lane: p.lane,
      offset: 0,
      weaveAmp: 0,
      weaveOmega: 0,
      weavePhase: 0,
    });
    u.held = p.held ?? false;
    u.allowLaneChange = p.allowLaneChange ?? true;
    this.updateLateral(u, this.tMs);
    const k = upperBound(this.vehicles, u.x);
    this.vehicles.splice(k, 0, u);
    return u;
  }

  private drawHeadwayMs(): number {
    const ratePerS = (this.o.flowPerLane * this.o.lanes) / 3600;
    return Math.max(1, Math.round(this.rngInflow.exponential(ratePerS) * 1000));
  }

  /** A new driver-vehicle unit with parameters drawn from the options. */
  private createVehicle(): Vehicle {
    const o = this.o;
    const r = this.rngDriver;
    const kind: VehicleKind = this.rngInflow.float() < o.truckShare ? "truck" : "car";
    let length: number, width: number, v0: number, T: number;
    if (kind === "car") {
      // Typical passenger-car dimensions (common practice, from memory).
      length = truncNormal(r, 4.6, 0.35, 3.8, 5.4);
      width = truncNormal(r, 1.85, 0.08, 1.6, 2.05);
      v0 = truncNormal(r, o.carSpeedMean, o.carSpeedSd, o.carSpeedMin, o.carSpeedMax);
      T = truncNormal(r, o.carTimeGapMean, o.carTimeGapSd, 0.8, 2.5);
    } else {
      // 70 % articulated (16.5 m, the EU maximum), 30 % rigid trucks; width 2.55 m EU maximum (from memory).
      length = r.float() < 0.7 ? truncNormal(r, 16.5, 0.3, 15.5, 18.75) : truncNormal(r, 10, 1.2, 7.5, 12);
      width = truncNormal(r, 2.5, 0.03, 2.4, 2.55);
      v0 = truncNormal(r, o.truckSpeedMean, o.truckSpeedSd, o.truckSpeedMin, o.truckSpeedMax);
      T = truncNormal(r, o.truckTimeGapMean, o.truckTimeGapSd, 0.8, 2.5);
    }
    const idm: IdmParams = {
      desiredSpeed: v0,
      timeGap: T,
      minGap: o.minGap,
      maxAccel: kind === "car" ? o.carMaxAccel : o.truckMaxAccel,
      comfortDecel: kind === "car" ? o.carComfortDecel : o.truckComfortDecel,
      exponent: o.accelExponent,
    };
    const offset = truncNormal(r, 0, o.laneOffsetSd, -0.4, 0.4);
    const weaveAmp = Math.min(0.5, o.weaveAmplitude * r.uniform(0.5, 1.5));
    const period = r.uniform(8, 20);
    const u = new Vehicle({
      id: this.nextId++,
      kind,
      length,
      width,
      idm,
      x: this.setup.xEntry,
      v: 0,
      lane: 0,
      offset,
      weaveAmp,
      weaveOmega: TWO_PI / period,
      weavePhase: r.uniform(0, TWO_PI),
    });
    u.noise = o.accelNoiseSd > 0 ? this.rngAccel.normal(0, o.accelNoiseSd) : 0;
    if (this.variety) {
      const rv = this.rngVar;
      if (o.markingRiderShare > 0 && kind === "car" && rv.float() < o.markingRiderShare) {
        u.rider = true;
        u.allowLaneChange = false;
      }
      if (o.edgeLaneChangeShare > 0 && !u.rider && rv.float() < o.edgeLaneChangeShare && this.setup.recordRange) {
        const edge = rv.float() < 0.5 ? this.setup.recordRange[0] : this.setup.recordRange[1];
        // Start up to about one lane change's travel (5 s at 30 m/s) before the edge, so that the
        // section boundary tends to fall inside the movement.
        u.edgeTriggerX = edge - rv.uniform(0, 150);
      }
    }
    return u;
  }

  // ---------------------------------------------------------------------------------------------
  // Stepping

  /** Advance one integration step; on frame steps (`record`) the state at the current time is recorded. */
  step(record: boolean): void {
    const t = this.tMs;
    const o = this.o;
    const crossings: Vehicle[] = [];

    // 1. Lane-change milestones reached at this time.
    for (const u of this.vehicles) {
      if (u.lcTo < 0) continue;
      if (!u.crossed && t >= u.lcCrossMs) {
        u.crossed = true;
        u.lane = u.lcTo;
        crossings.push(u);
      }
      if (t >= u.lcEndMs) {
        u.lcFrom = -1;
        u.lcTo = -1;
        u.hiddenFrom = null;
        u.noChangeUntilMs = Math.max(u.noChangeUntilMs, t + o.laneChangeCooldown * 1000);
        if (u.secondTo >= 0 && u.secondAtMs < 0) u.secondAtMs = t + u.secondPauseMs;
      }
    }

    // 2. Sort by x (insertion sort: the order barely changes between steps) and build lane lists.
    this.sortVehicles();
    this.buildLaneLists();

    // 3. Cut-in bookkeeping at crossings (needs the lists).
    for (const u of crossings) this.onCrossing(u, t);

    // 4. Planted events are placed on frame steps while recording.
    if (record && this.setup.recordRange) this.plantEvents(t);

    // 5. Accelerations.
    this.computeAccelerations(t);

    // 6. Lateral state at time t, then lane-change decisions (a new change starts from that state).
    for (const u of this.vehicles) this.updateLateral(u, t);
    if (this.variety) this.varietyManeuvers(t);
    this.decideLaneChanges(t);

    // 7. Record.
    if (record && this.setup.recordRange) this.recordFrame();

    // 8. Ballistic update (position with the step's constant acceleration; a vehicle that would
    //    reverse stops where its speed reaches zero).
    const dt = this.dt;
    for (const u of this.vehicles) {
      const a = u.a;
      const vNew = u.v + a * dt;
      if (vNew < 0) {
        u.x += (-0.5 * u.v * u.v) / a;
        u.v = 0;
      } else {
        u.x += u.v * dt + 0.5 * a * dt * dt;
        u.v = vNew;
      }
    }

    this.tMs = t + this.dtMs;

    // 9. Inflow and outflow.
    if (this.setup.inflow) this.inflow(this.tMs);
    this.removeExited();
  }

  private sortVehicles(): void {
    const a = this.vehicles;
    for (let i = 1; i < a.length; i++) {
      const u = a[i]!;
      let j = i - 1;
      if (a[j]!.x <= u.x) continue;
      while (j >= 0 && a[j]!.x > u.x) {
        a[j + 1] = a[j]!;
        j--;
      }
      a[j + 1] = u;
    }
  }

  private buildLaneLists(): void {
    for (const list of this.lanes) list.length = 0;
    for (const u of this.vehicles) {
      if (u.lcTo >= 0) {
        const own = this.lanes[u.lane]!;
        u.listIndex = own.length;
        own.push(u);
        const other = u.lane === u.lcFrom ? u.lcTo : u.lcFrom;
        this.lanes[other]!.push(u);
      } else {
        const own = this.lanes[u.lane]!;
        u.listIndex = own.length;
        own.push(u);
      }
    }
  }

  /** The vehicle's index in its centre lane's list (valid after buildLaneLists and splices). */
  private indexOf(u: Vehicle): number {
    return u.listIndex;
  }

  private clampAcc(a: number): number {
    return a < -this.o.maxDecel ? -this.o.maxDecel : a;
  }

  /** IDM acceleration of `u` behind `leader` (free road when null), clamped to the braking limit. */
  private accBehind(u: Vehicle, leader: Vehicle | null): number {
    if (!leader) return idmFreeAcceleration(u.idm, u.v);
    return this.clampAcc(idmAcceleration(u.idm, u.v, gapBetween(u, leader), u.v - leader.v));
  }

  private computeAccelerations(t: number): void {
    const o = this.o;
    for (const u of this.vehicles) u.aIdm = Infinity;
    for (const list of this.lanes) {
      const n = list.length;
      for (let i = 0; i < n; i++) {
        const u = list[i]!;
        let j = i + 1;
        let unaware = false;
        // A planted cut-in stays unseen by its victim until the crossing, unless the bumpers nearly
        // touch or the victim closes in fast (time to collision under 2 s).
        while (j < n) {
          const l = list[j]!;
          if (l.hiddenFrom === u && !l.crossed) {
            const gap = gapBetween(u, l);
            const closing = u.v - l.v;
            if (gap > 2 && !(closing > 0 && gap < 2 * closing)) {
              unaware = true;
              j++;
              continue;
            }
          }
          break;
        }
        let a = this.accBehind(u, j < n ? list[j]! : null);
        // The unaware follower cruises on (does not speed up towards the gap it is about to lose).
        if (unaware && a > 0) a = 0;
        if (a < u.aIdm) u.aIdm = a;
      }
    }
    const phi = this.noisePhi;
    const step = this.noiseStep;
    const rng = this.rngAccel;
    for (const u of this.vehicles) {
      if (u.held) {
        u.a = 0;
        continue;
      }
      let a = u.aIdm;
      if (step > 0) {
        u.noise = u.noise * phi + step * rng.normal();
        a += u.noise;
      }
      if (t < u.brakeUntilMs && a > -u.brakeDecel) a = -u.brakeDecel;
      u.a = a < -o.maxDecel ? -o.maxDecel : a;
    }
  }

  /** Lateral position, speed and acceleration at time t (pure function of the lane-change state). */
  private updateLateral(u: Vehicle, t: number): void {
    if (u.lcTo >= 0) {
      const dMs = u.lcEndMs - u.lcStartMs;
      const tau = (t - u.lcStartMs) / dMs;
      const dy = u.lcY1 - u.lcY0;
      const d = dMs / 1000;
      const k = u.lcShape;
      u.y = u.lcY0 + dy * shapeValue(k, tau);
      u.vy = (dy / d) * shapeSlope(k, tau);
      u.ay = (dy / (d * d)) * shapeCurvature(k, tau);
      return;
    }
    const w = this.o.laneWidth;
    let c = (u.lane + 0.5) * w + u.offset;
    let cv = 0;
    let ca = 0;
    if (u.rideSide !== 0) {
      // Marking ride: a 3 s minimum-jerk drift from the driver's place in the lane onto the marking,
      // the ride, and a 3 s drift back; the lane never changes.
      const T = 3;
      const a = (t - u.rideStartMs) / 1000 / T;
      const b = (t - u.rideEndMs) / 1000 / T;
      const r = quinticShape(a) - quinticShape(b);
      const dr = (quinticSlope(a) - quinticSlope(b)) / T;
      const ddr = (quinticCurvature(a) - quinticCurvature(b)) / (T * T);
      const span = (u.lane + 0.5 + 0.5 * u.rideSide) * w - c;
      c += r * span;
      cv = dr * span;
      ca = ddr * span;
    }
    if (u.weaveAmp === 0) {
      u.y = c;
      u.vy = cv;
      u.ay = ca;
      return;
    }
    const ph = u.weaveOmega * (t / 1000) + u.weavePhase;
    const s = Math.sin(ph);
    u.y = c + u.weaveAmp * s;
    u.vy = cv + u.weaveAmp * u.weaveOmega * Math.cos(ph);
    u.ay = ca - u.weaveAmp * u.weaveOmega * u.weaveOmega * s;
  }

  private weaveAt(u: Vehicle, t: number): number {
    return u.weaveAmp === 0 ? 0 : u.weaveAmp * Math.sin(u.weaveOmega * (t / 1000) + u.weavePhase);
  }

  private laneAllowed(u: Vehicle, lane: number): boolean {
    if (lane < 0 || lane >= this.o.lanes) return false;
    return u.kind !== "truck" || lane < this.o.truckLanes;
  }

  /**
   * The acceleration of `u` under European rules (no passing on the right above noPassingRightSpeed):
   * limited by a slower leader in the lane to its left.
   */
  private keepRightAcc(u: Vehicle, acc: number, leftLeader: Vehicle | null): number {
    if (!this.o.keepRight || !leftLeader || u.v <= this.o.noPassingRightSpeed || leftLeader.v >= u.v) return acc;
    const gap = gapBetween(u, leftLeader);
    if (gap <= 0) return acc;
    return Math.min(acc, this.accBehind(u, leftLeader));
  }

  private decideLaneChanges(t: number): void {
    const o = this.o;
    const acc: MobilAccelerations = { c: 0, cNew: 0, n: 0, nNew: 0, o: 0, oNew: 0 };
    // Iterate over a snapshot: starting a change edits the lane lists, not this array.
    for (const u of this.vehicles) {
      if (u.lcTo >= 0 || !u.allowLaneChange || u.held) continue;
      if (t < u.nextDecisionMs) continue;
      u.nextDecisionMs = t + this.checkSteps * this.dtMs;
      if (t < u.noChangeUntilMs || t < u.brakeUntilMs) continue;
      if (u.x < this.setup.xEntry + 50 || u.x > this.setup.xExit - 150) continue;

      const own = this.lanes[u.lane]!;
      const i = this.indexOf(u);
      const leader = i + 1 < own.length ? own[i + 1]! : null;
      const follower = i > 0 ? own[i - 1]! : null;
      const aC = this.clampAcc(u.aIdm);
      const leftList = u.lane + 1 < o.lanes ? this.lanes[u.lane + 1]! : null;
      const leftLeader = leftList ? (leftList[upperBound(leftList, u.x)] ?? null) : null;
      const aCeur = this.keepRightAcc(u, aC, leftLeader);
      const aO = follower ? this.accBehind(follower, u) : 0;
      const aONew = follower ? this.accBehind(follower, leader) : 0;

      let bestLane = -1;
      let best = 0;
      for (const dir of [-1, 1] as const) {
        const tl = u.lane + dir;
        if (!this.laneAllowed(u, tl)) continue;
        const list = this.lanes[tl]!;
        const k = upperBound(list, u.x);
        const nl = k < list.length ? list[k]! : null;
        const nf = k > 0 ? list[k - 1]! : null;
        if (nl && gapBetween(u, nl) < 1) continue;
        if (nf && gapBetween(nf, u) < 1) continue;
        let cNew = this.accBehind(u, nl);
        if (dir < 0) cNew = this.keepRightAcc(u, cNew, leader);
        acc.c = aCeur;
        acc.cNew = cNew;
        acc.n = nf ? this.accBehind(nf, nl) : 0;
        acc.nNew = nf ? this.accBehind(nf, u) : 0;
        acc.o = aO;
        acc.oNew = aONew;
        if (!mobilIsSafe(acc, this.mobil)) continue;
        const inc = mobilIncentive(acc, this.mobil, dir < 0 ? "right" : "left");
        if (inc > best) {
          best = inc;
          bestLane = tl;
        }
      }
      if (bestLane >= 0) {
        const [durMs, shape] = this.drawLaneChange(u);
        this.startLaneChange(u, bestLane, durMs, t, shape);
        if (this.variety && o.doubleLaneChangeShare > 0) {
          const further = 2 * bestLane - u.lcFrom;
          if (this.rngVar.float() < o.doubleLaneChangeShare && this.laneAllowed(u, further)) {
            u.secondTo = further;
            u.secondPauseMs = Math.round(this.rngVar.uniform(0, o.doubleLaneChangePauseMax) * 1000);
            u.secondAtMs = -1;
          }
        }
      }
    }
  }

  /**
   * Duration (ms) and profile of a new lane change. Without the variety options this is the single
   * draw of the default generator (minimum-jerk, laneChangeDuration*), so its stream is unchanged.
   */
  private drawLaneChange(u: Vehicle): [number, ShapeCode] {
    const o = this.o;
    let shape: ShapeCode = 0;
    if (this.variety && (o.constantSpeedShare > 0 || o.sinusoidalShare > 0)) {
      const r = this.rngVar.float();
      shape = r < o.constantSpeedShare ? 1 : r < o.constantSpeedShare + o.sinusoidalShare ? 2 : 0;
    }
    const mean = shape === 1 ? o.constantSpeedDurationMean : shape === 2 ? o.sinusoidalDurationMean : o.laneChangeDurationMean;
    const sd = shape === 1 ? o.constantSpeedDurationSd : shape === 2 ? o.sinusoidalDurationSd : o.laneChangeDurationSd;
    let d = sampleLaneChangeDuration(this.rngLc, mean, sd, o.laneChangeDurationMin, o.laneChangeDurationMax);
    if (u.kind === "truck" && o.truckLaneChangeFactor !== 1) d = Math.round(d * o.truckLaneChangeFactor * 500) / 500;
    return [Math.round(d * 1000), shape];
  }

  /** Second changes of double lane changes that are due, and lane changes at the section's edges (issue 11). */
  private varietyManeuvers(t: number): void {
    for (const u of this.vehicles) {
      if (u.lcTo >= 0) continue;
      if (u.secondTo >= 0 && u.secondAtMs >= 0 && t >= u.secondAtMs) {
        const to = u.secondTo;
        if (Math.abs(to - u.lane) === 1 && this.roomIn(u, to)) {
          const first = this.laneChanges[u.lcIndex];
          const shape = first ? first.shape : 0;
          const [durMs] = this.drawLaneChange(u);
          if (first) first.tag = "double-first";
          u.secondTo = -1;
          u.secondAtMs = -1;
          this.startLaneChange(u, to, durMs, t, shape).tag = "double-second";
        } else if (t > u.secondAtMs + 3000) {
          u.secondTo = -1;
          u.secondAtMs = -1;
        }
        continue;
      }
      if (!Number.isNaN(u.edgeTriggerX) && u.x >= u.edgeTriggerX && !u.held) {
        const dirs = this.rngVar.float() < 0.5 ? [1, -1] : [-1, 1];
        for (const dir of dirs) {
          const to = u.lane + dir;
          if (!this.laneAllowed(u, to) || !this.roomIn(u, to)) continue;
          const [durMs, shape] = this.drawLaneChange(u);
          this.startLaneChange(u, to, durMs, t, shape).tag = "edge";
          u.edgeTriggerX = Number.NaN;
          break;
        }
        if (!Number.isNaN(u.edgeTriggerX) && u.x > u.edgeTriggerX + 100) u.edgeTriggerX = Number.NaN;
      }
    }
  }

  /** At least 1 m bumper gap to the leader and follower in `lane`, and the new follower not forced beyond b_safe. */
  private roomIn(u: Vehicle, lane: number): boolean {
    if (!this.laneAllowed(u, lane)) return false;
    const list = this.lanes[lane]!;
    const k = upperBound(list, u.x);
    const nl = k < list.length ? list[k]! : null;
    const nf = k > 0 ? list[k - 1]! : null;
    if (nl && (nl === u || gapBetween(u, nl) < 1)) return false;
    if (nf && (nf === u || gapBetween(nf, u) < 1)) return false;
    if (nf && this.accBehind(nf, u) < -this.o.safeDecel) return false;
    return true;
  }

  /** Begin a lane change at time t lasting durMs; the vehicle joins the target lane's list at once. */
  private startLaneChange(u: Vehicle, to: number, durMs: number, t: number, shape: ShapeCode = 0): LaneChangeLog {
    const w = this.o.laneWidth;
    const from = u.lane;
    // Any new lane change ends a pending second change of a double lane change.
    u.secondTo = -1;
    u.secondAtMs = -1;
    u.lcFrom = from;
    u.lcTo = to;
    u.lcStartMs = t;
    u.lcEndMs = t + durMs;
    u.lcY0 = u.y;
    u.lcY1 = (to + 0.5) * w + u.offset + this.weaveAt(u, t + durMs);
    const marking = w * Math.max(from, to);
    u.lcShape = shape;
    const tau = shapeInverse(shape, (marking - u.lcY0) / (u.lcY1 - u.lcY0));
    u.lcCrossMs = Math.min(u.lcEndMs - 1, Math.max(t + 1, t + Math.round(tau * durMs)));
    u.crossed = false;
    const log: LaneChangeLog = { vehicle: u, from, to, startMs: t, crossMs: u.lcCrossMs, endMs: u.lcEndMs, shape };
    u.lcIndex = this.laneChanges.length;
    this.laneChanges.push(log);
    // Join the target lane now: its followers react from the start of the movement.
    const list = this.lanes[to]!;
    const k = upperBound(list, u.x);
    list.splice(k, 0, u);
    for (let j = k + 1; j < list.length; j++) if (list[j]!.lane === to) list[j]!.listIndex = j;
    const nl = k + 1 < list.length ? list[k + 1]! : null;
    u.a = Math.max(-this.o.maxDecel, Math.min(u.a, this.accBehind(u, nl)));
    this.updateLateral(u, t);
    return log;
  }

  /** At the crossing: who is the nearest follower (by centre lane) in the target lane, and how close? */
  private onCrossing(u: Vehicle, t: number): void {
    const list = this.lanes[u.lane]!;
    const back = (v: Vehicle): number => v.x - (v.v * (t - u.lcCrossMs)) / 1000; // position at the crossing
    let k = list.indexOf(u) - 1;
    while (k >= 0 && list[k]!.lane !== u.lane) k--;
    const ego = k >= 0 ? list[k]! : null;
    if (ego) {
      const gap = back(u) - 0.5 * u.length - (back(ego) + 0.5 * ego.length);
      if (gap <= this.o.cutInMaxGap) this.cutIns.push({ ego, cutter: u, tMs: u.lcCrossMs, gap });
    }
    if (u.plantedIndex >= 0) {
      const p = this.planted[u.plantedIndex]!;
      if (p.affected) p.magnitude = back(u) - 0.5 * u.length - (back(p.affected) + 0.5 * p.affected.length);
      u.plantedIndex = -1;
    }
    u.hiddenFrom = null;
  }

  private recordFrame(): void {
    const [r0, r1] = this.setup.recordRange!;
    const f = this.frames;
    const frameS = this.frameMs / 1000;
    for (const u of this.vehicles) {
      if (u.x < r0 || u.x > r1) continue;
      let rec = u.rec;
      if (!rec) {
        rec = u.startRecording(this.nextTrack++, f);
        this.recorded.push(u);
      }
      rec.x.push(u.x);
      rec.y.push(u.y);
      rec.v.push(u.v);
      rec.vy.push(u.vy);
      // A vehicle at a standstill does not accelerate, whatever braking is commanded (the brakes hold
      // it; the ballistic update keeps it in place): record the acceleration of the motion.
      rec.a.push(u.v === 0 && u.a < 0 ? 0 : u.a);
      rec.ay.push(u.ay);
      rec.lane.push(u.lane);
      this.observedMeters += u.v * frameS;
    }
    this.frames++;
  }

  // ---------------------------------------------------------------------------------------------
  // Planted critical situations

  private plantEvents(t: number): void {
    const o = this.o;
    const km = this.observedMeters / 1000;
    while (km >= this.nextBrakeKm) {
      this.pendingBrakes++;
      this.nextBrakeKm += this.rngPlant.exponential(o.hardBrakingRate);
    }
    while (km >= this.nextCutInKm) {
      this.pendingCutIns++;
      this.nextCutInKm += this.rngPlant.exponential(o.tightCutInRate);
    }
    if (this.pendingBrakes > 0 && this.plantHardBraking(t)) this.pendingBrakes--;
    if (this.pendingCutIns > 0 && this.plantTightCutIn(t)) this.pendingCutIns--;
  }

  /** Events still waiting for a suitable vehicle when the run ended. */
  get pendingPlanted(): number {
    return this.pendingBrakes + this.pendingCutIns;
  }

  private plantHardBraking(t: number): boolean {
    const o = this.o;
    const [r0, r1] = this.setup.recordRange!;
    const lo = r0 + 0.05 * (r1 - r0);
    const hi = r0 + 0.7 * (r1 - r0);
    const candidates: [Vehicle, Vehicle][] = [];
    for (const u of this.vehicles) {
      if (u.x < lo || u.x > hi || u.lcTo >= 0 || u.held || u.v < 15 || t < u.brakeUntilMs) continue;
      const own = this.lanes[u.lane]!;
      const i = this.indexOf(u);
      const f = i > 0 ? own[i - 1]! : null;
      if (!f || f.lane !== u.lane || f.lcTo >= 0 || gapBetween(f, u) > 60) continue;
      candidates.push([u, f]);
    }
    if (candidates.length === 0) return false;
    const r = this.rngPlant;
    const [u, f] = candidates[r.int(candidates.length)]!;
    const decel = r.uniform(o.hardBrakingDecelMin, o.hardBrakingDecelMax);
    const durMs = Math.round(r.uniform(o.hardBrakingDurationMin, o.hardBrakingDurationMax) * 1000);
    u.brakeDecel = decel;
    u.brakeUntilMs = t + durMs;
    u.noChangeUntilMs = Math.max(u.noChangeUntilMs, t + durMs + 2000);
    this.planted.push({ kind: "hard-braking", vehicle: u, affected: f, startMs: t, endMs: t + durMs, magnitude: decel });
    return true;
  }

  private plantTightCutIn(t: number): boolean {
    const o = this.o;
    const [r0, r1] = this.setup.recordRange!;
    const lo = r0 + 0.05 * (r1 - r0);
    const hi = r0 + 0.6 * (r1 - r0);
    const r = this.rngPlant;
    // Planted cut-ins are brisk: durations in [2, 5] s (within the configured bounds). The drawn
    // duration is kept when it gives a crossing gap in range, else the nearest one that does.
    const dMin = Math.max(2, o.laneChangeDurationMin);
    const dMax = Math.max(dMin, Math.min(5, o.laneChangeDurationMax));
    const d = sampleLaneChangeDuration(r, o.laneChangeDurationMean, o.laneChangeDurationSd, dMin, dMax);
    const candidates: [Vehicle, number, Vehicle, number, number][] = [];
    // Vehicles already involved in a planted cut-in (as cutter or as the unaware follower) are left alone.
    const involved = new Set<Vehicle>();
    for (const w of this.vehicles) if (w.hiddenFrom && !w.crossed) involved.add(w.hiddenFrom);
    for (const u of this.vehicles) {
      if (u.x < lo || u.x > hi || u.lcTo >= 0 || u.held || !u.allowLaneChange || u.v < 15 || t < u.brakeUntilMs) continue;
      if (involved.has(u)) continue;
      if (u.a < -0.5) continue;
      for (const dir of [-1, 1]) {
        const tl = u.lane + dir;
        if (!this.laneAllowed(u, tl)) continue;
        const list = this.lanes[tl]!;
        const k = upperBound(list, u.x);
        const nl = k < list.length ? list[k]! : null;
        const nf = k > 0 ? list[k - 1]! : null;
        if (!nf || nf.lcTo >= 0 || nf.lane !== tl || nf.held || nf.v < 15 || u.v < nf.v - 3 || involved.has(nf)) continue;
        if (t < nf.brakeUntilMs) continue;
        if (nl && (gapBetween(u, nl) < 20 || nl.v < u.v - 2)) continue;
        const back = gapBetween(nf, u);
        if (back < 2) continue;
        let busy = false;
        for (const w of list) if (w.lcTo === tl && w.lane !== tl && Math.abs(w.x - u.x) < 60) busy = true;
        if (busy) continue;
        // Predicted gap at the crossing (about mid-movement) at constant speeds: back + dv · D / 2.
        const dv = u.v - nf.v;
        const gapAt = (dur: number): number => back + dv * 0.5 * dur;
        let dur = d;
        if (gapAt(dur) < o.tightCutInGapMin || gapAt(dur) > o.tightCutInGapMax) {
          if (Math.abs(dv) < 1e-9) continue;
          const dA = (2 * (o.tightCutInGapMin - back)) / dv;
          const dB = (2 * (o.tightCutInGapMax - back)) / dv;
          const feasLo = Math.max(dMin, Math.min(dA, dB));
          const feasHi = Math.min(dMax, Math.max(dA, dB));
          if (feasLo > feasHi) continue;
          dur = Math.round(Math.min(feasHi, Math.max(feasLo, d)) * 500) / 500;
          if (gapAt(dur) < o.tightCutInGapMin - 0.05 || gapAt(dur) > o.tightCutInGapMax + 0.05) continue;
        }
        candidates.push([u, tl, nf, gapAt(dur), dur]);
      }
    }
    if (candidates.length === 0) return false;
    const [u, tl, f, predicted, dur] = candidates[r.int(candidates.length)]!;
    const durMs = Math.round(dur * 1000);
    u.hiddenFrom = f;
    u.plantedIndex = this.planted.length;
    this.planted.push({ kind: "tight-cut-in", vehicle: u, affected: f, startMs: t, endMs: t + durMs, magnitude: predicted });
    this.startLaneChange(u, tl, durMs, t);
    return true;
  }

  // ---------------------------------------------------------------------------------------------
  // Boundaries

  private inflow(t: number): void {
    while (this.nextArrivalMs <= t) {
      this.queue.push(this.createVehicle());
      this.nextArrivalMs += this.drawHeadwayMs();
    }
    if (this.queue.length > this.maxQueue) this.maxQueue = this.queue.length;
    const o = this.o;
    const x0 = this.setup.xEntry;
    while (this.queue.length > 0) {
      const u = this.queue[0]!;
      const allowed = u.kind === "truck" ? Math.min(o.truckLanes, o.lanes) : o.lanes;
      // Enter the lane with the most room; several empty lanes are chosen between at random.
      let bestGap = -Infinity;
      let choices: number[] = [];
      let bestSpeed = 0;
      const speeds: number[] = [];
      for (let lane = 0; lane < allowed; lane++) {
        const list = this.lanes[lane]!;
        const last = list.length > 0 ? list[0]! : null;
        const gap = last ? last.x - 0.5 * last.length - (x0 + 0.5 * u.length) : Infinity;
        const v = last ? Math.min(u.idm.desiredSpeed, last.v) : u.idm.desiredSpeed;
        speeds[lane] = v;
        if (gap < u.idm.minGap + v * u.idm.timeGap) continue;
        if (gap > bestGap) {
          bestGap = gap;
          choices = [lane];
        } else if (gap === bestGap) choices.push(lane);
      }
      if (choices.length === 0) break;
      const lane = choices.length === 1 ? choices[0]! : choices[this.rngInflow.int(choices.length)]!;
      bestSpeed = speeds[lane]!;
      this.queue.shift();
      u.x = x0;
      u.v = bestSpeed;
      u.lane = lane;
      u.nextDecisionMs = t + this.rngDriver.int(this.checkSteps) * this.dtMs;
      if (u.rider) {
        // Ride the marking to the left of the lane (to the right in the leftmost lane), starting
        // 15–45 s after entering (the observed section begins about 30 s downstream) for 15–40 s.
        u.rideSide = lane + 1 < o.lanes ? 1 : lane > 0 ? -1 : 0;
        u.rideStartMs = t + Math.round(this.rngVar.uniform(15, 45) * 1000);
        u.rideEndMs = u.rideStartMs + Math.round(this.rngVar.uniform(15, 40) * 1000);
      }
      this.updateLateral(u, t);
      this.vehicles.unshift(u);
      this.lanes[lane]!.unshift(u);
    }
  }

  private removeExited(): void {
    const xExit = this.setup.xExit;
    const a = this.vehicles;
    let k = 0;
    for (let i = 0; i < a.length; i++) {
      const u = a[i]!;
      if (u.x - 0.5 * u.length > xExit) continue;
      a[k++] = u;
    }
    a.length = k;
  }
}
