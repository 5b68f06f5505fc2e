import { InputError } from "../core/errors.js";
import type { Recording, Track } from "../recording/types.js";
import { idmAcceleration, idmFreeAcceleration } from "../synth/idm.js";
import { quinticShape } from "../synth/lateral.js";
import { mobilIncentive, mobilIsSafe } from "../synth/mobil.js";
import { referenceToCentre } from "../exports/referencePoint.js";
import { resolveDriver, type ReferenceDriver, type ReferenceDriverOptions } from "./referenceDriver.js";
import type { ActionDef, ConditionDef, Dynamics, EntityDef, EventDef, PositionDef, Rule, ScenarioModel, TriggerDef } from "./scenarioModel.js";

export type EgoMode = "replay" | "closed-loop";

export interface SimulateOptions {
  /** "replay": the ego does what the file says; "closed-loop": the reference driver drives it. Default "replay". */
  ego?: EgoMode;
  /** Name of the entity under test (default "ego"). */
  egoName?: string;
  driver?: ReferenceDriverOptions;
  /** Recording id of the result (default "resim"). */
  recordingId?: string;
}

/** How the ego fared: extremes towards its same-lane leader, computed from the simulated state. */
export interface EgoOutcome {
  minTtc: number | null;
  minThw: number | null;
  collision: boolean;
  /** Time of the first collision relative to the start (s), null when none. */
  collisionTime: number | null;
  /** Entity the ego collided with first. */
  collisionWith: string | null;
  /**
   * True when that entity was ahead of the ego (the ego ran into it), false when it came from behind.
   * In closed loop the other vehicles follow the scenario and do not react to the ego, so a collision
   * from behind says that the reference driver left the recorded path, not that it drove unsafely.
   */
  collisionAhead: boolean | null;
}

export interface SimulationRun {
  /** The run as a recording in the road frame (box centres; t on the source clock when the file carries roadsieve.tStart_s). */
  recording: Recording;
  frameRate: number;
  frames: number;
  /** Entity name → track id in the recording. */
  trackIds: Record<string, number>;
  ego: EgoOutcome;
  warnings: string[];
}

interface Shape {
  (tau: number): number;
}
const SHAPES: Record<Dynamics["shape"], Shape> = {
  step: (tau) => (tau >= 0 ? 1 : 0),
  linear: (tau) => Math.min(1, Math.max(0, tau)),
  // 3τ² − 2τ³ and (1 − cos πτ)/2: the cubic and sinusoidal transitions of ASAM OpenSCENARIO 1.2 (DynamicsShape).
  cubic: (tau) => (tau <= 0 ? 0 : tau >= 1 ? 1 : tau * tau * (3 - 2 * tau)),
  sinusoidal: (tau) => (tau <= 0 ? 0 : tau >= 1 ? 1 : (1 - Math.cos(Math.PI * tau)) / 2),
};

interface SpeedRun {
  t0: number;
  v0: number;
  vt: number;
  T: number;
  shape: Shape;
}
interface LaneRun {
  t0: number;
  y0: number;
  yt: number;
  T: number;
  shape: Shape;
}
interface TrajRun {
  pts: { t: number; x: number; y: number; h: number }[];
}

interface State {
  def: EntityDef;
  present: boolean;
  /** Reference point and heading. */
  x: number;
  y: number;
  h: number;
  /** Speed along the road (m/s) and lateral speed (m/s). */
  v: number;
  vy: number;
  speed: SpeedRun | null;
  lane: LaneRun | null;
  traj: TrajRun | null;
  /** Output samples. */
  out: { t: number[]; x: number[]; y: number[]; vx: number[]; vy: number[] };
  /** Closed-loop lane-change bookkeeping. */
  nextCheck: number;
}

/** Highest speed along the ego's own trajectories in the file (m/s), null when it has none. */
function recordedTopSpeed(model: ScenarioModel, ego: string): number | null {
  let top: number | null = null;
  const actions = [...model.init, ...model.acts.flatMap((a) => a.events.flatMap((e) => e.actions))];
  for (const a of actions) {
    if (a.kind !== "trajectory" || a.entity !== ego) continue;
    for (let i = 1; i < a.vertices.length; i++) {
      const p = a.vertices[i - 1]!.position;
      const q = a.vertices[i]!.position;
      if (p.type !== "world" || q.type !== "world") continue;
      const v = Math.hypot(q.x - p.x, q.y - p.y) / ((a.vertices[i]!.t - a.vertices[i - 1]!.t) * a.scale);
      if (top === null || v > top) top = v;
    }
  }
  return top;
}

function compare(rule: Rule, a: number, b: number): boolean {
  // Times and distances compare with a tolerance of 1e-9 so that frame times k / rate meet "equalTo" and "greaterOrEqual".
  const e = 1e-9;
  switch (rule) {
    case "greaterThan":
      return a > b + e;
    case "lessThan":
      return a < b - e;
    case "equalTo":
      return Math.abs(a - b) <= e;
    case "greaterOrEqual":
      return a >= b - e;
    case "lessOrEqual":
      return a <= b + e;
    case "notEqualTo":
      return Math.abs(a - b) > e;
  }
}

/**
 * Run a scenario model at its frame rate. Per frame k (t = k / rate): motion is advanced from the
 * previous frame, then conditions are evaluated on the state at t and the events they start act at t
 * (add, delete and teleport at once; speed changes, lane changes and trajectories from t on), then the
 * present entities are recorded. Speed actions change the speed along the road with the file's
 * dynamics shape (step, linear, cubic, sinusoidal; by time, rate or distance); lane changes move the
 * lateral position with the file's shape over their time or distance; trajectories are followed in
 * position mode with linear interpolation between vertices at their absolute times.
 */
export function simulateScenario(model: ScenarioModel, options: SimulateOptions = {}): SimulationRun {
  const fr = Number(model.header["roadsieve.frameRate_Hz"] ?? model.road.road.frameRate);
  if (!(fr > 0)) throw new InputError(`no frame rate: the file carries no roadsieve.frameRate_Hz property and none was given`, { file: model.file });
  const dt = 1 / fr;
  const mode = options.ego ?? "replay";
  const egoName = options.egoName ?? "ego";
  const road = model.road;
  const marks = road.road.laneMarkings;
  const nLanes = marks.length - 1;
  const warnings: string[] = [];
  const states = new Map<string, State>();
  for (const e of model.entities)
    states.set(e.name, { def: e, present: true, x: NaN, y: NaN, h: 0, v: 0, vy: 0, speed: null, lane: null, traj: null, out: { t: [], x: [], y: [], vx: [], vy: [] }, nextCheck: 0 });
  const ego = states.get(egoName) ?? null;
  if (mode === "closed-loop" && !ego) throw new InputError(`closed loop needs an entity named "${egoName}"`, { file: model.file });
  const stopFrame = (() => {
    const v = model.stopAfter.value * fr;
    const k = model.stopAfter.rule === "greaterThan" ? Math.floor(v + 1e-6) : Math.ceil(v - 1e-6) - 1;
    return Math.max(0, k);
  })();

  const centre = (s: State): { x: number; y: number } => referenceToCentre(s.x, s.y, s.h, s.def.centreX, s.def.centreY);
  /** Road-frame lane index (0 = rightmost) of a lateral position; -1 outside. */
  const laneOf = (y: number): number => {
    for (let i = 0; i < nLanes; i++) if (y >= marks[i]! && y < marks[i + 1]!) return i;
    return -1;
  };
  const laneCentre = (i: number): number => 0.5 * (marks[i]! + marks[i + 1]!);
  const laneFromId = (id: number, line: string): number => {
    const i = nLanes + id; // id -1 = leftmost = index nLanes-1
    if (!(id < 0) || i < 0 || i >= nLanes) throw new InputError(`${line}: lane id ${id} is not on the road (ids -1 … -${nLanes})`, { file: model.file });
    return i;
  };
  const idOfLane = (i: number): number => i - nLanes;
  const get = (name: string): State => states.get(name)!;

  const resolvePosition = (p: PositionDef, who: string): { x: number; y: number; h: number } => {
    if (p.type === "world") return { x: p.x, y: p.y, h: p.h };
    if (p.type === "lane") {
      const i = laneFromId(p.laneId, `position of ${who}`);
      return { x: road.x0 + p.s, y: laneCentre(i) + p.offset, h: 0 };
    }
    const ref = get(p.entity);
    if (!ref.present || !Number.isFinite(ref.x)) throw new InputError(`position of ${who} is relative to "${p.entity}", which is not on the road at that time`, { file: model.file });
    const refLane = laneOf(centre(ref).y);
    const i = laneFromId(idOfLane(refLane) + p.dLane, `position of ${who}`);
    return { x: ref.x + p.ds, y: laneCentre(i) + p.offset, h: 0 };
  };

  const speedAt = (s: State, t: number): number => {
    const r = s.speed;
    if (!r) return s.v;
    if (r.T <= 0) return r.vt;
    return r.v0 + (r.vt - r.v0) * r.shape((t - r.t0) / r.T);
  };

  const apply = (a: ActionDef, t: number): void => {
    const s = get(a.entity);
    if (mode === "closed-loop" && s === ego && (a.kind === "speed" || a.kind === "laneChange" || a.kind === "trajectory") && t > 0) return; // the reference driver drives the ego
    switch (a.kind) {
      case "delete":
        s.present = false;
        s.speed = s.lane = s.traj = null;
        return;
      case "add":
      case "teleport": {
        const p = resolvePosition(a.position, a.entity);
        s.present = true;
        s.x = p.x;
        s.y = p.y;
        s.h = p.h;
        s.lane = null;
        return;
      }
      case "speed": {
        const v0 = speedAt(s, t);
        const vt = a.target.type === "absolute" ? a.target.value : a.target.valueType === "delta" ? speedAt(get(a.target.entity), t) + a.target.value : speedAt(get(a.target.entity), t) * a.target.value;
        const d = a.dynamics;
        let T = 0;
        if (d.shape !== "step") {
          if (d.dimension === "time") T = d.value;
          else if (d.dimension === "rate") T = d.value > 0 ? Math.abs(vt - v0) / d.value : 0;
          else T = v0 + vt > 0 ? (2 * d.value) / (v0 + vt) : 0;
        }
        // A vehicle does not reverse under a speed action: targets below 0 stop it.
        const target = Math.max(0, vt);
        if (T <= 0) {
          s.v = target;
          s.speed = null;
        } else {
          s.v = v0;
          s.speed = { t0: t, v0, vt: target, T: d.dimension === "rate" ? Math.abs(target - v0) / d.value : T, shape: SHAPES[d.shape] };
        }
        if (s.traj) s.traj = null;
        return;
      }
      case "laneChange": {
        const c = centre(s);
        const from = laneOf(c.y);
        const targetLane = a.target.type === "absolute" ? laneFromId(a.target.laneId, `lane change of ${a.entity}`) : laneFromId(idOfLane(laneOf(centre(get(a.target.entity)).y)) + a.target.value, `lane change of ${a.entity}`);
        if (from < 0) warnings.push(`${a.entity} starts a lane change off the road`);
        const d = a.dynamics;
        const T = d.shape === "step" ? 0 : d.dimension === "time" ? d.value : s.v > 0 ? d.value / s.v : 0;
        s.lane = { t0: t, y0: s.y, yt: laneCentre(targetLane) + a.offset - (c.y - s.y), T, shape: SHAPES[d.shape] };
        return;
      }
      case "trajectory": {
        const pts = a.vertices.map((vx) => {
          const p = resolvePosition(vx.position, a.entity);
          return { t: vx.t * a.scale + a.offset, ...p };
        });
        s.traj = { pts };
        s.speed = null;
        s.lane = null;
        placeOnTrajectory(s, t);
        return;
      }
    }
  };

  /** Position on the trajectory at time t; ends the trajectory (keeping its last speed) after the last vertex. */
  const placeOnTrajectory = (s: State, t: number): void => {
    const pts = s.traj!.pts;
    const n = pts.length;
    let j = 0;
    if (t >= pts[n - 1]!.t) j = n - 2;
    else if (t > pts[0]!.t) {
      let lo = 0;
      let hi = n - 1;
      while (hi - lo > 1) {
        const mid = (lo + hi) >> 1;
        if (pts[mid]!.t <= t) lo = mid;
        else hi = mid;
      }
      j = lo;
    }
    const a = pts[j]!;
    const b = pts[j + 1]!;
    const span = b.t - a.t;
    const f = Math.min(1, Math.max(0, (t - a.t) / span));
    s.x = a.x + f * (b.x - a.x);
    s.y = a.y + f * (b.y - a.y);
    s.h = a.h + f * (b.h - a.h);
    s.v = (b.x - a.x) / span;
    s.vy = (b.y - a.y) / span;
    if (t >= pts[n - 1]!.t - 1e-9) {
      s.traj = null;
      s.h = b.h;
    }
  };

  /** Advance one entity (not driven by the reference driver) from t − dt to t. */
  const advance = (s: State, t: number): void => {
    if (!s.present) return;
    if (s.traj) {
      placeOnTrajectory(s, t);
      return;
    }
    const vPrev = speedAt(s, t - dt);
    const vNow = speedAt(s, t);
    s.x += 0.5 * (vPrev + vNow) * dt;
    s.v = vNow;
    if (s.speed && t - s.speed.t0 >= s.speed.T) s.speed = null;
    if (s.lane) {
      const r = s.lane;
      const yPrev = s.y;
      s.y = r.T > 0 ? r.y0 + (r.yt - r.y0) * r.shape((t - r.t0) / r.T) : r.yt;
      s.vy = (s.y - yPrev) / dt;
      s.h = Math.atan2(s.vy, Math.max(s.v, 1e-6));
      if (t - r.t0 >= r.T) s.lane = null;
    } else {
      s.vy = 0;
      s.h = 0;
    }
  };

  // --- the reference driver (closed loop) -------------------------------------------------------
  let driver: ReferenceDriver | null = null;
  const leaderOf = (s: State, lane: number, xs: Map<State, { x: number; v: number }>): { st: State; gap: number; v: number } | null => {
    let best: { st: State; gap: number; v: number } | null = null;
    const me = xs.get(s) ?? { x: centre(s).x, v: s.v };
    for (const o of states.values()) {
      if (o === s || !o.present) continue;
      if (laneOf(centre(o).y) !== lane) continue;
      const ox = xs.get(o)?.x ?? centre(o).x;
      const gap = ox - me.x - 0.5 * (o.def.length + s.def.length);
      if (ox <= me.x) continue;
      if (!best || gap < best.gap) best = { st: o, gap, v: xs.get(o)?.v ?? o.v };
    }
    return best;
  };
  const followerOf = (s: State, lane: number): { st: State; gap: number } | null => {
    let best: { st: State; gap: number } | null = null;
    const me = centre(s).x;
    for (const o of states.values()) {
      if (o === s || !o.present || laneOf(centre(o).y) !== lane) continue;
      const ox = centre(o).x;
      if (ox >= me) continue;
      const gap = me - ox - 0.5 * (o.def.length + s.def.length);
      if (!best || gap < best.gap) best = { st: o, gap };
    }
    return best;
  };
  const idmA = (v: number, lead: { gap: number; v: number } | null): number => {
    const p = driver!.idm;
    const a = lead ? idmAcceleration(p, v, lead.gap, v - lead.v) : idmFreeAcceleration(p, v);
    return Math.max(a, -driver!.maxDecel);
  };
  /** Ego from t − dt to t, others already at t: their positions are interpolated linearly inside the frame. */
  const driveEgo = (s: State, t: number, before: Map<State, { x: number; v: number }>): void => {
    const m = driver!.substeps;
    const h = dt / m;
    const lane = laneOf(centre(s).y);
    for (let k = 1; k <= m; k++) {
      const f = k / m;
      const inter = new Map<State, { x: number; v: number }>();
      for (const [o, b] of before) if (o !== s && o.present) inter.set(o, { x: b.x + (f - 1 / m) * (centre(o).x - b.x), v: b.v + (f - 1 / m) * (o.v - b.v) });
      inter.set(s, { x: centre(s).x, v: s.v });
      const lead = leaderOf(s, lane, inter);
      const a = idmA(s.v, lead);
      // Ballistic update (as the generator does), stopping at standstill.
      const vNew = s.v + a * h;
      if (vNew < 0) {
        s.x += (-0.5 * s.v * s.v) / a;
        s.v = 0;
      } else {
        s.x += s.v * h + 0.5 * a * h * h;
        s.v = vNew;
      }
    }
    if (s.lane) {
      const r = s.lane;
      const yPrev = s.y;
      s.y = r.y0 + (r.yt - r.y0) * quinticShape((t - r.t0) / r.T);
      s.vy = (s.y - yPrev) / dt;
      s.h = Math.atan2(s.vy, Math.max(s.v, 1e-6));
      if (t - r.t0 >= r.T) s.lane = null;
    } else {
      s.vy = 0;
      s.h = 0;
    }
    if (driver!.laneChanges && !s.lane && t >= s.nextCheck && lane >= 0) {
      s.nextCheck = t + driver!.laneChangeCheckInterval;
      const c = centre(s);
      const here = leaderOf(s, lane, new Map());
      const aC = idmA(s.v, here);
      const oldF = followerOf(s, lane);
      for (const dir of [1, -1] as const) {
        const target = lane + dir;
        if (target < 0 || target >= nLanes) continue;
        const lead = leaderOf(s, target, new Map());
        const newF = followerOf(s, target);
        const nA = newF ? idmA(newF.st.v, leaderOf(newF.st, target, new Map())) : 0;
        const nNew = newF ? idmA(newF.st.v, { gap: newF.gap, v: s.v }) : 0;
        const oA = oldF ? idmA(oldF.st.v, { gap: oldF.gap, v: s.v }) : 0;
        const oNew = oldF ? idmA(oldF.st.v, here ? { gap: here.gap + oldF.gap + s.def.length, v: here.v } : null) : 0;
        const acc = { c: aC, cNew: idmA(s.v, lead), n: nA, nNew, o: oA, oNew };
        if (lead && lead.gap < 0) continue;
        if (newF && newF.gap < 0) continue;
        if (!mobilIsSafe(acc, driver!.mobil)) continue;
        if (mobilIncentive(acc, driver!.mobil, dir > 0 ? "left" : "right") > 0) {
          s.lane = { t0: t, y0: s.y, yt: laneCentre(target) - (c.y - s.y), T: driver!.laneChangeDuration, shape: quinticShape };
          break;
        }
      }
    }
  };

  // --- the run ----------------------------------------------------------------------------------
  type EvState = { def: EventDef; started: boolean; fired: number | null; prev: boolean[][] };
  const acts = model.acts.map((a) => ({ def: a, started: false, fired: null as number | null, prev: [] as boolean[][], events: a.events.map((e): EvState => ({ def: e, started: false, fired: null, prev: [] })) }));
  const condValue = (c: ConditionDef, t: number): boolean => {
    if (c.kind === "simulationTime") return compare(c.rule, t, c.value);
    const ref = get(c.entity);
    if (!ref.present) return false;
    const rc = centre(ref);
    const hits = c.triggering.map((name) => {
      const s = get(name);
      if (!s.present) return false;
      const sc = centre(s);
      let d: number;
      if (c.distanceType === "longitudinal") d = Math.abs(sc.x - rc.x) - (c.freespace ? 0.5 * (s.def.length + ref.def.length) : 0);
      else if (c.distanceType === "lateral") d = Math.abs(sc.y - rc.y) - (c.freespace ? 0.5 * (s.def.width + ref.def.width) : 0);
      else d = Math.hypot(sc.x - rc.x, sc.y - rc.y);
      return compare(c.rule, d, c.value);
    });
    return c.all ? hits.every(Boolean) : hits.some(Boolean);
  };
  /** Trigger with edges and delays: returns the time the trigger fires, or null. */
  const evalTrigger = (trig: TriggerDef, t: number, st: { prev: boolean[][] }): boolean => {
    let any = false;
    trig.forEach((g, gi) => {
      st.prev[gi] ??= [];
      let all = true;
      g.forEach((c, ci) => {
        const now = condValue(c, t - c.delay) && t - c.delay >= -1e-9;
        const before = st.prev[gi]![ci] ?? false;
        st.prev[gi]![ci] = now;
        const ok = c.edge === "none" ? now : c.edge === "rising" ? now && !before : c.edge === "falling" ? !now && before : now !== before;
        if (!ok) all = false;
      });
      if (all && g.length > 0) any = true;
    });
    return any;
  };

  const ids: Record<string, number> = {};
  let nextId = 9000;
  const egoTrackId = Number(model.header["roadsieve.egoTrack"] ?? 1);
  for (const e of model.entities) {
    const m = /^t(\d+)$/.exec(e.name);
    ids[e.name] = e.name === egoName ? egoTrackId : m ? Number(m[1]) : nextId++;
  }
  const tBase = Number(model.header["roadsieve.tStart_s"] ?? 0);
  let minTtc = Infinity;
  let minThw = Infinity;
  let collisionTime: number | null = null;
  let collisionWith: string | null = null;
  let collisionAhead: boolean | null = null;

  for (let k = 0; k <= stopFrame; k++) {
    const t = k / fr;
    if (k === 0) {
      for (const a of model.init) apply(a, 0);
      for (const s of states.values()) if (s.present && !Number.isFinite(s.x)) s.present = false; // never placed: not on the road
      if (mode === "closed-loop") {
        driver = resolveDriver(options.driver ?? {}, ego!.v, road.road.speedLimit, recordedTopSpeed(model, egoName));
        ego!.speed = ego!.traj = null;
      }
    } else {
      const before = new Map<State, { x: number; v: number }>();
      for (const s of states.values()) if (s.present) before.set(s, { x: centre(s).x, v: s.v });
      for (const s of states.values()) if (!(mode === "closed-loop" && s === ego)) advance(s, t);
      if (mode === "closed-loop" && ego!.present) driveEgo(ego!, t, before);
    }
    for (const act of acts) {
      if (!act.started && evalTrigger(act.def.start, t, act)) act.started = true;
      if (!act.started) continue;
      for (const ev of act.events) {
        if (ev.started) continue;
        if (ev.def.start === null || evalTrigger(ev.def.start, t, ev)) {
          ev.started = true;
          for (const a of ev.def.actions) apply(a, t);
        }
      }
    }
    for (const s of states.values()) {
      if (!s.present) continue;
      const c = centre(s);
      s.out.t.push(tBase + t);
      s.out.x.push(c.x);
      s.out.y.push(c.y);
      s.out.vx.push(s.v);
      s.out.vy.push(s.vy);
    }
    if (ego && ego.present) {
      const ec = centre(ego);
      const lane = laneOf(ec.y);
      const lead = lane >= 0 ? leaderOf(ego, lane, new Map()) : null;
      if (lead && lead.gap >= 0) {
        if (ego.v > 0) minThw = Math.min(minThw, lead.gap / ego.v);
        if (ego.v > lead.v) minTtc = Math.min(minTtc, lead.gap / (ego.v - lead.v));
      }
      if (collisionTime === null)
        for (const o of states.values()) {
          if (o === ego || !o.present) continue;
          const oc = centre(o);
          if (Math.abs(oc.x - ec.x) < 0.5 * (o.def.length + ego.def.length) && Math.abs(oc.y - ec.y) < 0.5 * (o.def.width + ego.def.width)) {
            collisionTime = t;
            collisionWith = o.def.name;
            collisionAhead = oc.x > ec.x;
            break;
          }
        }
    }
  }

  const tracks: Track[] = [];
  for (const s of states.values()) {
    const n = s.out.t.length;
    if (n === 0) continue;
    const vx = Float64Array.from(s.out.vx);
    const vy = Float64Array.from(s.out.vy);
    const ax = new Float64Array(n);
    const ay = new Float64Array(n);
    for (let i = 1; i < n; i++) {
      ax[i] = (vx[i]! - vx[i - 1]!) * fr;
      ay[i] = (vy[i]! - vy[i - 1]!) * fr;
    }
    if (n > 1) {
      ax[0] = ax[1]!;
      ay[0] = ay[1]!;
    }
    const y = Float64Array.from(s.out.y);
    tracks.push({
      id: ids[s.def.name]!,
      recording: options.recordingId ?? "resim",
      kind: s.def.kind,
      length: s.def.length,
      width: s.def.width,
      t: Float64Array.from(s.out.t),
      x: Float64Array.from(s.out.x),
      y,
      vx,
      vy,
      ax,
      ay,
      lane: Int32Array.from(y, (v) => laneOf(v)),
    });
  }
  tracks.sort((a, b) => a.id - b.id);
  const recording: Recording = { id: options.recordingId ?? "resim", source: model.file, checksum: "", road: { ...road.road, frameRate: fr }, tracks, rejected: [], warnings: [] };
  return {
    recording,
    frameRate: fr,
    frames: stopFrame + 1,
    trackIds: ids,
    ego: { minTtc: Number.isFinite(minTtc) ? minTtc : null, minThw: Number.isFinite(minThw) ? minThw : null, collision: collisionTime !== null, collisionTime, collisionWith, collisionAhead },
    warnings,
  };
}
