/**
 * Issue 11: the four detection defects measured on traffic the project did not generate, each on a
 * hand-built track whose exact geometry is the reference (crossing times solved from the profile
 * formula, not from the detector).
 */
import { describe, expect, it } from "vitest";
import { detectManeuvers } from "../src/maneuvers/index.js";
import type { ManeuverSegment, TrackManeuvers } from "../src/maneuvers/index.js";
import { buildTrack, MARKINGS, type TrackSpec } from "./maneuvers.fixtures.js";

const opts = { laneMarkings: MARKINGS };
const laneChanges = (m: TrackManeuvers): ManeuverSegment[] => m.segments.filter((g) => g.axis === "lateral" && g.maneuver !== "lane-keep");

describe("issue 11, defect 1: quick double lane change in the same direction", () => {
  // Constant lateral speed 3.75 m / 4 s from lane centre to lane centre: the centre crosses the
  // marking half-way, at t0 + 2 s (1.875 m of 3.75 m), exactly.
  for (const pause of [0, 1, 2]) {
    it(`gives two lane changes 0→1→2 with their own crossings (pause ${pause} s)`, () => {
      const t1 = 8;
      const t2 = t1 + 4 + pause;
      const spec: TrackSpec = {
        id: 100 + pause,
        duration: 30,
        v0: 32,
        lane0: 0,
        moves: [
          { t0: t1, duration: 4, d: 3.75, shape: "constant-speed" },
          { t0: t2, duration: 4, d: 3.75, shape: "constant-speed" },
        ],
        noiseSd: 0.1,
      };
      const m = detectManeuvers(buildTrack(spec), opts);
      const lcs = laneChanges(m);
      expect(lcs.map((g) => [g.maneuver, g.laneChange!.fromLane, g.laneChange!.toLane])).toEqual([
        ["lane-change-left", 0, 1],
        ["lane-change-left", 1, 2],
      ]);
      // Crossing times from the geometry: within the 0.1 s.
      expect(Math.abs(lcs[0]!.laneChange!.tCross - (t1 + 2))).toBeLessThanOrEqual(0.1);
      expect(Math.abs(lcs[1]!.laneChange!.tCross - (t2 + 2))).toBeLessThanOrEqual(0.1);
      // Two segments that do not overlap, also when nothing lies between them.
      expect(lcs[0]!.endFrame).toBeLessThan(lcs[1]!.startFrame);
      expect(lcs.every((g) => g.laneChange!.partial === false)).toBe(true);
    });
  }
});

describe("issue 11, defect 2: lateral profiles other than minimum-jerk", () => {
  it("places start and end of a 4 s constant-speed ramp within 0.3 s, and says it fitted a ramp", () => {
    for (const seed of [1, 2, 3, 4, 5]) {
      const spec: TrackSpec = { id: 110, seed, duration: 30, v0: 30, lane0: 1, moves: [{ t0: 12, duration: 4, d: -3.75, shape: "constant-speed" }], noiseSd: 0.1 };
      const tr = buildTrack(spec);
      const [lc] = laneChanges(detectManeuvers(tr, opts));
      expect(lc!.maneuver).toBe("lane-change-right");
      expect(Math.abs(lc!.tStart - 12)).toBeLessThanOrEqual(0.3);
      expect(Math.abs(lc!.tEnd - 16)).toBeLessThanOrEqual(0.3);
      expect(lc!.laneChange!.boundaryMethod).toBe("constant-speed");
      // The minimum-jerk fit alone (the old default) stretches the ramp: least squares of the quintic
      // onto a ramp of duration T gives onset ≈ 0.35·T early (scipy.optimize fit, noise-free: 1.4 s for T = 4).
      const [old] = laneChanges(detectManeuvers(tr, { ...opts, boundary: "profile" }));
      expect(12 - old!.tStart).toBeGreaterThan(0.9);
    }
  });

  it("places a sinusoidal (half-cosine) lane change of 5 s within 0.4 s", () => {
    for (const seed of [1, 2, 3]) {
      const tr = buildTrack({ id: 111, seed, duration: 30, v0: 30, lane0: 0, moves: [{ t0: 10, duration: 5, d: 3.75, shape: "sinusoidal" }], noiseSd: 0.1 });
      const [lc] = laneChanges(detectManeuvers(tr, opts));
      // Half-cosine and minimum-jerk fits differ by only 1–3 σ² in residual at 0.1 m noise while their
      // onsets differ by 0.077–0.093·T (scipy.optimize least squares of one onto the other,
      // noise-free), so the detector averages them: a bias up to about 0.05·T = 0.25 s here, plus noise.
      expect(Math.abs(lc!.tStart - 10)).toBeLessThanOrEqual(0.4);
      expect(Math.abs(lc!.tEnd - 15)).toBeLessThanOrEqual(0.4);
      // Half-cosine crossing at τ = 1/2: t = 12.5 s.
      expect(Math.abs(lc!.laneChange!.tCross - 12.5)).toBeLessThanOrEqual(0.1);
    }
  });
});

describe("issue 11, defect 3: a vehicle riding on a marking", () => {
  // Centre on the marking between lanes 0 and 1 (y = 3.75 m) with a 0.2 m, 7 s weave and 0.1 m noise:
  // the smoothed centre crosses the marking every 3.5 s and stays over a second on each side.
  const spec: TrackSpec = { id: 120, duration: 60, v0: 30, lane0: 0, lateral: (t) => 1.875 + 0.2 * Math.sin((2 * Math.PI * t) / 7), noiseSd: 0.1 };
  it("gives no lane change by default", () => {
    const m = detectManeuvers(buildTrack(spec), opts);
    expect(laneChanges(m)).toEqual([]);
    expect(new Set(m.lane).size).toBe(1);
  });
  it("gave false lane changes under the old rule (crossingRule: touch), which the option keeps", () => {
    expect(laneChanges(detectManeuvers(buildTrack(spec), { ...opts, crossingRule: "touch" })).length).toBeGreaterThan(3);
  });
  it("gives none when the rider drifts off the marking into its lane, and finds a real lane change after it", () => {
    // Ride until 28 s (sin(2π·28/7) = 0, so the ride ends on the marking), drift 1.875 m right into
    // lane 0's centre over 3 s, then a full 5 s lane change 0 → 1 from 40 s (crossing at 42.5 s).
    const ride: TrackSpec = {
      id: 121,
      duration: 60,
      v0: 30,
      lane0: 0,
      lateral: (t) => 1.875 + (t < 28 ? 0.2 * Math.sin((2 * Math.PI * t) / 7) : 0),
      moves: [{ t0: 28, duration: 3, d: -1.875 }],
      noiseSd: 0.1,
    };
    expect(laneChanges(detectManeuvers(buildTrack(ride), opts))).toEqual([]);
    const both: TrackSpec = { ...ride, id: 122, moves: [...ride.moves!, { t0: 40, duration: 5, d: 3.75 }] };
    const lcs = laneChanges(detectManeuvers(buildTrack(both), opts));
    expect(lcs.map((g) => [g.maneuver, g.laneChange!.fromLane, g.laneChange!.toLane])).toEqual([["lane-change-left", 0, 1]]);
    expect(Math.abs(lcs[0]!.laneChange!.tCross - 42.5)).toBeLessThanOrEqual(0.1);
  });
});

describe("issue 11, defect 4: crossings in the first and last frames of a track", () => {
  // Minimum-jerk 5 s lane change: the crossing is at its midpoint, t0 + 2.5 s.
  it("reports a crossing 0.2 s before the track ends once, as partial", () => {
    for (const seed of [1, 2, 3, 4]) {
      const tr = buildTrack({ id: 130, seed, duration: 20, v0: 30, lane0: 0, moves: [{ t0: 17.3, duration: 5, d: 3.75 }], noiseSd: 0.1 });
      const m = detectManeuvers(tr, opts);
      const lcs = laneChanges(m);
      expect(lcs).toHaveLength(1);
      expect(lcs[0]!.maneuver).toBe("lane-change-left");
      expect(lcs[0]!.laneChange!.partial).toBe(true);
      expect(lcs[0]!.flags).toContain("partial");
      expect(lcs[0]!.flags).not.toContain("too-short");
      expect(Math.abs(lcs[0]!.laneChange!.tCross - 19.8)).toBeLessThanOrEqual(0.15);
    }
  });
  it("reports a crossing 0.2 s after the track starts once, as partial", () => {
    for (const seed of [1, 2, 3, 4]) {
      const tr = buildTrack({ id: 131, seed, duration: 20, v0: 30, lane0: 1, moves: [{ t0: -2.3, duration: 5, d: -3.75 }], noiseSd: 0.1 });
      const lcs = laneChanges(detectManeuvers(tr, opts));
      expect(lcs).toHaveLength(1);
      expect(lcs[0]!.maneuver).toBe("lane-change-right");
      expect(lcs[0]!.laneChange!.partial).toBe(true);
      expect(Math.abs(lcs[0]!.laneChange!.tCross - 0.2)).toBeLessThanOrEqual(0.15);
    }
  });
  it("gives nothing for a track that ends close to a marking without crossing it", () => {
    for (const seed of [1, 2, 3, 4]) {
      // Drifts to 0.3 m short of the marking during the last 3 s.
      const tr = buildTrack({ id: 132, seed, duration: 20, v0: 30, lane0: 0, moves: [{ t0: 17, duration: 6, d: 3 }], noiseSd: 0.1 });
      expect(laneChanges(detectManeuvers(tr, opts))).toEqual([]);
    }
  });
});
