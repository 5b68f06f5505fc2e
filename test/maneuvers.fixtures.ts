/**
 * Hand-built tracks for the maneuver, scene and scenario tests: a straight three-lane road with
 * 3.75 m lanes (common practice for motorways), lateral movements along the minimum-jerk profile
 * (Flash & Hogan 1985), optional Gaussian position noise from the seeded Rng.
 */
import type { Recording, Track } from "../src/recording/types.js";
import { Rng } from "../src/core/rng.js";
import { assignLanes } from "../src/kinematics/assignLanes.js";

export const MARKINGS = [0, 3.75, 7.5, 11.25];
export const laneCentre = (lane: number): number => 1.875 + 3.75 * lane;

export function minimumJerk(tau: number): number {
  if (tau <= 0) return 0;
  if (tau >= 1) return 1;
  return tau * tau * tau * (10 - 15 * tau + 6 * tau * tau);
}

/** Constant lateral speed (ramp) and half-cosine profiles, the other shapes of issue 11. */
export const constantSpeed = (tau: number): number => (tau <= 0 ? 0 : tau >= 1 ? 1 : tau);
export const sinusoidal = (tau: number): number => (tau <= 0 ? 0 : tau >= 1 ? 1 : 0.5 * (1 - Math.cos(Math.PI * tau)));

export interface LateralMove {
  /** Start time (s), duration (s), displacement (m, + to the left). */
  t0: number;
  duration: number;
  d: number;
  /** Profile of the move (default minimum-jerk). */
  shape?: "minimum-jerk" | "constant-speed" | "sinusoidal";
}

export interface TrackSpec {
  id: number;
  tStart?: number;
  duration: number;
  rate?: number;
  x0?: number;
  v0: number;
  /** Piecewise-constant acceleration phases [from, to, a] (s, s, m/s²). */
  accel?: Array<[number, number, number]>;
  lane0: number;
  moves?: LateralMove[];
  length?: number;
  noiseSd?: number;
  seed?: number;
  /** Samples with t in (from, to) are removed: a time gap. */
  gap?: [number, number];
  kind?: Track["kind"];
  /** Extra lateral offset as a function of time (m), e.g. a vehicle riding on a marking. */
  lateral?: (t: number) => number;
}

/** Exact acceleration of a spec at time t. */
export function specAccel(spec: TrackSpec, t: number): number {
  let a = 0;
  for (const [from, to, v] of spec.accel ?? []) if (t >= from && t < to) a += v;
  return a;
}

/** Exact lateral position of a spec at time t. */
export function specY(spec: TrackSpec, t: number): number {
  let y = laneCentre(spec.lane0);
  for (const m of spec.moves ?? []) {
    const f = m.shape === "constant-speed" ? constantSpeed : m.shape === "sinusoidal" ? sinusoidal : minimumJerk;
    y += m.d * f((t - m.t0) / m.duration);
  }
  return y + (spec.lateral ? spec.lateral(t) : 0);
}

export function buildTrack(spec: TrackSpec): Track {
  const rate = spec.rate ?? 25;
  const t0 = spec.tStart ?? 0;
  const n = Math.round(spec.duration * rate) + 1;
  const rng = new Rng(spec.seed ?? spec.id);
  const ts: number[] = [];
  const xs: number[] = [];
  const ys: number[] = [];
  const vs: number[] = [];
  const as: number[] = [];
  let x = spec.x0 ?? 0;
  let v = spec.v0;
  const sub = 20;
  for (let i = 0; i < n; i++) {
    const t = t0 + i / rate;
    if (i > 0) {
      // Integrate the piecewise-constant acceleration finely (exact for constant phases).
      const h = 1 / rate / sub;
      for (let k = 0; k < sub; k++) {
        const a = specAccel(spec, t - 1 / rate + (k + 0.5) * h);
        x += v * h + 0.5 * a * h * h;
        v += a * h;
      }
    }
    if (spec.gap && t > spec.gap[0] && t < spec.gap[1]) continue;
    const noise = spec.noiseSd ?? 0;
    ts.push(Math.round(t * 1e6) / 1e6);
    xs.push(x + (noise > 0 ? rng.normal(0, noise) : 0));
    ys.push(specY(spec, t) + (noise > 0 ? rng.normal(0, noise) : 0));
    vs.push(v);
    as.push(specAccel(spec, t));
  }
  const y = Float64Array.from(ys);
  return {
    id: spec.id,
    recording: "hand",
    kind: spec.kind ?? "car",
    length: spec.length ?? 4.5,
    width: 1.8,
    t: Float64Array.from(ts),
    x: Float64Array.from(xs),
    y,
    vx: Float64Array.from(vs),
    vy: new Float64Array(ts.length),
    ax: Float64Array.from(as),
    ay: new Float64Array(ts.length),
    lane: assignLanes(y, MARKINGS),
  };
}

export function buildRecording(tracks: Track[], rate = 25): Recording {
  return {
    id: "hand",
    source: "generated",
    checksum: "0",
    road: { name: "Orrowind Motorway test stretch", laneMarkings: MARKINGS, frameRate: rate },
    tracks,
    rejected: [],
    warnings: [],
  };
}
