import { InputError } from "../core/errors.js";
import { deriveMotion, type Motion } from "../kinematics/deriveMotion.js";
import { MANEUVER_DEFAULTS } from "../maneuvers/options.js";
import type { ObjectKind, Track } from "../recording/types.js";
import type { Scenario } from "../scenario/types.js";
import { centreOffset, centreToReference } from "./referencePoint.js";
import { xmlEscape as esc, xmlNumber as num } from "./xmlText.js";

/** ASAM OpenSCENARIO version written (FileHeader revMajor.revMinor); validated against the shipped 1.2.0 XSD. */
export const OPENSCENARIO_REV = { major: 1, minor: 2 } as const;

export interface ConcreteScenarioOptions {
  /**
   * Neighbours within this longitudinal distance of the ego at some common sample are included (m;
   * default 250, so that a same-lane leader up to about 7 s of time headway at motorway speed is kept).
   */
  longitudinalRange?: number;
  /** … and within this lateral distance (m; default 8, about two lanes). */
  lateralRange?: number;
  /** One trajectory vertex every this many recording frames (default 1: every frame). */
  vertexEvery?: number;
  /** FileHeader date (xsd:dateTime); fixed by default so that reruns are byte-identical. */
  date?: string;
  /**
   * Lead-in and run-out around the test case's window (s; default 1, half the smoothing window), where
   * the ego's track has them: a player's (and roadsieve's chain's) smoothing then sees the same motion
   * before and after the window as in the recording. The window itself is given by the FileHeader
   * properties roadsieve.windowStart_s / roadsieve.windowEnd_s (simulation time).
   */
  leadIn?: number;
  /** Savitzky–Golay window for positions (s); default the maneuver stage's (MANEUVER_DEFAULTS.windowS). */
  smoothingWindowS?: number;
  /** Savitzky–Golay polynomial order; default the maneuver stage's (MANEUVER_DEFAULTS.order). */
  smoothingOrder?: number;
  /** Evaluation thresholds written as properties of the ego's controller slot. */
  thresholds?: EvaluationThresholds;
}

/** Pass/fail thresholds of the plan, carried by the ego (entity under test) as properties. */
export interface EvaluationThresholds {
  /** Minimum time-to-collision (s) below which a run fails. */
  minTtc: number;
  /** Minimum time headway (s). */
  minThw: number;
  /** A collision fails the run. */
  collision: boolean;
}

export const DEFAULT_THRESHOLDS: Readonly<EvaluationThresholds> = Object.freeze({ minTtc: 1.5, minThw: 0.5, collision: true });

export interface ConcreteScenarioInput {
  scenario: Scenario;
  /** Tracks of the scenario's recording (road frame, raw positions as read). */
  tracks: readonly Track[];
  /** Recording frame rate (Hz); vertex and trigger times are whole frames at this rate. */
  frameRate: number;
  /** Path of the OpenDRIVE file, as written into RoadNetwork/LogicFile (relative to the .xosc). */
  roadFile: string;
  name?: string;
  description?: string;
}

export interface ConcreteScenarioResult {
  xml: string;
  /** Entity names: "ego" first, then "t<trackId>" in track-id order. */
  actors: string[];
  /** Entry and exit time of each actor in simulation time (s, 0 = start of the lead-in); null = present at the start / until the end. */
  presence: Record<string, { enter: number | null; leave: number | null }>;
  warnings: string[];
}

const CATEGORY: Readonly<Record<ObjectKind, string>> = { car: "car", truck: "truck", motorcycle: "motorbike", other: "car" };
const HEIGHT: Readonly<Record<ObjectKind, number>> = { car: 1.5, truck: 3.5, motorcycle: 1.4, other: 1.5 };

interface Sample {
  /** Frame relative to the window start. */
  f: number;
  x: number;
  y: number;
  h: number;
  v: number;
}

interface Actor {
  name: string;
  track: Track;
  samples: Sample[];
  enter: number | null;
  leave: number | null;
}

/** Smoothed motion per track and filter setting, reused across the test cases of one export (tracks are immutable). */
/**
 * K of the exported path (1 − (1 − S²)^K)(x): the chain's re-measurement differs from the detection's
 * by O((1 − S²)^K) in the passband, the path's frame-to-frame acceleration noise grows slowly with K.
 * 4 measured as the balance on the sample (docs/openscenario.md, "Smoothing").
 */
const SHARPEN_ORDER = 4;
const SMOOTHED = new WeakMap<Track, Map<string, Motion>>();

function smoothTrack(tr: Track, windowS: number, order: number): Motion {
  let byKey = SMOOTHED.get(tr);
  if (!byKey) SMOOTHED.set(tr, (byKey = new Map()));
  const key = `${windowS}/${order}`;
  let m = byKey.get(key);
  if (!m) {
    const o = { windowS, accelWindowS: MANEUVER_DEFAULTS.accelWindowS, order, maxGapFactor: MANEUVER_DEFAULTS.maxGapFactor };
    // The exported path z = (1 − (1 − A)^K)(x) with A = S², S the detection's Savitzky–Golay filter
    // (K − 1 Van Cittert steps on A; P. H. van Cittert, Z. Physik 69, 1931):
    // - smooth: outside the passband S leaks through its sidelobes (one pass leaves about 2 m/s² of
    //   frame-to-frame acceleration from 0.1 m position noise at 25 Hz); every term holds A, which
    //   squares that leak, so the path a player follows is smooth;
    // - faithful: the chain smooths z once more; in the passband z = x − (1 − A)^K x, so S(z) differs
    //   from S(x), the detection's view, only by S(1 − S²)^K x, small where S is near 1.
    const S = (x: Float64Array, y: Float64Array): Motion => deriveMotion({ t: tr.t, x, y }, o);
    // z = (1 − (1 − A)^K) x = Σ_j (−1)^(j+1) C(K, j) A^j x with A = S² (K − 1 Van Cittert steps on A).
    const K = SHARPEN_ORDER;
    const n = tr.t.length;
    const z: Motion = { x: new Float64Array(n), y: new Float64Array(n), vx: new Float64Array(n), vy: new Float64Array(n), ax: new Float64Array(n), ay: new Float64Array(n) };
    let cur: Motion = { ...z, x: tr.x, y: tr.y };
    let binom = 1;
    for (let j = 1; j <= K; j++) {
      const half = S(cur.x, cur.y);
      const full = S(half.x, half.y); // A^j x; its velocity is D(S^(2j−1) x)
      binom = (binom * (K - j + 1)) / j;
      const c = (j % 2 === 1 ? 1 : -1) * binom;
      for (const k of ["x", "y", "vx", "vy", "ax", "ay"] as const) {
        const src = full[k];
        const dst = z[k];
        for (let i = 0; i < n; i++) dst[i] = dst[i]! + c * src[i]!;
      }
      cur = full;
    }
    m = z;
    byKey.set(key, m);
  }
  return m;
}

/**
 * Smoothed samples of a track inside the window, one per recording frame: positions built from the
 * Savitzky–Golay filter the maneuver detection uses (kinematics/deriveMotion with the maneuver stage's
 * window and order; see smoothTrack), heading and speed from the filter's derivative of that path.
 */
function smoothedWindow(tr: Track, f0: number, f1: number, frameRate: number, windowS: number, order: number): Sample[] {
  const m = smoothTrack(tr, windowS, order);
  const out: Sample[] = [];
  for (let i = 0; i < tr.t.length; i++) {
    const f = Math.round(tr.t[i]! * frameRate);
    if (f < f0 || f > f1) continue;
    const vx = Number.isFinite(m.vx[i]!) ? m.vx[i]! : tr.vx[i]!;
    const vy = Number.isFinite(m.vy[i]!) ? m.vy[i]! : tr.vy[i]!;
    out.push({ f: f - f0, x: m.x[i]!, y: m.y[i]!, h: Math.atan2(vy, vx), v: Math.hypot(vx, vy) });
  }
  return out;
}

function vehicleLines(a: Actor, isEgo: boolean, maxSpeed: number, thresholds: EvaluationThresholds): string[] {
  const tr = a.track;
  const len = tr.length > 0 ? tr.length : 4.5;
  const wid = tr.width > 0 ? tr.width : 1.8;
  const hgt = HEIGHT[tr.kind] ?? 1.5;
  const wheel = tr.kind === "truck" ? 1.0 : 0.65;
  const trackWidth = Math.max(0.5, wid - 0.2);
  return [
    `    <ScenarioObject name="${esc(a.name)}">`,
    ...vehicleBody(`${tr.kind}-${tr.id}`, tr.kind, len, wid, hgt, wheel, trackWidth, maxSpeed, [
      ["recording", tr.recording],
      ["trackId", String(tr.id)],
    ]),
    ...(isEgo ? egoControllerLines(thresholds) : []),
    `    </ScenarioObject>`,
  ];
}

/** Vehicle element: bounding box declared around the rear-axle reference point (see referencePoint.ts). */
export function vehicleBody(
  name: string,
  kind: ObjectKind,
  len: number,
  wid: number,
  hgt: number,
  wheel: number,
  trackWidth: number,
  maxSpeed: number,
  properties: ReadonlyArray<readonly [string, string]>,
): string[] {
  return [
    `      <Vehicle name="${esc(name)}" vehicleCategory="${CATEGORY[kind] ?? "car"}">`,
    `        <BoundingBox>`,
    `          <Center x="${num(centreOffset(len))}" y="0" z="${num(hgt / 2)}"/>`,
    `          <Dimensions height="${num(hgt)}" length="${num(len)}" width="${num(wid)}"/>`,
    `        </BoundingBox>`,
    `        <Performance maxAcceleration="10" maxDeceleration="10" maxSpeed="${num(Math.max(70, maxSpeed))}"/>`,
    `        <Axles>`,
    `          <FrontAxle maxSteering="0.5" positionX="${num(0.6 * len)}" positionZ="${num(wheel / 2)}" trackWidth="${num(trackWidth)}" wheelDiameter="${num(wheel)}"/>`,
    `          <RearAxle maxSteering="0" positionX="0" positionZ="${num(wheel / 2)}" trackWidth="${num(trackWidth)}" wheelDiameter="${num(wheel)}"/>`,
    `        </Axles>`,
    `        <Properties>`,
    ...properties.map(([k, v]) => `          <Property name="${esc(k)}" value="${esc(v)}"/>`),
    `        </Properties>`,
    `      </Vehicle>`,
  ];
}

/**
 * The ego's controller slot: a Controller named "entity-under-test" whose properties carry the
 * plan's pass/fail thresholds. A player puts the function under test here; roadsieve's own player
 * either replays the recorded path or drives the reference driver (IDM + MOBIL).
 */
export function egoControllerLines(t: EvaluationThresholds): string[] {
  return [
    `      <ObjectController>`,
    `        <Controller name="entity-under-test">`,
    `          <Properties>`,
    `            <Property name="role" value="entity under test"/>`,
    `            <Property name="pass.minTtc_s" value="${num(t.minTtc)}"/>`,
    `            <Property name="pass.minThw_s" value="${num(t.minThw)}"/>`,
    `            <Property name="pass.noCollision" value="${t.collision ? "true" : "false"}"/>`,
    `          </Properties>`,
    `        </Controller>`,
    `      </ObjectController>`,
  ];
}

export function simulationTimeTrigger(tag: "StartTrigger" | "StopTrigger", name: string, value: number, rule: string, indent: string): string[] {
  return [
    `${indent}<${tag}>`,
    `${indent}  <ConditionGroup>`,
    `${indent}    <Condition conditionEdge="none" delay="0" name="${esc(name)}">`,
    `${indent}      <ByValueCondition>`,
    `${indent}        <SimulationTimeCondition rule="${rule}" value="${num(value, 6)}"/>`,
    `${indent}      </ByValueCondition>`,
    `${indent}    </Condition>`,
    `${indent}  </ConditionGroup>`,
    `${indent}</${tag}>`,
  ];
}

function worldPosition(p: Sample, len: number): string {
  const r = centreToReference(p.x, p.y, p.h, len);
  return `<WorldPosition x="${num(r.x)}" y="${num(r.y)}" z="0" h="${num(p.h, 6)}"/>`;
}

/**
 * One test case (its scenario) as a concrete ASAM OpenSCENARIO 1.2 document that replays the window:
 * - every vehicle's position is its reference point (rear-axle middle, declared by its BoundingBox),
 *   converted from the recorded box centre (referencePoint.ts);
 * - trajectories are the smoothed path (smoothTrack) at every recording frame (vertex times are
 *   whole frames, k / frameRate, from the start of the lead-in), headings from the smoothed velocity;
 * - a vehicle that enters the window late is removed in Init (DeleteEntityAction) and added at its
 *   entry frame (AddEntityAction) with its trajectory; one that leaves early is deleted at the frame
 *   after its last sample;
 * - the road is the OpenDRIVE file `roadFile` (RoadNetwork/LogicFile); world coordinates are the
 *   road frame (x along the driving direction, y to the left).
 */
export function concreteScenarioXml(input: ConcreteScenarioInput, options: ConcreteScenarioOptions = {}): ConcreteScenarioResult {
  const longRange = options.longitudinalRange ?? 250;
  const leadIn = options.leadIn ?? MANEUVER_DEFAULTS.windowS / 2;
  const latRange = options.lateralRange ?? 8;
  const every = options.vertexEvery ?? 1;
  const date = options.date ?? "1970-01-01T00:00:00";
  const windowS = options.smoothingWindowS ?? MANEUVER_DEFAULTS.windowS;
  const order = options.smoothingOrder ?? MANEUVER_DEFAULTS.order;
  const thresholds = options.thresholds ?? DEFAULT_THRESHOLDS;
  if (!Number.isInteger(every) || every < 1) throw new InputError(`vertexEvery=${every} should be an integer >= 1`, { column: "vertexEvery", value: every });
  if (!(longRange > 0) || !(latRange > 0)) throw new InputError(`longitudinalRange=${longRange} and lateralRange=${latRange} should be > 0 m`, { column: "longitudinalRange" });
  if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}/.test(date)) throw new InputError(`date="${date}" should be an xsd:dateTime like 2026-01-31T12:00:00`, { column: "date", value: date });
  if (!(leadIn >= 0) || !Number.isFinite(leadIn)) throw new InputError(`leadIn=${leadIn} should be a finite number >= 0 s`, { column: "leadIn", value: leadIn });
  if (!(input.frameRate > 0)) throw new InputError(`frameRate=${input.frameRate} should be > 0 Hz`, { column: "frameRate", value: input.frameRate });
  const s = input.scenario;
  const fr = input.frameRate;
  const w0 = Math.round(s.tStart * fr);
  const w1 = Math.round(s.tEnd * fr);
  const warnings: string[] = [];
  const ego = input.tracks.find((t) => t.id === s.egoTrack && t.recording === s.recording);
  if (!ego) throw new InputError(`ego track ${s.egoTrack} of recording "${s.recording}" is not among the ${input.tracks.length} tracks given`, { value: s.egoTrack });
  const lead = Math.round(leadIn * fr);
  const f0 = Math.max(w0 - lead, Math.min(w0, Math.round(ego.t[0]! * fr)));
  const f1 = Math.min(w1 + lead, Math.max(w1, Math.round(ego.t[ego.t.length - 1]! * fr)));
  const frames = f1 - f0;
  const egoSamples = smoothedWindow(ego, f0, f1, fr, windowS, order);
  if (egoSamples.length < 2) throw new InputError(`ego track ${s.egoTrack} has ${egoSamples.length} samples in [${s.tStart}, ${s.tEnd}] s; a trajectory needs at least 2`, { value: s.egoTrack });
  const egoAt = new Map(egoSamples.map((p) => [p.f, p]));

  const actors: Actor[] = [{ name: "ego", track: ego, samples: egoSamples, enter: null, leave: null }];
  const others = input.tracks.filter((t) => t !== ego && t.recording === s.recording).sort((a, b) => a.id - b.id);
  for (const tr of others) {
    const t0 = tr.t[0]!;
    const tn = tr.t[tr.t.length - 1]!;
    if (tn < s.tStart - 1e-9 || t0 > s.tEnd + 1e-9) continue;
    const smp = smoothedWindow(tr, f0, f1, fr, windowS, order);
    const near = smp.some((p) => {
      const e = egoAt.get(p.f);
      return e !== undefined && Math.abs(p.x - e.x) <= longRange && Math.abs(p.y - e.y) <= latRange;
    });
    if (!near) continue;
    if (smp.length < 2) {
      warnings.push(`track ${tr.id} is near the ego but has fewer than 2 samples in the window; left out`);
      continue;
    }
    const enter = smp[0]!.f > 0 ? smp[0]!.f : null;
    const leave = smp[smp.length - 1]!.f < frames ? smp[smp.length - 1]!.f + 1 : null;
    actors.push({ name: `t${tr.id}`, track: tr, samples: smp, enter, leave });
  }
  if (egoSamples[0]!.f !== 0 || egoSamples[egoSamples.length - 1]!.f !== frames) warnings.push(`the ego's samples do not cover the whole window (frames ${egoSamples[0]!.f}..${egoSamples[egoSamples.length - 1]!.f} of 0..${frames})`);

  const name = input.name ?? s.id;
  const lines: string[] = [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<OpenSCENARIO>`,
    `  <FileHeader author="roadsieve" date="${esc(date)}" description="${esc(input.description ?? `${name}: recording ${s.recording}, ego ${s.egoTrack}, ${num(s.tStart)}–${num(s.tEnd)} s`)}" revMajor="${OPENSCENARIO_REV.major}" revMinor="${OPENSCENARIO_REV.minor}">`,
    `    <Properties>`,
    `      <Property name="roadsieve.kind" value="concrete"/>`,
    `      <Property name="roadsieve.frameRate_Hz" value="${num(fr, 6)}"/>`,
    `      <Property name="roadsieve.recording" value="${esc(s.recording)}"/>`,
    `      <Property name="roadsieve.egoTrack" value="${s.egoTrack}"/>`,
    `      <Property name="roadsieve.tStart_s" value="${num(f0 / fr, 6)}"/>`,
    `      <Property name="roadsieve.windowStart_s" value="${num((w0 - f0) / fr, 6)}"/>`,
    `      <Property name="roadsieve.windowEnd_s" value="${num((w1 - f0) / fr, 6)}"/>`,
    `    </Properties>`,
    `  </FileHeader>`,
    `  <ParameterDeclarations/>`,
    `  <CatalogLocations/>`,
    `  <RoadNetwork>`,
    `    <LogicFile filepath="${esc(input.roadFile)}"/>`,
    `  </RoadNetwork>`,
    `  <Entities>`,
  ];
  for (const a of actors) lines.push(...vehicleLines(a, a.name === "ego", Math.max(...a.samples.map((p) => p.v)), thresholds));
  lines.push(`  </Entities>`, `  <Storyboard>`, `    <Init>`, `      <Actions>`);
  for (const a of actors)
    if (a.enter !== null)
      lines.push(
        `        <GlobalAction>`,
        `          <EntityAction entityRef="${esc(a.name)}">`,
        `            <DeleteEntityAction/>`,
        `          </EntityAction>`,
        `        </GlobalAction>`,
      );
  for (const a of actors) {
    if (a.enter !== null) continue;
    const p = a.samples[0]!;
    lines.push(
      `        <Private entityRef="${esc(a.name)}">`,
      `          <PrivateAction>`,
      `            <TeleportAction>`,
      `              <Position>`,
      `                ${worldPosition(p, a.track.length)}`,
      `              </Position>`,
      `            </TeleportAction>`,
      `          </PrivateAction>`,
      `          <PrivateAction>`,
      `            <LongitudinalAction>`,
      `              <SpeedAction>`,
      `                <SpeedActionDynamics dynamicsDimension="time" dynamicsShape="step" value="0"/>`,
      `                <SpeedActionTarget>`,
      `                  <AbsoluteTargetSpeed value="${num(p.v)}"/>`,
      `                </SpeedActionTarget>`,
      `              </SpeedAction>`,
      `            </LongitudinalAction>`,
      `          </PrivateAction>`,
      `        </Private>`,
    );
  }
  lines.push(`      </Actions>`, `    </Init>`, `    <Story name="${esc(name)}">`, `      <Act name="recorded-motion">`);
  for (const a of actors) {
    const startFrame = a.enter ?? 0;
    const first = a.samples[0]!;
    lines.push(
      `        <ManeuverGroup maximumExecutionCount="1" name="${esc(a.name)}-group">`,
      `          <Actors selectTriggeringEntities="false">`,
      `            <EntityRef entityRef="${esc(a.name)}"/>`,
      `          </Actors>`,
      `          <Maneuver name="${esc(a.name)}-maneuver">`,
      `            <Event name="${esc(a.name)}-${a.enter !== null ? "enter" : "follow"}" priority="override">`,
    );
    if (a.enter !== null)
      lines.push(
        `              <Action name="${esc(a.name)}-add">`,
        `                <GlobalAction>`,
        `                  <EntityAction entityRef="${esc(a.name)}">`,
        `                    <AddEntityAction>`,
        `                      <Position>`,
        `                        ${worldPosition(first, a.track.length)}`,
        `                      </Position>`,
        `                    </AddEntityAction>`,
        `                  </EntityAction>`,
        `                </GlobalAction>`,
        `              </Action>`,
      );
    lines.push(
      `              <Action name="${esc(a.name)}-trajectory">`,
      `                <PrivateAction>`,
      `                  <RoutingAction>`,
      `                    <FollowTrajectoryAction>`,
      `                      <TrajectoryRef>`,
      `                        <Trajectory closed="false" name="${esc(a.name)}-recorded">`,
      `                          <Shape>`,
      `                            <Polyline>`,
    );
    const last = a.samples.length - 1;
    a.samples.forEach((p, k) => {
      if (k % every !== 0 && k !== last) return;
      // One line per vertex without indentation: a 10 s window holds 250 vertices per vehicle.
      lines.push(`<Vertex time="${num(p.f / fr, 6)}"><Position>${worldPosition(p, a.track.length)}</Position></Vertex>`);
    });
    lines.push(
      `                            </Polyline>`,
      `                          </Shape>`,
      `                        </Trajectory>`,
      `                      </TrajectoryRef>`,
      `                      <TimeReference>`,
      `                        <Timing domainAbsoluteRelative="absolute" offset="0" scale="1"/>`,
      `                      </TimeReference>`,
      `                      <TrajectoryFollowingMode followingMode="position"/>`,
      `                    </FollowTrajectoryAction>`,
      `                  </RoutingAction>`,
      `                </PrivateAction>`,
      `              </Action>`,
      ...simulationTimeTrigger("StartTrigger", `${a.name}-start`, startFrame / fr, "greaterOrEqual", "              "),
      `            </Event>`,
    );
    if (a.leave !== null)
      lines.push(
        `            <Event name="${esc(a.name)}-leave" priority="parallel">`,
        `              <Action name="${esc(a.name)}-delete">`,
        `                <GlobalAction>`,
        `                  <EntityAction entityRef="${esc(a.name)}">`,
        `                    <DeleteEntityAction/>`,
        `                  </EntityAction>`,
        `                </GlobalAction>`,
        `              </Action>`,
        ...simulationTimeTrigger("StartTrigger", `${a.name}-gone`, a.leave / fr, "greaterOrEqual", "              "),
        `            </Event>`,
      );
    lines.push(`          </Maneuver>`, `        </ManeuverGroup>`);
  }
  lines.push(...simulationTimeTrigger("StartTrigger", "act-start", 0, "greaterOrEqual", "        "), `      </Act>`, `    </Story>`);
  lines.push(...simulationTimeTrigger("StopTrigger", "window-end", frames / fr, "greaterThan", "    "), `  </Storyboard>`, `</OpenSCENARIO>`);
  const presence: ConcreteScenarioResult["presence"] = {};
  for (const a of actors) presence[a.name] = { enter: a.enter === null ? null : a.enter / fr, leave: a.leave === null ? null : a.leave / fr };
  return { xml: `${lines.join("\n")}\n`, actors: actors.map((a) => a.name), presence, warnings };
}
