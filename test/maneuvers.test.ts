import { describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { detectManeuvers, detectAllManeuvers, fitPolynomial, LAT_KEEP, LAT_LEFT, LAT_RIGHT, LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "../src/maneuvers/index.js";
import type { ManeuverSegment, TrackManeuvers } from "../src/maneuvers/index.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { buildScenes } from "../src/scene/buildScenes.js";
import { positionsOnly, scoreManeuvers } from "../bench/maneuvers.js";
import { runPython, sklearnMissing } from "./helpers/sklearn.js";
import { buildTrack, MARKINGS, minimumJerk, specAccel, specY, type TrackSpec } from "./maneuvers.fixtures.js";

const opts = { laneMarkings: MARKINGS };
const laneChanges = (m: TrackManeuvers): ManeuverSegment[] => m.segments.filter((g) => g.axis === "lateral" && g.maneuver !== "lane-keep");
const lon = (m: TrackManeuvers): ManeuverSegment[] => m.segments.filter((g) => g.axis === "longitudinal");

/** Share of samples whose lateral label equals the true one (lane change on tStart <= t <= tEnd). */
function lateralAgreement(spec: TrackSpec, m: TrackManeuvers, t: Float64Array): number {
  let ok = 0;
  for (let i = 0; i < t.length; i++) {
    let truth = LAT_KEEP;
    for (const mv of spec.moves ?? []) if (t[i]! >= mv.t0 && t[i]! <= mv.t0 + mv.duration) truth = mv.d > 0 ? LAT_LEFT : LAT_RIGHT;
    if (m.lateral[i] === truth) ok++;
  }
  return ok / t.length;
}

describe("detectManeuvers: lateral", () => {
  it("finds one clean lane change to the left under 0.1 m position noise, with its boundaries and shape", () => {
    const spec: TrackSpec = { id: 1, duration: 30, v0: 30, lane0: 0, moves: [{ t0: 10, duration: 5, d: 3.75 }], noiseSd: 0.1 };
    const tr = buildTrack(spec);
    const m = detectManeuvers(tr, opts);
    const lcs = laneChanges(m);
    expect(lcs).toHaveLength(1);
    const lc = lcs[0]!;
    expect(lc.maneuver).toBe("lane-change-left");
    // Boundaries within the issue's 0.3 s; the crossing of a symmetric minimum-jerk move is its midpoint.
    expect(Math.abs(lc.tStart - 10)).toBeLessThanOrEqual(0.3);
    expect(Math.abs(lc.tEnd - 15)).toBeLessThanOrEqual(0.3);
    expect(lc.laneChange!.tCross).toBeCloseTo(12.5, 1);
    expect(lc.laneChange!.fromLane).toBe(0);
    expect(lc.laneChange!.toLane).toBe(1);
    expect(lc.laneChange!.displacement).toBeGreaterThan(3.5);
    expect(lc.laneChange!.displacement).toBeLessThan(4.0);
    // Peak speed of the minimum-jerk profile is 1.875 × the mean speed D/T (Flash & Hogan 1985): 1.406 m/s.
    expect(lc.laneChange!.peakLateralSpeed).toBeGreaterThan(1.3);
    expect(lc.laneChange!.peakLateralSpeed).toBeLessThan(1.5);
    expect(lc.flags).toEqual([]);
    expect(lateralAgreement(spec, m, tr.t)).toBeGreaterThan(0.97);
    // Speed kept: no false longitudinal maneuver from the noise.
    expect(lon(m).map((g) => g.maneuver)).toEqual(["keep"]);
    expect(m.warnings).toEqual([]);
  });

  it("fits the quintic 10τ³ − 15τ⁴ + 6τ⁵ (times D) to a noise-free minimum-jerk lane change", () => {
    const tr = buildTrack({ id: 2, duration: 30, v0: 30, lane0: 1, moves: [{ t0: 8, duration: 6, d: -3.75 }] });
    const lc = laneChanges(detectManeuvers(tr, opts))[0]!;
    expect(lc.maneuver).toBe("lane-change-right");
    expect(lc.tStart).toBeCloseTo(8, 1);
    expect(lc.tEnd).toBeCloseTo(14, 1);
    const c = lc.laneChange!.poly;
    // Minimum-jerk profile coefficients (Flash & Hogan 1985) scaled by D = −3.75 m; the fit runs over
    // the detected [tStart, tEnd], within a sample of the true one, so the match is close, not exact.
    expect(c[0]!).toBeCloseTo(0, 1);
    expect(c[1]!).toBeCloseTo(0, 0);
    expect(Math.abs(c[3]! - 10 * -3.75)).toBeLessThan(2);
    expect(Math.abs(c[4]! - -15 * -3.75)).toBeLessThan(4);
    expect(Math.abs(c[5]! - 6 * -3.75)).toBeLessThan(2.5);
    expect(lc.laneChange!.polyResidual).toBeLessThan(0.02);
  });

  it("does not call an aborted lane change (drift to the marking and back) a lane change", () => {
    // Drift 1.5 m left (to 0.075 m short of the marking) and back.
    const spec: TrackSpec = { id: 3, duration: 30, v0: 28, lane0: 0, moves: [{ t0: 8, duration: 3, d: 1.8 }, { t0: 12, duration: 3, d: -1.8 }], noiseSd: 0.1 };
    const m = detectManeuvers(buildTrack(spec), opts);
    expect(laneChanges(m)).toEqual([]);
    expect(m.lateral.every((c) => c === LAT_KEEP)).toBe(true);
    // Crossing the marking for under minLaneHoldS (0.6 s) and returning is no lane change either.
    const touch: TrackSpec = { id: 4, duration: 30, v0: 28, lane0: 0, moves: [{ t0: 8, duration: 3, d: 1.95 }, { t0: 10.5, duration: 3, d: -1.95 }] };
    const t = buildTrack(touch);
    const over = Array.from(t.t).filter((time) => specY(touch, time) >= MARKINGS[1]!).length / 25;
    expect(over).toBeGreaterThan(0.2);
    expect(over).toBeLessThan(0.6);
    expect(laneChanges(detectManeuvers(t, opts))).toEqual([]);
  });

  it("separates two lane changes in a row", () => {
    const spec: TrackSpec = { id: 5, duration: 35, v0: 32, lane0: 0, moves: [{ t0: 8, duration: 4, d: 3.75 }, { t0: 15, duration: 5, d: 3.75 }], noiseSd: 0.1 };
    const tr = buildTrack(spec);
    const m = detectManeuvers(tr, opts);
    const lcs = laneChanges(m);
    expect(lcs.map((g) => [g.maneuver, g.laneChange!.fromLane, g.laneChange!.toLane])).toEqual([
      ["lane-change-left", 0, 1],
      ["lane-change-left", 1, 2],
    ]);
    // 0.4 s, not 0.3: the default boundary does not assume the minimum-jerk shape, and the
    // half-cosine fit (indistinguishable at 0.1 m noise) starts 0.077·T later (scipy fit, noise-free);
    // the weighted boundaries may sit up to that far inside (see maneuvers.defects.test.ts).
    expect(Math.abs(lcs[0]!.tStart - 8)).toBeLessThanOrEqual(0.4);
    expect(Math.abs(lcs[0]!.tEnd - 12)).toBeLessThanOrEqual(0.4);
    expect(Math.abs(lcs[1]!.tStart - 15)).toBeLessThanOrEqual(0.4);
    expect(Math.abs(lcs[1]!.tEnd - 20)).toBeLessThanOrEqual(0.4);
    expect(lcs[0]!.endFrame).toBeLessThan(lcs[1]!.startFrame);
    // Lateral segments tile the track: keep, left, keep, left, keep.
    expect(m.segments.filter((g) => g.axis === "lateral").map((g) => g.maneuver)).toEqual(["lane-keep", "lane-change-left", "lane-keep", "lane-change-left", "lane-keep"]);
  });

  it("finds a lane change while braking and labels the braking", () => {
    const spec: TrackSpec = {
      id: 6,
      duration: 30,
      v0: 30,
      lane0: 1,
      moves: [{ t0: 10, duration: 5, d: -3.75 }],
      accel: [[8, 16, -2]],
      noiseSd: 0.1,
    };
    const tr = buildTrack(spec);
    const m = detectManeuvers(tr, opts);
    const lcs = laneChanges(m);
    expect(lcs).toHaveLength(1);
    expect(lcs[0]!.maneuver).toBe("lane-change-right");
    expect(Math.abs(lcs[0]!.tStart - 10)).toBeLessThanOrEqual(0.3);
    expect(Math.abs(lcs[0]!.tEnd - 15)).toBeLessThanOrEqual(0.3);
    const dec = lon(m).filter((g) => g.maneuver === "decelerate");
    expect(dec).toHaveLength(1);
    // A 3 s smoothing window blurs a step of the acceleration by up to about half a window.
    expect(Math.abs(dec[0]!.tStart - 8)).toBeLessThan(1);
    expect(Math.abs(dec[0]!.tEnd - 16)).toBeLessThan(1);
    expect(dec[0]!.peakAccel).toBeCloseTo(-2, 0);
    expect(dec[0]!.startSpeed).toBeGreaterThan(28);
    expect(dec[0]!.endSpeed).toBeLessThan(16);
    expect(dec[0]!.flags).not.toContain("harsh-braking");
    // Per-frame labels against the definition applied to the exact acceleration (hysteresis 0.25/0.15).
    let ok = 0;
    let state = LON_KEEP;
    for (let i = 0; i < tr.t.length; i++) {
      const a = specAccel(spec, tr.t[i]!);
      if (a >= 0.25) state = LON_ACCELERATE;
      else if (a <= -0.25) state = LON_DECELERATE;
      else if (state !== LON_KEEP && Math.abs(a) < 0.15) state = LON_KEEP;
      if (m.longitudinal[i] === state) ok++;
    }
    expect(ok / tr.t.length).toBeGreaterThan(0.93);
  });

  it("flags braking harder than decelAbove (3 m/s², common practice)", () => {
    const m = detectManeuvers(buildTrack({ id: 7, duration: 20, v0: 30, lane0: 1, accel: [[6, 10, -5]], noiseSd: 0.1 }), opts);
    const dec = lon(m).filter((g) => g.maneuver === "decelerate");
    expect(dec).toHaveLength(1);
    expect(dec[0]!.flags).toContain("harsh-braking");
    const mild = detectManeuvers(buildTrack({ id: 7, duration: 20, v0: 30, lane0: 1, accel: [[6, 10, -5]], noiseSd: 0.1 }), { ...opts, decelAbove: 6 });
    expect(lon(mild).find((g) => g.maneuver === "decelerate")!.flags).not.toContain("harsh-braking");
  });

  it("leaves a track too short to judge unlabelled, with a warning", () => {
    const tr = buildTrack({ id: 8, duration: 0.6, v0: 30, lane0: 0, noiseSd: 0.1 });
    const m = detectManeuvers(tr, opts);
    expect(m.segments).toEqual([]);
    expect(m.warnings.join(" ")).toMatch(/too short to judge/);
    expect(Array.from(m.longitudinal).every((c) => c === LON_KEEP)).toBe(true);
    expect(Array.from(m.lateral).every((c) => c === LAT_KEEP)).toBe(true);
  });

  it("judges the runs on either side of a time gap separately", () => {
    const spec: TrackSpec = { id: 9, duration: 45, v0: 30, lane0: 0, moves: [{ t0: 28, duration: 5, d: 3.75 }], gap: [20, 25], noiseSd: 0.1 };
    const tr = buildTrack(spec);
    const m = detectManeuvers(tr, opts);
    expect(m.warnings.join(" ")).toMatch(/time gap/);
    const lcs = laneChanges(m);
    expect(lcs).toHaveLength(1);
    expect(Math.abs(lcs[0]!.tStart - 28)).toBeLessThanOrEqual(0.3);
    expect(Math.abs(lcs[0]!.tEnd - 33)).toBeLessThanOrEqual(0.3);
    // No segment spans the gap.
    for (const g of m.segments) expect(g.tStart >= 25 || g.tEnd <= 20).toBe(true);
  });

  it("flags a lane change longer than maxLaneChangeS, or rejects it on request", () => {
    const spec: TrackSpec = { id: 10, duration: 40, v0: 30, lane0: 0, moves: [{ t0: 10, duration: 14, d: 3.75 }] };
    const tr = buildTrack(spec);
    const flagged = laneChanges(detectManeuvers(tr, { ...opts, maxLaneChangeS: 12 }));
    expect(flagged).toHaveLength(1);
    expect(flagged[0]!.flags).toContain("too-long");
    const rejected = detectManeuvers(tr, { ...opts, maxLaneChangeS: 12, outOfRange: "reject" });
    expect(laneChanges(rejected)).toEqual([]);
    expect(rejected.warnings.join(" ")).toMatch(/rejected/);
  });

  it("uses the threshold boundaries when asked, which start late and end early on a slow lane change", () => {
    const tr = buildTrack({ id: 11, duration: 30, v0: 30, lane0: 0, moves: [{ t0: 8, duration: 8, d: 3.75 }] });
    const thr = laneChanges(detectManeuvers(tr, { ...opts, boundary: "threshold", lateralSpeed: 0.1 }))[0]!;
    // Minimum-jerk speed 30·D/T·τ²(1−τ)² reaches 0.1 m/s at τ ≈ 0.093, i.e. 0.75 s after the start.
    const tau = 0.0932;
    expect(30 * (3.75 / 8) * tau * tau * (1 - tau) * (1 - tau)).toBeCloseTo(0.1, 2);
    expect(thr.tStart).toBeGreaterThan(8.5);
    expect(thr.tEnd).toBeLessThan(15.5);
    const fit = laneChanges(detectManeuvers(tr, opts))[0]!;
    expect(Math.abs(fit.tStart - 8)).toBeLessThan(0.1);
    expect(Math.abs(fit.tEnd - 16)).toBeLessThan(0.1);
  });

  it("validates options with messages quoting the value", () => {
    const tr = buildTrack({ id: 12, duration: 5, v0: 30, lane0: 0 });
    expect(() => detectManeuvers(tr, { keepAccel: -1 })).toThrow(InputError);
    expect(() => detectManeuvers(tr, { keepAccel: -1 })).toThrow(/keepAccel=-1 should be a finite number > 0/);
    expect(() => detectManeuvers(tr, { hysteresis: 0.5 })).toThrow(/hysteresis=0.5 should be >= 0 and <= keepAccel=0.25/);
    expect(() => detectManeuvers(tr, { boundary: "middle" as "profile" })).toThrow(/boundary="middle"/);
  });
});

describe("fitPolynomial", () => {
  it("recovers exact polynomial coefficients", () => {
    const x = Array.from({ length: 50 }, (_, i) => i / 49);
    const y = x.map((v) => 1 - 2 * v + 3 * v ** 3 - 0.5 * v ** 5);
    const f = fitPolynomial(x, y, 5);
    [1, -2, 0, 3, 0, -0.5].forEach((c, k) => expect(f.coefficients[k]!).toBeCloseTo(c, 8));
    expect(f.rms).toBeLessThan(1e-10);
  });

  const reason = sklearnMissing();
  it.skipIf(reason !== null)(`agrees with numpy.polyfit on noisy data${reason ? ` (skipped: ${reason})` : ""}`, () => {
    const rng = new Rng(5);
    const x = Array.from({ length: 80 }, (_, i) => i / 79);
    const y = x.map((v) => 3.75 * minimumJerk(v) + rng.normal(0, 0.1));
    const f = fitPolynomial(x, y, 5);
    const ref = runPython<number[]>(`x=np.array(${JSON.stringify(x)}); y=np.array(${JSON.stringify(y)}); print(json.dumps(np.polyfit(x,y,5)[::-1].tolist()))`);
    ref.forEach((c, k) => expect(f.coefficients[k]!).toBeCloseTo(c, 6));
  });
});

describe("detectAllManeuvers on generated traffic (lower bar on small data)", () => {
  it("meets lower bars against the generator's ground truth with 0.1 m noise", () => {
    // The full targets are measured by `npm run bench -- maneuvers`; 25 vehicle-km here.
    const gen = generateTraffic(
      { vehicleKm: 25, flowPerLane: 800, positionNoiseSd: 0.1, writeVelocities: false, tightCutInRate: 0.1 },
      new Rng(101),
    );
    const rec = positionsOnly(gen.recording);
    const man = detectAllManeuvers(rec);
    const scenes = buildScenes(rec, man);
    const s = scoreManeuvers(rec, gen.truth, man, scenes);
    expect(s.laneChangesTrue).toBeGreaterThan(10);
    expect(s.cutInsTrue).toBeGreaterThan(3);
    expect(s.lateralFrameAccuracy).toBeGreaterThan(0.97);
    expect(s.laneChangePrecision).toBeGreaterThan(0.9);
    expect(s.laneChangeRecall).toBeGreaterThan(0.9);
    expect(s.boundaryErrorMedianS).toBeLessThan(0.3);
    // Longitudinal truth: the generator's labels of the one-second mean clean acceleration
    // (docs/synth.md, "Ground truth definitions"); this run measured 0.972 when the bar was set.
    expect(s.longitudinalFrameAccuracy).toBeGreaterThan(0.93);
    expect(s.cutInPrecision).toBeGreaterThan(0.85);
    expect(s.cutInRecall).toBeGreaterThan(0.85);
  });

  it("is deterministic", () => {
    const gen = generateTraffic({ vehicleKm: 3, positionNoiseSd: 0.1 }, new Rng(3));
    const a = detectAllManeuvers(gen.recording);
    const b = detectAllManeuvers(gen.recording);
    expect(JSON.stringify(a.map((m) => m.segments))).toBe(JSON.stringify(b.map((m) => m.segments)));
  });
});
