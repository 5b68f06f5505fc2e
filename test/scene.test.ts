import { describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { detectAllManeuvers } from "../src/maneuvers/index.js";
import type { TrackManeuvers } from "../src/maneuvers/index.js";
import { buildScenes, drac, FLAG_THW, FLAG_TTC, SLOTS, timeHeadway, timeToCollision } from "../src/scene/index.js";
import type { EgoScene } from "../src/scene/index.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import type { Recording } from "../src/recording/types.js";
import { buildRecording, buildTrack, type TrackSpec } from "./maneuvers.fixtures.js";

const slot = (name: (typeof SLOTS)[number]): number => SLOTS.indexOf(name);

describe("criticality measures", () => {
  it("match the check values: gap 30 m, follower 30 m/s, leader 20 m/s", () => {
    // TTC = gap / closing speed (Hayward 1972); THW = gap / follower speed; DRAC = Δv² / (2·gap)
    // (Archer 2005, after Almqvist, Hydén & Risser 1991). Values from the worked example.
    expect(timeToCollision(30, 30, 20)).toBeCloseTo(3.0, 12);
    expect(timeHeadway(30, 30)).toBeCloseTo(1.0, 12);
    expect(drac(30, 30, 20)).toBeCloseTo(1.6667, 4);
  });

  it("are defined only while closing", () => {
    expect(timeToCollision(30, 20, 30)).toBe(Infinity);
    expect(timeToCollision(30, 25, 25)).toBe(Infinity);
    expect(drac(30, 20, 30)).toBe(0);
    expect(timeHeadway(30, 0)).toBe(Infinity);
    expect(drac(0, 30, 20)).toBe(Infinity);
  });
});

function scenesOf(specs: TrackSpec[]): { rec: Recording; man: TrackManeuvers[]; scenes: EgoScene[] } {
  const rec = buildRecording(specs.map(buildTrack));
  const man = detectAllManeuvers(rec);
  return { rec, man, scenes: buildScenes(rec, man) };
}

describe("buildScenes: neighbour slots", () => {
  it("places each neighbour in its slot with bumper-to-bumper gaps", () => {
    // Ego (id 1) in lane 1 at x = 100 m, 25 m/s, 4.5 m long: it spans 97.75 … 102.25 m.
    const car = (id: number, lane0: number, x0: number, v0: number, length = 4.5): TrackSpec => ({ id, duration: 4, v0, lane0, x0, length });
    const { scenes } = scenesOf([
      car(1, 1, 100, 25),
      car(2, 1, 134.5, 20), // ahead: rear 132.25 → gap 30
      car(3, 1, 70, 25), // behind: front 72.25 → gap 25.5
      car(4, 2, 101, 25), // left-alongside
      car(5, 2, 150, 25), // left-ahead: rear 147.75 → gap 45.5
      car(6, 0, 60, 25), // right-behind: front 62.25 → gap 35.5
      car(7, 0, 110, 25, 16.5), // truck 101.75 … 118.25 overlaps the ego by 0.5 m: right-alongside
      car(8, 0, 140, 25), // right-ahead beyond the truck: rear 137.75 → gap 35.5
    ]);
    const s = scenes[0]!;
    const at0 = (name: (typeof SLOTS)[number]): [number, number] => [s.neighbours[slot(name)]!, s.gap[slot(name)]!];
    expect(at0("ahead")[0]).toBe(2);
    expect(at0("ahead")[1]).toBeCloseTo(30, 3);
    expect(at0("behind")[0]).toBe(3);
    expect(at0("behind")[1]).toBeCloseTo(25.5, 3);
    expect(at0("left-alongside")[0]).toBe(4);
    expect(at0("left-ahead")[0]).toBe(5);
    expect(at0("left-ahead")[1]).toBeCloseTo(45.5, 3);
    expect(at0("left-behind")[0]).toBe(-1);
    expect(at0("right-behind")[0]).toBe(6);
    expect(at0("right-behind")[1]).toBeCloseTo(35.5, 3);
    expect(at0("right-alongside")[0]).toBe(7);
    expect(at0("right-alongside")[1]).toBeCloseTo(-0.5, 3);
    expect(at0("right-ahead")[0]).toBe(8);
    expect(at0("right-ahead")[1]).toBeCloseTo(35.5, 3);
    expect(s.dv[slot("ahead")]).toBeCloseTo(-5, 6);
    expect(s.dy[slot("left-alongside")]).toBeCloseTo(3.75, 6);
    // Criticality towards the leader at t = 0: gap 30 m, 25 vs 20 m/s.
    expect(s.ttc[0]).toBeCloseTo(30 / 5, 3);
    expect(s.thw[0]).toBeCloseTo(30 / 25, 3);
    expect(s.drac[0]).toBeCloseTo(25 / 60, 3);
  });

  it("agrees with a brute-force search over all tracks on generated traffic", () => {
    const gen = generateTraffic({ vehicleKm: 12, flowPerLane: 1400, positionNoiseSd: 0.1 }, new Rng(42));
    const rec = gen.recording;
    const man = detectAllManeuvers(rec);
    const scenes = buildScenes(rec, man);
    const fr = rec.road.frameRate;
    // Slow reference: for each ego sample, look at every other track's sample of the same frame.
    const byFrame = rec.tracks.map((tr) => {
      const m = new Map<number, number>();
      tr.t.forEach((t, i) => m.set(Math.round(t * fr), i));
      return m;
    });
    let checked = 0;
    let mismatches = 0;
    for (let k = 0; k < rec.tracks.length; k++) {
      const ego = rec.tracks[k]!;
      for (let i = 0; i < ego.t.length; i += 3) {
        const L = man[k]!.lane[i]!;
        const want = new Array<number>(8).fill(-1);
        if (L >= 0) {
          const xE = man[k]!.motion.x[i]!;
          const fE = xE + ego.length / 2;
          const rE = xE - ego.length / 2;
          const best = new Array<number>(8).fill(Infinity);
          for (let q = 0; q < rec.tracks.length; q++) {
            if (q === k) continue;
            const j = byFrame[q]!.get(Math.round(ego.t[i]! * fr));
            if (j === undefined) continue;
            const lane = man[q]!.lane[j]!;
            const x = man[q]!.motion.x[j]!;
            const half = rec.tracks[q]!.length / 2;
            const gapAhead = x - half - fE;
            const gapBehind = rE - (x + half);
            const consider = (s: number, key: number): void => {
              if (key < best[s]!) {
                best[s] = key;
                want[s] = rec.tracks[q]!.id;
              }
            };
            if (lane === L) {
              if (x > xE && gapAhead >= 0) consider(0, x);
              if (x <= xE && gapBehind >= 0) consider(1, -x);
            } else if (lane === L + 1 || lane === L - 1) {
              const base = lane === L + 1 ? 2 : 5;
              if (x > xE && gapAhead >= 0) consider(base, x);
              else if (x <= xE && gapBehind >= 0) consider(base + 2, -x);
              else consider(base + 1, Math.abs(x - xE));
            }
          }
        }
        for (let s = 0; s < 8; s++) {
          checked++;
          if (scenes[k]!.neighbours[i * 8 + s] !== want[s]) mismatches++;
        }
      }
    }
    expect(checked).toBeGreaterThan(10000);
    expect(mismatches).toBe(0);
  });

  it("rejects maneuvers that do not belong to the recording", () => {
    const rec = buildRecording([buildTrack({ id: 1, duration: 3, v0: 30, lane0: 0 }), buildTrack({ id: 2, duration: 3, v0: 30, lane0: 1 })]);
    const man = detectAllManeuvers(rec);
    expect(() => buildScenes(rec, [man[0]!])).toThrow(InputError);
    expect(() => buildScenes(rec, [man[1]!, man[0]!])).toThrow(/belongs to track 2, expected track 1/);
    expect(() => buildScenes(rec, man, { ttcBelow: -1 })).toThrow(/ttcBelow=-1 should be a finite number > 0/);
    // The 0.1 name is still accepted (deprecated) and means the same option.
    expect(() => buildScenes(rec, man, { ttcThreshold: -1 })).toThrow(/ttcBelow=-1 should be a finite number > 0/);
    expect(() => buildScenes(rec, man, { ttcThreshold: 1, ttcBelow: 2 })).toThrow(/ttcThreshold is the deprecated name of ttcBelow/);
  });
});

describe("buildScenes: events and flags", () => {
  it("reports a cut-in at the cutter's crossing, for the follower in the target lane", () => {
    // Cutter (id 2) 25.5 m ahead (bumper to bumper) in lane 0 moves left over 3 s from t = 2 s:
    // it crosses at the midpoint t = 3.5 s.
    const { scenes } = scenesOf([
      { id: 1, duration: 8, v0: 30, lane0: 1, x0: 100 },
      { id: 2, duration: 8, v0: 30, lane0: 0, x0: 130, moves: [{ t0: 2, duration: 3, d: 3.75 }] },
    ]);
    const cut = scenes[0]!.events.filter((e) => e.kind === "cut-in");
    expect(cut).toHaveLength(1);
    expect(cut[0]!.other).toBe(2);
    expect(cut[0]!.t).toBeCloseTo(3.5, 1);
    expect(cut[0]!.gap).toBeCloseTo(25.5, 1);
    expect(scenes[1]!.events.filter((e) => e.kind === "cut-in")).toEqual([]);
    // Beyond cutInMaxGap it is no cut-in.
    const far = scenesOf([
      { id: 1, duration: 8, v0: 30, lane0: 1, x0: 100 },
      { id: 2, duration: 8, v0: 30, lane0: 0, x0: 200, moves: [{ t0: 2, duration: 3, d: 3.75 }] },
    ]);
    expect(far.scenes[0]!.events.filter((e) => e.kind === "cut-in")).toEqual([]);
  });

  it("reports a cut-out when the leader leaves the ego lane", () => {
    const { scenes } = scenesOf([
      { id: 1, duration: 8, v0: 30, lane0: 1, x0: 100 },
      { id: 2, duration: 8, v0: 30, lane0: 1, x0: 130, moves: [{ t0: 2, duration: 3, d: 3.75 }] },
    ]);
    const ev = scenes[0]!.events;
    expect(ev.map((e) => e.kind)).toEqual(["cut-out"]);
    expect(ev[0]!.t).toBeCloseTo(3.5, 1);
    expect(scenes[0]!.neighbours[slot("ahead")]).toBe(2);
    expect(scenes[0]!.neighbours[(scenes[0]!.samples - 1) * 8 + slot("ahead")]).toBe(-1);
  });

  it("reports being overtaken when a faster car passes in the left lane", () => {
    // Passer's rear reaches the ego's front when 60 + 35t − 2.25 = 100 + 25t + 2.25, t = 4.45 s.
    const { scenes } = scenesOf([
      { id: 1, duration: 10, v0: 25, lane0: 0, x0: 100 },
      { id: 2, duration: 10, v0: 35, lane0: 1, x0: 60 },
    ]);
    const ev = scenes[0]!.events.filter((e) => e.kind === "overtaken");
    expect(ev).toHaveLength(1);
    expect(ev[0]!.other).toBe(2);
    expect(ev[0]!.t).toBeCloseTo(4.45, 1);
    expect(scenes[1]!.events.filter((e) => e.kind === "overtaken")).toEqual([]);
  });

  it("reports closing in on a slower leader once, where TTC falls to closingTtc", () => {
    // Gap 145.5 m closing at 10 m/s: TTC reaches 8 s when the gap is 80 m, at t = 6.55 s.
    const { scenes } = scenesOf([
      { id: 1, duration: 12, v0: 30, lane0: 1, x0: 0 },
      { id: 2, duration: 12, v0: 20, lane0: 1, x0: 150 },
    ]);
    const ev = scenes[0]!.events.filter((e) => e.kind === "closing-in");
    expect(ev).toHaveLength(1);
    expect(ev[0]!.t).toBeCloseTo(6.55, 1);
    expect(ev[0]!.gap).toBeCloseTo(80, 0);
  });

  it("flags frames under the TTC and THW thresholds", () => {
    // Gap 20 m at 30 m/s: THW 0.67 s < 0.9 s throughout; closing at 10 m/s from gap 20 m:
    // TTC < 1.5 s once the gap is below 15 m, from t = 0.5 s.
    const { scenes } = scenesOf([
      { id: 1, duration: 1.6, v0: 30, lane0: 1, x0: 0 },
      { id: 2, duration: 1.6, v0: 20, lane0: 1, x0: 24.5 },
    ]);
    const s = scenes[0]!;
    expect(Array.from(s.flags).every((f) => (f & FLAG_THW) !== 0)).toBe(true);
    const firstTtc = Array.from(s.flags).findIndex((f) => (f & FLAG_TTC) !== 0);
    expect(firstTtc / 25).toBeCloseTo(0.5, 1);
    // With thwBelow 0.5 s the THW flag starts where the gap falls below 15 m, at t = 0.5 s.
    const rec = buildRecording([buildTrack({ id: 1, duration: 1.6, v0: 30, lane0: 1, x0: 0 }), buildTrack({ id: 2, duration: 1.6, v0: 20, lane0: 1, x0: 24.5 })]);
    const loose = buildScenes(rec, detectAllManeuvers(rec), { thwBelow: 0.5 })[0]!;
    expect(Array.from(loose.flags).findIndex((f) => (f & FLAG_THW) !== 0) / 25).toBeCloseTo(0.5, 1);
  });
});
