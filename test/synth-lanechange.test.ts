import { beforeAll, describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { LAT_KEEP, LAT_LEFT, LAT_RIGHT } from "../src/maneuvers/labels.js";
import { generateTraffic, type GeneratedTraffic } from "../src/synth/generateTraffic.js";
import { quinticCurvature, quinticShape, quinticSlope, sampleLaneChangeDuration } from "../src/synth/lateral.js";
import { DEFAULT_TRAFFIC_OPTIONS } from "../src/synth/options.js";

// Literature figure (naturalistic lane-change studies, e.g. Lee, Olsen & Wierwille 2004, NHTSA report
// DOT HS 809 702; figures from memory): mean duration about 5–6 s, most lane changes between 2 and 10 s.
const LIT_MEAN: [number, number] = [5, 6];
const LIT_RANGE: [number, number] = [2, 10];
const LIT_SHARE = 0.9;

describe("minimum-jerk lateral profile (Flash & Hogan 1985)", () => {
  it("quinticShape is 10τ³ − 15τ⁴ + 6τ⁵: rest to rest, symmetric, peak slope 15/8 at τ = 0.5", () => {
    expect(quinticShape(0)).toBe(0);
    expect(quinticShape(1)).toBe(1);
    expect(quinticShape(0.5)).toBeCloseTo(0.5, 15);
    // τ = 0.25: 10/64 − 15/256 + 6/1024 = 0.15625 − 0.05859375 + 0.005859375 = 0.103515625
    expect(quinticShape(0.25)).toBeCloseTo(0.103515625, 15);
    expect(quinticShape(0.75)).toBeCloseTo(1 - 0.103515625, 15);
    expect(quinticSlope(0)).toBe(0);
    expect(quinticSlope(1)).toBe(0);
    expect(quinticSlope(0.5)).toBeCloseTo(15 / 8, 15);
    expect(quinticCurvature(0.5)).toBeCloseTo(0, 12);
    // Derivatives agree with central differences of the shape.
    for (const tau of [0.1, 0.3, 0.6, 0.9]) {
      const h = 1e-5;
      expect(quinticSlope(tau)).toBeCloseTo((quinticShape(tau + h) - quinticShape(tau - h)) / (2 * h), 6);
      expect(quinticCurvature(tau)).toBeCloseTo((quinticSlope(tau + h) - quinticSlope(tau - h)) / (2 * h), 5);
    }
  });
});

describe("lane-change durations", () => {
  it("sampleLaneChangeDuration with the default options matches the literature figure", () => {
    const o = DEFAULT_TRAFFIC_OPTIONS;
    const rng = new Rng(42);
    const n = 20000;
    let sum = 0;
    let within = 0;
    for (let i = 0; i < n; i++) {
      const d = sampleLaneChangeDuration(rng, o.laneChangeDurationMean, o.laneChangeDurationSd, o.laneChangeDurationMin, o.laneChangeDurationMax);
      sum += d;
      if (d >= LIT_RANGE[0] && d <= LIT_RANGE[1]) within++;
    }
    expect(sum / n).toBeGreaterThanOrEqual(LIT_MEAN[0]);
    expect(sum / n).toBeLessThanOrEqual(LIT_MEAN[1]);
    expect(within / n).toBeGreaterThanOrEqual(LIT_SHARE);
  });
});

describe("generateTraffic lane changes", () => {
  let g: GeneratedTraffic;
  beforeAll(() => {
    g = generateTraffic({ vehicleKm: 150, positionNoiseSd: 0, hardBrakingRate: 0.03, tightCutInRate: 0.03 }, new Rng(101));
  });

  it("executed lane changes (complete, not planted) match the literature duration figure", () => {
    const planted = new Set(g.truth.planted.filter((p) => p.kind === "tight-cut-in").map((p) => `${p.trackId}@${p.tStart}`));
    const d = g.truth.laneChanges.filter((l) => !l.partial && !planted.has(`${l.trackId}@${l.tStart}`)).map((l) => l.tEnd - l.tStart);
    expect(d.length).toBeGreaterThan(60);
    const mean = d.reduce((a, b) => a + b, 0) / d.length;
    expect(mean).toBeGreaterThanOrEqual(LIT_MEAN[0]);
    expect(mean).toBeLessThanOrEqual(LIT_MEAN[1]);
    expect(d.filter((x) => x >= LIT_RANGE[0] && x <= LIT_RANGE[1]).length / d.length).toBeGreaterThanOrEqual(LIT_SHARE);
  });

  it("the lane index in the tracks changes from fromLane to toLane exactly at tCross", () => {
    const byId = new Map(g.recording.tracks.map((t) => [t.id, t]));
    let checked = 0;
    for (const lc of g.truth.laneChanges) {
      const tr = byId.get(lc.trackId)!;
      expect(Math.abs(lc.toLane - lc.fromLane)).toBe(1);
      expect(lc.direction).toBe(lc.toLane > lc.fromLane ? "left" : "right");
      expect(lc.tStart).toBeLessThan(lc.tCross);
      expect(lc.tCross).toBeLessThan(lc.tEnd);
      const first = tr.t[0]!;
      const last = tr.t[tr.t.length - 1]!;
      if (lc.tCross <= first || lc.tCross > last) continue;
      checked++;
      let wrong = 0;
      for (let k = 0; k < tr.t.length; k++) {
        const t = tr.t[k]!;
        if (t >= Math.max(lc.tStart, first) && t < lc.tCross && tr.lane[k] !== lc.fromLane) wrong++;
        if (t >= lc.tCross && t <= lc.tEnd && tr.lane[k] !== lc.toLane) wrong++;
      }
      expect(wrong).toBe(0);
      // The clean centre position is on the matching side of the marking (1 mm rounding aside).
      const marking = g.options.laneWidth * Math.max(lc.fromLane, lc.toLane);
      const sign = lc.direction === "left" ? 1 : -1;
      for (let k = 0; k < tr.t.length; k++) {
        const t = tr.t[k]!;
        if (t < lc.tStart || t > lc.tEnd) continue;
        const side = sign * (tr.y[k]! - marking);
        if (Math.abs(side) < 0.002) continue;
        expect(side > 0).toBe(t >= lc.tCross);
      }
    }
    expect(checked).toBeGreaterThan(50);
  });

  it("per-frame lateral labels are lane change exactly on frames with tStart <= t <= tEnd", () => {
    const byTrack = new Map<number, typeof g.truth.laneChanges>();
    for (const lc of g.truth.laneChanges) byTrack.set(lc.trackId, [...(byTrack.get(lc.trackId) ?? []), lc]);
    let labelled = 0;
    let wrong = 0;
    for (let i = 0; i < g.recording.tracks.length; i++) {
      const tr = g.recording.tracks[i]!;
      const lab = g.truth.tracks[i]!.lateral;
      for (let k = 0; k < tr.t.length; k++) {
        const t = tr.t[k]!;
        let expected = LAT_KEEP;
        for (const lc of byTrack.get(tr.id) ?? []) {
          if (t >= lc.tStart && t <= lc.tEnd) expected = lc.direction === "left" ? LAT_LEFT : LAT_RIGHT;
        }
        if (lab[k] !== expected) wrong++;
        if (expected !== LAT_KEEP) labelled++;
      }
    }
    expect(wrong).toBe(0);
    expect(labelled).toBeGreaterThan(1000);
  });

  it("lateral speed during a lane change peaks near 15/8 · Δy / D (minimum-jerk profile)", () => {
    const byId = new Map(g.recording.tracks.map((t) => [t.id, t]));
    let checked = 0;
    for (const lc of g.truth.laneChanges) {
      if (lc.partial) continue;
      const tr = byId.get(lc.trackId)!;
      let peak = 0;
      for (let k = 0; k < tr.t.length; k++) if (tr.t[k]! >= lc.tStart && tr.t[k]! <= lc.tEnd) peak = Math.max(peak, Math.abs(tr.vy[k]!));
      // Δy is one lane width plus the change of the in-lane weave (≤ 2 × 0.15 m for the defaults).
      const d = lc.tEnd - lc.tStart;
      const nominal = (15 / 8) * (g.options.laneWidth / d);
      expect(peak).toBeGreaterThan(nominal * 0.85);
      expect(peak).toBeLessThan(nominal * 1.15);
      checked++;
    }
    expect(checked).toBeGreaterThan(50);
  });
});
