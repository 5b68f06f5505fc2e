import { join } from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import type { ObjectKind, Track } from "../recording/types.js";
import type { Scenario } from "../scenario/types.js";
import type { TestPlan } from "./types.js";

/**
 * ASAM OpenSCENARIO XML (1.x) export of a test case: the ego and its neighbours during the window,
 * each placed at its first recorded position and speed, then following its recorded trajectory as a
 * polyline with vertex times. Only element and attribute names of the public standard are used.
 *
 * The file is written in the 1.0 form (revMinor 0: FollowTrajectoryAction holding the Trajectory
 * directly, event priority "overwrite"); that form is also accepted by the 1.1 and 1.2 schemas, where
 * those two constructs are marked deprecated. Road-frame coordinates map to WorldPosition directly
 * (x along the carriageway, y to the left, heading from the velocity). Vehicle geometry beyond length
 * and width (height, axles, performance limits) is not recorded; plausible values are filled in.
 */
export interface OpenScenarioOptions {
  /** Neighbours within this longitudinal distance of the ego at some common sample are included (m; default 100). */
  longitudinalRange?: number;
  /** … and within this lateral distance (m; default 8, about two lanes). */
  lateralRange?: number;
  /** Time between trajectory vertices (s; default 0.2); the last sample of the window is always kept. */
  vertexInterval?: number;
  /** FileHeader date (xsd:dateTime); fixed by default so that reruns are byte-identical. */
  date?: string;
  /** Path of an ASAM OpenDRIVE file to reference as the road network (default none). */
  roadNetworkFile?: string;
}

interface OscDefaults {
  longitudinalRange: number;
  lateralRange: number;
  vertexInterval: number;
  date: string;
}
const OSC_DEFAULTS: OscDefaults = { longitudinalRange: 100, lateralRange: 8, vertexInterval: 0.2, date: "1970-01-01T00:00:00" };

export interface OpenScenarioResult {
  xml: string;
  /** Entity names: "ego" first, then "t<trackId>" in track-id order. */
  actors: string[];
  warnings: string[];
}

function esc(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;");
}

/** Fixed-decimal number text without "-0", deterministic. */
function num(v: number, digits = 3): string {
  const s = v.toFixed(digits);
  return /^-0\.?0*$/.test(s) ? s.slice(1) : s;
}

const CATEGORY: Readonly<Record<ObjectKind, string>> = { car: "car", truck: "truck", motorcycle: "motorbike", other: "car" };
const HEIGHT: Readonly<Record<ObjectKind, number>> = { car: 1.5, truck: 3.5, motorcycle: 1.4, other: 1.5 };

interface Sample {
  t: number;
  x: number;
  y: number;
  h: number;
  v: number;
}

/** Samples of a track inside [t0, t1], thinned to one per `interval` (the last one always kept). */
function windowSamples(tr: Track, t0: number, t1: number, interval: number): Sample[] {
  const out: Sample[] = [];
  let lastKept = -Infinity;
  let lastIdx = -1;
  for (let i = 0; i < tr.t.length; i++) {
    const t = tr.t[i]!;
    if (t < t0 - 1e-9 || t > t1 + 1e-9) continue;
    lastIdx = i;
    if (t - lastKept >= interval - 1e-9) {
      out.push(sample(tr, i));
      lastKept = t;
    }
  }
  if (lastIdx >= 0 && out.length > 0 && out[out.length - 1]!.t !== tr.t[lastIdx]!) out.push(sample(tr, lastIdx));
  return out;
}

function sample(tr: Track, i: number): Sample {
  const vx = tr.vx[i]!;
  const vy = tr.vy[i]!;
  return { t: tr.t[i]!, x: tr.x[i]!, y: tr.y[i]!, h: Math.atan2(vy, vx), v: Math.hypot(vx, vy) };
}

/** Linear interpolation of a track's position at time t (null outside its samples). */
function positionAt(tr: Track, t: number): { x: number; y: number } | null {
  const n = tr.t.length;
  if (n === 0 || t < tr.t[0]! - 1e-9 || t > tr.t[n - 1]! + 1e-9) return null;
  let lo = 0;
  let hi = n - 1;
  while (hi - lo > 1) {
    const mid = (lo + hi) >> 1;
    if (tr.t[mid]! <= t) lo = mid;
    else hi = mid;
  }
  const span = tr.t[hi]! - tr.t[lo]!;
  const f = span > 0 ? Math.min(1, Math.max(0, (t - tr.t[lo]!) / span)) : 0;
  return { x: tr.x[lo]! + f * (tr.x[hi]! - tr.x[lo]!), y: tr.y[lo]! + f * (tr.y[hi]! - tr.y[lo]!) };
}

function vehicle(name: string, tr: Track, maxSpeed: number): string[] {
  const len = tr.length > 0 ? tr.length : 4.5;
  const wid = tr.width > 0 ? tr.width : 1.8;
  const hgt = HEIGHT[tr.kind] ?? 1.5;
  const wheel = tr.kind === "truck" ? 1.0 : 0.65;
  const track = Math.max(0.5, wid - 0.2);
  // Reference point at the rear axle (the usual convention); the box centre lies ahead of it.
  const rearOverhang = 0.2 * len;
  const wheelbase = 0.6 * len;
  return [
    `    <ScenarioObject name="${esc(name)}">`,
    `      <Vehicle name="${esc(`${tr.kind}-${tr.id}`)}" vehicleCategory="${CATEGORY[tr.kind] ?? "car"}">`,
    `        <BoundingBox>`,
    `          <Center x="${num(len / 2 - rearOverhang)}" y="0.000" z="${num(hgt / 2)}"/>`,
    `          <Dimensions height="${num(hgt)}" length="${num(len)}" width="${num(wid)}"/>`,
    `        </BoundingBox>`,
    `        <Performance maxAcceleration="10.000" maxDeceleration="10.000" maxSpeed="${num(Math.max(70, maxSpeed))}"/>`,
    `        <Axles>`,
    `          <FrontAxle maxSteering="0.500" positionX="${num(wheelbase)}" positionZ="${num(wheel / 2)}" trackWidth="${num(track)}" wheelDiameter="${num(wheel)}"/>`,
    `          <RearAxle maxSteering="0.000" positionX="0.000" positionZ="${num(wheel / 2)}" trackWidth="${num(track)}" wheelDiameter="${num(wheel)}"/>`,
    `        </Axles>`,
    `        <Properties>`,
    `          <Property name="recording" value="${esc(tr.recording)}"/>`,
    `          <Property name="trackId" value="${tr.id}"/>`,
    `        </Properties>`,
    `      </Vehicle>`,
    `    </ScenarioObject>`,
  ];
}

function simTimeTrigger(tag: string, name: string, value: number, edge: string, indent: string): string[] {
  return [
    `${indent}<${tag}>`,
    `${indent}  <ConditionGroup>`,
    `${indent}    <Condition conditionEdge="${edge}" delay="0" name="${esc(name)}">`,
    `${indent}      <ByValueCondition>`,
    `${indent}        <SimulationTimeCondition rule="greaterThan" value="${num(value, 4)}"/>`,
    `${indent}      </ByValueCondition>`,
    `${indent}    </Condition>`,
    `${indent}  </ConditionGroup>`,
    `${indent}</${tag}>`,
  ];
}

/**
 * One test case (its scenario) as an OpenSCENARIO document. `tracks` are the tracks of the scenario's
 * recording; the ego is found by the scenario's egoTrack. Throws InputError when the ego track is
 * missing or has fewer than two samples in the window.
 */
export function openScenarioXml(
  input: { scenario: Scenario; tracks: readonly Track[]; name?: string; description?: string },
  options: OpenScenarioOptions = {},
): OpenScenarioResult {
  const o = { ...OSC_DEFAULTS, ...Object.fromEntries(Object.entries(options).filter(([, v]) => v !== undefined)) } as OscDefaults & OpenScenarioOptions;
  if (!(o.vertexInterval > 0)) throw new InputError(`vertexInterval=${o.vertexInterval} should be > 0 s`, { column: "vertexInterval", value: o.vertexInterval });
  if (!(o.longitudinalRange > 0) || !(o.lateralRange > 0))
    throw new InputError(`longitudinalRange=${o.longitudinalRange} and lateralRange=${o.lateralRange} should be > 0 m`, { column: "longitudinalRange" });
  if (!/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}:\d{2}/.test(o.date)) throw new InputError(`date="${o.date}" should be an xsd:dateTime like 2026-01-31T12:00:00`, { column: "date", value: o.date });
  const s = input.scenario;
  const warnings: string[] = [];
  const ego = input.tracks.find((t) => t.id === s.egoTrack && t.recording === s.recording);
  if (!ego) throw new InputError(`ego track ${s.egoTrack} of recording "${s.recording}" is not among the ${input.tracks.length} tracks given`, { value: s.egoTrack });
  const t0 = s.tStart;
  const t1 = s.tEnd;
  const egoSamples = windowSamples(ego, t0, t1, o.vertexInterval);
  if (egoSamples.length < 2) throw new InputError(`ego track ${s.egoTrack} has ${egoSamples.length} samples in [${t0}, ${t1}] s; a trajectory needs at least 2`, { value: s.egoTrack });

  // Neighbours: other tracks of the recording close to the ego at some ego sample in the window.
  const actors: { name: string; track: Track; samples: Sample[] }[] = [{ name: "ego", track: ego, samples: egoSamples }];
  const others = input.tracks.filter((t) => t !== ego && t.recording === s.recording).sort((a, b) => a.id - b.id);
  for (const tr of others) {
    let near = false;
    for (let i = 0; i < ego.t.length && !near; i++) {
      const t = ego.t[i]!;
      if (t < t0 - 1e-9 || t > t1 + 1e-9) continue;
      const p = positionAt(tr, t);
      if (p && Math.abs(p.x - ego.x[i]!) <= o.longitudinalRange && Math.abs(p.y - ego.y[i]!) <= o.lateralRange) near = true;
    }
    if (!near) continue;
    const smp = windowSamples(tr, t0, t1, o.vertexInterval);
    if (smp.length < 2) {
      warnings.push(`track ${tr.id} is near the ego but has fewer than 2 samples in the window; left out`);
      continue;
    }
    actors.push({ name: `t${tr.id}`, track: tr, samples: smp });
  }

  const duration = t1 - t0;
  const name = input.name ?? s.id;
  const lines: string[] = [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<OpenSCENARIO>`,
    `  <FileHeader author="roadsieve" date="${esc(o.date)}" description="${esc(input.description ?? `${name}: recording ${s.recording}, ego ${s.egoTrack}, ${num(t0)}–${num(t1)} s`)}" revMajor="1" revMinor="0"/>`,
    `  <ParameterDeclarations/>`,
    `  <CatalogLocations/>`,
    o.roadNetworkFile ? `  <RoadNetwork>\n    <LogicFile filepath="${esc(o.roadNetworkFile)}"/>\n  </RoadNetwork>` : `  <RoadNetwork/>`,
    `  <Entities>`,
  ];
  for (const a of actors) lines.push(...vehicle(a.name, a.track, Math.max(...a.samples.map((p) => p.v))));
  lines.push(`  </Entities>`, `  <Storyboard>`, `    <Init>`, `      <Actions>`);
  for (const a of actors) {
    const p = a.samples[0]!;
    lines.push(
      `        <Private entityRef="${esc(a.name)}">`,
      `          <PrivateAction>`,
      `            <TeleportAction>`,
      `              <Position>`,
      `                <WorldPosition x="${num(p.x)}" y="${num(p.y)}" z="0.000" h="${num(p.h, 4)}"/>`,
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
    lines.push(
      `        <ManeuverGroup maximumExecutionCount="1" name="${esc(a.name)}-group">`,
      `          <Actors selectTriggeringEntities="false">`,
      `            <EntityRef entityRef="${esc(a.name)}"/>`,
      `          </Actors>`,
      `          <Maneuver name="${esc(a.name)}-maneuver">`,
      `            <Event name="${esc(a.name)}-follow" priority="overwrite">`,
      `              <Action name="${esc(a.name)}-trajectory">`,
      `                <PrivateAction>`,
      `                  <RoutingAction>`,
      `                    <FollowTrajectoryAction>`,
      `                      <Trajectory closed="false" name="${esc(a.name)}-recorded">`,
      `                        <Shape>`,
      `                          <Polyline>`,
    );
    for (const p of a.samples)
      lines.push(
        `                            <Vertex time="${num(p.t - t0, 4)}">`,
        `                              <Position>`,
        `                                <WorldPosition x="${num(p.x)}" y="${num(p.y)}" z="0.000" h="${num(p.h, 4)}"/>`,
        `                              </Position>`,
        `                            </Vertex>`,
      );
    lines.push(
      `                          </Polyline>`,
      `                        </Shape>`,
      `                      </Trajectory>`,
      `                      <TimeReference>`,
      `                        <Timing domainAbsoluteRelative="absolute" offset="0" scale="1"/>`,
      `                      </TimeReference>`,
      `                      <TrajectoryFollowingMode followingMode="position"/>`,
      `                    </FollowTrajectoryAction>`,
      `                  </RoutingAction>`,
      `                </PrivateAction>`,
      `              </Action>`,
      ...simTimeTrigger("StartTrigger", `${a.name}-start`, 0, "none", "              "),
      `            </Event>`,
      `          </Maneuver>`,
      `        </ManeuverGroup>`,
    );
  }
  lines.push(...simTimeTrigger("StartTrigger", "act-start", 0, "none", "        "), `      </Act>`, `    </Story>`);
  lines.push(...simTimeTrigger("StopTrigger", "window-end", duration, "rising", "    "), `  </Storyboard>`, `</OpenSCENARIO>`);
  return { xml: `${lines.join("\n")}\n`, actors: actors.map((a) => a.name), warnings };
}

/**
 * Write one OpenSCENARIO file per test case ("<test case id>.xosc") into `dir`, atomically.
 * `tracksOf(recording)` returns the tracks of a recording. Returns the paths written; test cases
 * whose ego track cannot be exported are reported in `warnings` and skipped.
 */
export async function writeOpenScenarioFiles(
  plan: TestPlan,
  scenarios: readonly Scenario[],
  tracksOf: (recording: string) => readonly Track[],
  dir: string,
  options: OpenScenarioOptions = {},
): Promise<{ paths: string[]; warnings: string[] }> {
  const paths: string[] = [];
  const warnings: string[] = [];
  for (const tc of plan.testCases) {
    const s = scenarios[tc.scenarioIndex];
    if (!s || s.id !== tc.scenarioId) throw new InputError(`test case ${tc.id} refers to scenario ${tc.scenarioIndex} ("${tc.scenarioId}"), which the scenario list does not hold`);
    try {
      const r = openScenarioXml({ scenario: s, tracks: tracksOf(s.recording), name: tc.id, description: `${tc.id} (${tc.role}): ${tc.reasons.join("; ")}` }, options);
      const path = join(dir, `${tc.id}.xosc`);
      await writeFileAtomic(path, r.xml);
      paths.push(path);
      warnings.push(...r.warnings.map((w) => `${tc.id}: ${w}`));
    } catch (e) {
      if (!(e instanceof InputError)) throw e;
      warnings.push(`${tc.id}: not exported: ${e.message}`);
    }
  }
  return { paths, warnings };
}
