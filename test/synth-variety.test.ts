/**
 * The generator's variety options (issue 11): traffic unlike our defaults, and the independent
 * longitudinal ground truth. References: the profile formulas themselves (ramp, half-cosine), the
 * generator's own ground truth, and a worked example of the 2 s mean.
 */
import { describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "../src/maneuvers/labels.js";
import { generateTraffic, type GeneratedTraffic } from "../src/synth/generateTraffic.js";
import { labelLongitudinalIndependent } from "../src/synth/labelLongitudinalIndependent.js";
import { shapeInverse, shapeSlope, shapeValue } from "../src/synth/lateral.js";
import { recordedOptions, resolveTrafficOptions, VARIETY_KEYS, type TrafficOptions } from "../src/synth/options.js";
import type { TruthLaneChange } from "../src/synth/types.js";

const small = (o: Partial<TrafficOptions>, seed = 11): GeneratedTraffic =>
  generateTraffic({ vehicleKm: 40, hardBrakingRate: 0, tightCutInRate: 0, weaveAmplitude: 0, ...o }, new Rng(seed));

/** Clean y of a track at the frames inside [t0, t1]. */
function samples(g: GeneratedTraffic, lc: TruthLaneChange): Array<[number, number]> {
  const tr = g.recording.tracks.find((t) => t.id === lc.trackId)!;
  const out: Array<[number, number]> = [];
  for (let i = 0; i < tr.t.length; i++) if (tr.t[i]! >= lc.tStart && tr.t[i]! <= lc.tEnd) out.push([tr.t[i]!, tr.y[i]!]);
  return out;
}

describe("lateral profile shapes", () => {
  it("constant speed is s = τ and half-cosine is (1 − cos πτ)/2, with their slopes and inverses", () => {
    for (const tau of [0.1, 0.25, 0.5, 0.8]) {
      expect(shapeValue(1, tau)).toBeCloseTo(tau, 15);
      expect(shapeValue(2, tau)).toBeCloseTo(0.5 * (1 - Math.cos(Math.PI * tau)), 15);
      expect(shapeSlope(1, tau)).toBe(1);
      const h = 1e-6;
      expect(shapeSlope(2, tau)).toBeCloseTo((shapeValue(2, tau + h) - shapeValue(2, tau - h)) / (2 * h), 6);
      for (const k of [0, 1, 2] as const) expect(shapeValue(k, shapeInverse(k, shapeValue(k, tau)))).toBeCloseTo(shapeValue(k, tau), 9);
    }
    // Half-cosine at τ = 1/3: (1 − cos 60°)/2 = 1/4.
    expect(shapeValue(2, 1 / 3)).toBeCloseTo(0.25, 15);
  });
});

describe("variety options of the generator", () => {
  it("are off by default: no profile or case in the truth, no rider list, options recorded as before", () => {
    const g = small({});
    expect(g.truth.laneChanges.length).toBeGreaterThan(5);
    for (const lc of g.truth.laneChanges) {
      expect(lc.profile).toBeUndefined();
      expect(lc.case).toBeUndefined();
    }
    expect(g.truth.markingRiders).toBeUndefined();
    const rec = recordedOptions(g.options);
    for (const k of VARIETY_KEYS) expect(k in rec).toBe(false);
  });

  it("constant-speed lane changes move linearly from start to end, crossing the marking on the line", () => {
    const g = small({ constantSpeedShare: 1 });
    const whole = g.truth.laneChanges.filter((lc) => !lc.partial);
    expect(whole.length).toBeGreaterThan(5);
    for (const lc of whole) {
      expect(lc.profile).toBe("constant-speed");
      const s = samples(g, lc);
      const [ta, ya] = s[0]!;
      const [tb, yb] = s[s.length - 1]!;
      // Straight line through the first and last frame (positions rounded to 1 mm).
      for (const [t, y] of s) expect(Math.abs(y - (ya + ((yb - ya) * (t - ta)) / (tb - ta)))).toBeLessThan(0.003);
      // The crossing: the line meets the marking at tCross.
      const marking = 3.75 * Math.max(lc.fromLane, lc.toLane);
      const tLine = ta + ((marking - ya) * (tb - ta)) / (yb - ya);
      expect(Math.abs(tLine - lc.tCross)).toBeLessThan(0.02);
    }
  });

  it("half-cosine lane changes follow y0 + D(1 − cos πτ)/2", () => {
    const g = small({ sinusoidalShare: 1 });
    const whole = g.truth.laneChanges.filter((lc) => !lc.partial);
    expect(whole.length).toBeGreaterThan(5);
    for (const lc of whole) {
      expect(lc.profile).toBe("sinusoidal");
      const tr = g.recording.tracks.find((t) => t.id === lc.trackId)!;
      const at = (t: number): number => tr.y[Math.round((t - tr.t[0]!) * 25)]!;
      // tStart/tEnd lie on frames only up to rounding: compare at frames, with the model anchored there.
      const s = samples(g, lc);
      const [ta, ya] = s[0]!;
      const D = at(lc.tEnd) - ya;
      const T = lc.tEnd - lc.tStart;
      for (const [t, y] of s) expect(Math.abs(y - (ya + D * 0.5 * (1 - Math.cos((Math.PI * (t - lc.tStart)) / T))))).toBeLessThan(0.02 + Math.abs(ta - lc.tStart) * 2);
    }
  });

  it("double lane changes: a second change in the same direction after a pause of at most doubleLaneChangePauseMax", () => {
    const g = small({ doubleLaneChangeShare: 1, doubleLaneChangePauseMax: 2.4 }, 5);
    const firsts = g.truth.laneChanges.filter((lc) => lc.case === "double-first");
    expect(firsts.length).toBeGreaterThan(2);
    let onTime = 0;
    let pairs = 0;
    for (const a of firsts) {
      const b = g.truth.laneChanges.find((lc) => lc.case === "double-second" && lc.trackId === a.trackId && lc.tStart >= a.tEnd - 1e-9);
      if (!b) continue; // the second lies after the track's end
      expect(b.direction).toBe(a.direction);
      expect(b.fromLane).toBe(a.toLane);
      expect(b.tStart - a.tEnd).toBeGreaterThanOrEqual(-1e-9);
      // Pause drawn in [0, 2.4] s (plus one 40 ms step); while the target lane has no room the
      // second waits up to 3 s more, then is dropped.
      pairs++;
      if (b.tStart - a.tEnd <= 2.4 + 0.041) onTime++;
      expect(b.tStart - a.tEnd).toBeLessThanOrEqual(2.4 + 3 + 0.041);
    }
    expect(onTime / pairs).toBeGreaterThan(0.7);
  });

  it("marking riders keep their lane and spend seconds within 0.3 m of a marking", () => {
    const g = small({ markingRiderShare: 1, vehicleKm: 60 });
    const riders = new Set(g.truth.markingRiders);
    expect(riders.size).toBeGreaterThan(10);
    let riding = 0;
    for (const tr of g.recording.tracks) {
      if (!riders.has(tr.id)) continue;
      expect(g.truth.laneChanges.some((lc) => lc.trackId === tr.id)).toBe(false);
      let near = 0;
      for (let i = 0; i < tr.y.length; i++) if ([3.75, 7.5].some((m) => Math.abs(tr.y[i]! - m) < 0.3)) near++;
      if (near >= 5 * 25) riding++;
    }
    expect(riding).toBeGreaterThan(riders.size / 4);
  });

  it("edge lane changes make vehicles enter or leave the section mid-maneuver", () => {
    const g = small({ edgeLaneChangeShare: 1 });
    const edge = g.truth.laneChanges.filter((lc) => lc.case === "edge");
    expect(edge.length).toBeGreaterThan(10);
    expect(edge.filter((lc) => lc.partial).length / edge.length).toBeGreaterThan(0.5);
  });

  it("trucks change lanes truckLaneChangeFactor times slower", () => {
    // All trucks, with spread desired speeds and every lane open, so that they overtake each other.
    const trucks = { truckShare: 1, truckLanes: 3, truckSpeedMean: 24, truckSpeedSd: 4, truckSpeedMin: 16, truckSpeedMax: 32, vehicleKm: 80 };
    const base = small(trucks, 3);
    const slow = small({ ...trucks, truckLaneChangeFactor: 2 }, 3);
    const mean = (g: GeneratedTraffic): number => {
      const ids = new Set(g.recording.tracks.filter((t) => t.kind === "truck").map((t) => t.id));
      const d = g.truth.laneChanges.filter((lc) => ids.has(lc.trackId) && !lc.partial).map((lc) => lc.tEnd - lc.tStart);
      expect(d.length).toBeGreaterThan(5);
      return d.reduce((a, b) => a + b, 0) / d.length;
    };
    // Same draws scaled by 2 (the recorded subset differs a little, so only a broad ratio).
    expect(mean(slow) / mean(base)).toBeGreaterThan(1.6);
  });

  it("validates the new options", () => {
    expect(() => resolveTrafficOptions({ constantSpeedShare: 0.7, sinusoidalShare: 0.4 })).toThrow(InputError);
    expect(() => resolveTrafficOptions({ truckLaneChangeFactor: 0.5 })).toThrow(/truckLaneChangeFactor=0.5 should be in \[1, 5\]/);
  });
});

describe("independent longitudinal labels (2 s mean against ±0.3 m/s², docs/synth.md)", () => {
  it("labels a 0.5 m/s² step of 4 s as in the worked example", () => {
    // 25 Hz; a = 0.5 on samples 50..149. The 2 s window holds 51 samples (±25); accelerate where
    // 0.5·k/51 >= 0.3, i.e. k >= 31 step samples in the window: from sample 55 to sample 144.
    const ax = new Float64Array(250);
    ax.fill(0.5, 50, 150);
    const l = labelLongitudinalIndependent(ax, 25);
    for (let i = 0; i < 250; i++) expect(l[i]).toBe(i >= 55 && i <= 144 ? LON_ACCELERATE : LON_KEEP);
    ax.fill(-0.5, 50, 150);
    const d = labelLongitudinalIndependent(ax, 25);
    expect(d[54]).toBe(LON_KEEP);
    expect(d[55]).toBe(LON_DECELERATE);
    // No minimum duration: a 1.4 s pulse of 0.5 m/s² gives 35·0.5/51 = 0.343 >= 0.3 at its centre.
    const p = new Float64Array(100);
    p.fill(0.5, 40, 75);
    expect(labelLongitudinalIndependent(p, 25)[57]).toBe(LON_ACCELERATE);
  });
});
