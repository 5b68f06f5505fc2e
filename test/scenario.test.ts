import { describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { detectAllManeuvers } from "../src/maneuvers/index.js";
import { buildScenes } from "../src/scene/index.js";
import { buildScenarios, cutWindows, TENSOR_ACTORS, TENSOR_CHANNELS, tensorOffset } from "../src/scenario/index.js";
import type { ScenarioSet } from "../src/scenario/index.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { medianStep } from "../src/kinematics/deriveMotion.js";
import { splitAtGaps } from "../src/kinematics/splitAtGaps.js";
import type { Recording } from "../src/recording/types.js";
import { buildRecording, buildTrack, type TrackSpec } from "./maneuvers.fixtures.js";

const times = (seconds: number, rate = 25): Float64Array => Float64Array.from({ length: Math.round(seconds * rate) + 1 }, (_, i) => i / rate);

describe("cutWindows", () => {
  it("cuts fixed windows and lets the last absorb a remainder under half a window", () => {
    const t23 = times(23);
    expect(cutWindows(t23, 0, t23.length, { mode: "fixed", lengthS: 10 })).toEqual([
      [0, 250],
      [250, 575],
    ]);
    const t25 = times(25);
    expect(cutWindows(t25, 0, t25.length, { mode: "fixed", lengthS: 10 })).toEqual([
      [0, 250],
      [250, 500],
      [500, 625],
    ]);
    // A drive shorter than one window is one window.
    const t4 = times(4);
    expect(cutWindows(t4, 0, t4.length, { mode: "fixed", lengthS: 10 })).toEqual([[0, 100]]);
  });

  it("cuts at event points kept within [minS, maxS]", () => {
    const t = times(40);
    const w = { mode: "events" as const, minS: 4, maxS: 12, leadS: 1 };
    // Cut points at 3 s (too early), 7 s and 30 s.
    expect(cutWindows(t, 0, t.length, w, [75, 175, 750])).toEqual([
      [0, 175],
      [175, 475],
      [475, 750],
      [750, 1000],
    ]);
    // A remainder shorter than minS joins the last window.
    const t21 = times(21);
    expect(cutWindows(t21, 0, t21.length, w, [250])).toEqual([
      [0, 250],
      [250, 525],
    ]);
  });
});

function chain(rec: Recording, options: Parameters<typeof buildScenarios>[3] = {}): ScenarioSet {
  const man = detectAllManeuvers(rec);
  return buildScenarios(rec, man, buildScenes(rec, man), options);
}

/** Every drive (run without time gaps) is tiled exactly: contiguous windows, km and seconds add up. */
function expectTiling(rec: Recording, set: ScenarioSet): void {
  for (const tr of rec.tracks) {
    const mine = set.scenarios.filter((s) => s.egoTrack === tr.id);
    const runs = splitAtGaps(tr.t, 1.5 * medianStep(tr.t)).filter(([s, e]) => e - s >= 2);
    let w = 0;
    for (const [s, e] of runs) {
      const first = w;
      expect(mine[w]!.startFrame).toBe(s);
      let km = 0;
      let seconds = 0;
      for (; w < mine.length && mine[w]!.endFrame <= e - 1; w++) {
        if (w > first) expect(mine[w]!.startFrame).toBe(mine[w - 1]!.endFrame);
        km += mine[w]!.km;
        seconds += mine[w]!.seconds;
        if (mine[w]!.endFrame === e - 1) {
          w++;
          break;
        }
      }
      expect(mine[w - 1]!.endFrame).toBe(e - 1);
      expect(Math.abs(km - (tr.x[e - 1]! - tr.x[s]!) / 1000)).toBeLessThan(1e-9);
      expect(Math.abs(seconds - (tr.t[e - 1]! - tr.t[s]!))).toBeLessThan(1e-9);
    }
    expect(w).toBe(mine.length);
  }
}

describe("buildScenarios", () => {
  const gen = generateTraffic({ vehicleKm: 15, flowPerLane: 1200, positionNoiseSd: 0.1 }, new Rng(9));
  const rec = gen.recording;

  it("tiles every drive exactly in fixed windows, with a tensor of fixed shape", () => {
    const set = chain(rec, { window: { mode: "fixed", lengthS: 8 }, steps: 6 });
    expectTiling(rec, set);
    const total = rec.tracks.reduce((s, tr) => s + (tr.x[tr.x.length - 1]! - tr.x[0]!) / 1000, 0);
    const sum = set.scenarios.reduce((s, sc) => s + sc.km, 0);
    expect(Math.abs(sum - total)).toBeLessThan(1e-9);
    expect(set.shape).toEqual({ steps: 6, actors: 9, channels: TENSOR_CHANNELS.length });
    expect(set.tensors.length).toBe(set.scenarios.length * 6 * 9 * TENSOR_CHANNELS.length);
    expect(set.tensors.every((v) => Number.isFinite(v))).toBe(true);
    expect(set.actorNames).toEqual([...TENSOR_ACTORS]);
    expect(set.scenarios.map((s) => s.index)).toEqual(set.scenarios.map((_, i) => i));
    expect(new Set(set.scenarios.map((s) => s.id)).size).toBe(set.scenarios.length);
    // Windows shorter than 8 s only at the end of a drive, and then marked partial.
    for (const sc of set.scenarios) if (sc.seconds < 8 - 1e-9) expect(sc.partial).toBe(true);
  });

  it("tiles every drive exactly in event windows", () => {
    const set = chain(rec, { window: { mode: "events", minS: 4, maxS: 15 } });
    expectTiling(rec, set);
    for (const sc of set.scenarios) if (!sc.partial) expect(sc.seconds).toBeGreaterThanOrEqual(4 - 1e-9);
  });

  it("tiles the runs on either side of a time gap separately", () => {
    const r = buildRecording([buildTrack({ id: 1, duration: 45, v0: 30, lane0: 0, gap: [20, 25], noiseSd: 0.1 })]);
    const set = chain(r, { window: { mode: "fixed", lengthS: 10 } });
    expectTiling(r, set);
    for (const sc of set.scenarios) expect(sc.tEnd <= 20 || sc.tStart >= 25).toBe(true);
    expect(set.scenarios.map((s) => s.window)).toEqual(set.scenarios.map((_, i) => i));
  });

  it("aggregates each step over its samples (checked against a direct computation)", () => {
    const man = detectAllManeuvers(rec);
    const scenes = buildScenes(rec, man);
    const set = buildScenarios(rec, man, scenes, { steps: 5 });
    const byId = new Map(rec.tracks.map((t, k) => [t.id, k]));
    for (const [n, sc] of set.scenarios.entries()) {
      if (n % 7 !== 0) continue;
      const k = byId.get(sc.egoTrack)!;
      const tr = rec.tracks[k]!;
      const last = set.scenarios[n + 1]?.egoTrack !== sc.egoTrack || set.scenarios[n + 1]!.startFrame !== sc.endFrame;
      const end = last ? sc.endFrame + 1 : sc.endFrame;
      const width = (sc.tEnd - sc.tStart) / 5;
      for (let step = 0; step < 5; step++) {
        const lo = sc.tStart + step * width;
        const hi = step === 4 ? Infinity : lo + width;
        let v = 0;
        let occ = 0;
        let cnt = 0;
        for (let i = sc.startFrame; i < end; i++) {
          if (!(tr.t[i]! >= lo - 1e-9 && tr.t[i]! < hi - 1e-9)) continue;
          v += man[k]!.motion.vx[i]!;
          if (scenes[k]!.neighbours[i * 8]! >= 0) occ++;
          cnt++;
        }
        if (cnt === 0) continue;
        expect(set.tensors[tensorOffset(set.shape, n, step, 0, 3)]).toBeCloseTo(v / cnt, 3);
        expect(set.tensors[tensorOffset(set.shape, n, step, 1, 0)]).toBeCloseTo(occ / cnt, 5);
      }
    }
  });

  it("keeps a brief neighbour and a lane change visible in the steps that contain them", () => {
    // A car 30 m/s faster passes the ego in the left lane: it overlaps the ego for 9 m / 30 m/s = 0.3 s,
    // around t = 8.3 s. The ego changes lanes to the right from t = 12 s to 15 s.
    const set = chain(
      buildRecording([
        buildTrack({ id: 1, duration: 20, v0: 20, lane0: 1, x0: 300, moves: [{ t0: 12, duration: 3, d: -3.75 }] }),
        buildTrack({ id: 2, duration: 20, v0: 50, lane0: 2, x0: 50 }),
      ]),
      { window: { mode: "fixed", lengthS: 20 }, steps: 4 },
    );
    const sc = set.scenarios[0]!;
    expect(sc.seconds).toBeCloseTo(20, 6);
    const along = TENSOR_ACTORS.indexOf("left-alongside");
    const occ = [0, 1, 2, 3].map((s) => set.tensors[tensorOffset(set.shape, 0, s, along, 0)]!);
    expect(occ[1]!).toBeGreaterThan(0.03); // step 1 covers 5–10 s
    expect(occ[1]!).toBeLessThan(0.1);
    expect(occ[0]).toBe(0);
    expect(set.tensors[tensorOffset(set.shape, 0, 1, along, TENSOR_CHANNELS.findIndex((c) => c.name === "changed"))]).toBe(1);
    const lat = [0, 1, 2, 3].map((s) => set.tensors[tensorOffset(set.shape, 0, s, 0, TENSOR_CHANNELS.findIndex((c) => c.name === "lat"))]!);
    expect(lat[2]).toBeLessThan(-0.5); // 10–15 s: mostly inside the right lane change
    expect(lat[0]).toBe(0);
    expect(sc.lateral).toEqual(["lane-keep", "lane-change-right", "lane-keep"]);
    expect(sc.laneStart).toBe(1);
    expect(sc.laneEnd).toBe(0);
    expect(sc.stats!.laneChangesRight).toBe(1);
    expect(sc.events.map((e) => e.kind)).toContain("overtaken");
  });

  it("summarizes criticality with flags", () => {
    const spec = (id: number, x0: number, v0: number): TrackSpec => ({ id, duration: 12, v0, lane0: 1, x0 });
    const set = chain(buildRecording([buildTrack(spec(1, 0, 30)), buildTrack(spec(2, 24.5, 30))]), { window: { mode: "fixed", lengthS: 12 } });
    const c = set.scenarios[0]!.criticality;
    // Gap 20 m at 30 m/s: THW 0.667 s, below 0.9 s; equal speeds, so no TTC.
    expect(c.minThw).toBeCloseTo(20 / 30, 3);
    expect(c.minTtc).toBeGreaterThan(1e6); // equal speeds: closing only by rounding, if at all
    expect(c.maxDrac).toBeLessThan(1e-9);
    expect(c.flags).toEqual(["thw"]);
    expect(set.scenarios[1]!.criticality.minThw).toBe(Infinity);
    expect(set.scenarios[1]!.slotOccupancy[1]).toBe(1);
  });

  it("validates options", () => {
    const man = detectAllManeuvers(rec);
    const scenes = buildScenes(rec, man);
    expect(() => buildScenarios(rec, man, scenes, { steps: 0 })).toThrow(/steps=0 should be an integer/);
    expect(() => buildScenarios(rec, man, scenes, { window: { mode: "fixed", lengthS: -2 } })).toThrow(InputError);
    expect(() => buildScenarios(rec, man, scenes, { window: { mode: "events", minS: 10, maxS: 5 } })).toThrow(/maxS=5 should be a finite number >= minS=10/);
    // The 0.1 names are still accepted (deprecated) and mean the same options.
    expect(() => buildScenarios(rec, man, scenes, { window: { mode: "events", minSeconds: 10, maxSeconds: 5 } })).toThrow(/maxS=5 should be a finite number >= minS=10/);
    expect(() => buildScenarios(rec, man, scenes, { window: { mode: "fixed", seconds: -2 } })).toThrow(/lengthS=-2/);
    expect(() => buildScenarios(rec, man, scenes, { window: { mode: "sliding" } as never })).toThrow(/window.mode="sliding"/);
    expect(() => buildScenarios(rec, man.slice(1), scenes)).toThrow(/one entry per track/);
  });

  it("is deterministic", () => {
    const a = chain(rec);
    const b = chain(rec);
    expect(JSON.stringify(a.scenarios)).toBe(JSON.stringify(b.scenarios));
    expect(Buffer.from(a.tensors.buffer).equals(Buffer.from(b.tensors.buffer))).toBe(true);
  });
});
