import { beforeAll, describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { LON_ACCELERATE, LON_DECELERATE, LON_KEEP } from "../src/maneuvers/labels.js";
import { generateTraffic, round3, type GeneratedTraffic } from "../src/synth/generateTraffic.js";
import { centredMeanAcceleration, labelLongitudinalTruth, type LongitudinalDefinition } from "../src/synth/labelLongitudinalTruth.js";
import { resolveTrafficOptions } from "../src/synth/options.js";
import { decodeRuns, encodeRuns, truthFromJson, truthToJson } from "../src/synth/truthFile.js";

const RATE = 0.08; // planted events of each kind per vehicle-km in this test run
let g: GeneratedTraffic;
beforeAll(() => {
  g = generateTraffic({ vehicleKm: 150, positionNoiseSd: 0, hardBrakingRate: RATE, tightCutInRate: RATE }, new Rng(7));
});

/** Samples of all tracks at each frame index: [trackIndex, sampleIndex]. */
function byFrame(traffic: GeneratedTraffic): Map<number, [number, number][]> {
  const fr = traffic.options.frameRate;
  const frames = new Map<number, [number, number][]>();
  traffic.recording.tracks.forEach((tr, i) => {
    for (let k = 0; k < tr.t.length; k++) {
      const f = Math.round(tr.t[k]! * fr);
      let list = frames.get(f);
      if (!list) frames.set(f, (list = []));
      list.push([i, k]);
    }
  });
  return frames;
}

/** Poisson(mu) quantile: smallest k with P(X <= k) >= q. */
function poissonQuantile(mu: number, q: number): number {
  let p = Math.exp(-mu);
  let cdf = p;
  let k = 0;
  while (cdf < q) {
    k++;
    p *= mu / k;
    cdf += p;
  }
  return k;
}

describe("generateTraffic sanity", () => {
  it("no two vehicles in the same lane overlap bumper to bumper (lane index, and both lanes during a lane change)", () => {
    // Collision-free car-following is the premise of the IDM (Treiber et al. 2000); a vehicle that is
    // changing lanes is counted in both lanes (common practice).
    const tracks = g.recording.tracks;
    const changes = new Map<number, typeof g.truth.laneChanges>();
    for (const lc of g.truth.laneChanges) changes.set(lc.trackId, [...(changes.get(lc.trackId) ?? []), lc]);
    let minGapLane = Infinity;
    let minGapBoth = Infinity;
    for (const samples of byFrame(g).values()) {
      for (let lane = 0; lane < g.options.lanes; lane++) {
        const strict: [number, number][] = [];
        const both: [number, number][] = [];
        for (const [i, k] of samples) {
          const tr = tracks[i]!;
          const ext: [number, number] = [tr.x[k]! - tr.length / 2, tr.x[k]! + tr.length / 2];
          if (tr.lane[k] === lane) strict.push(ext);
          const t = tr.t[k]!;
          const lc = (changes.get(tr.id) ?? []).find((c) => t >= c.tStart && t <= c.tEnd);
          if (tr.lane[k] === lane || (lc && (lc.fromLane === lane || lc.toLane === lane))) both.push(ext);
        }
        for (const [list, which] of [[strict, 0], [both, 1]] as const) {
          list.sort((a, b) => a[0] - b[0]);
          for (let j = 1; j < list.length; j++) {
            const gap = list[j]![0] - list[j - 1]![1];
            if (which === 0) minGapLane = Math.min(minGapLane, gap);
            else minGapBoth = Math.min(minGapBoth, gap);
          }
        }
      }
    }
    expect(minGapLane).toBeGreaterThan(0);
    expect(minGapBoth).toBeGreaterThan(0);
  });

  it("speeds are non-negative and plausible, and every track runs forward in whole frames", () => {
    const dt = 1 / g.options.frameRate;
    let maxV = 0;
    let minV = Infinity;
    let bad = 0;
    for (const tr of g.recording.tracks) {
      for (let k = 0; k < tr.t.length; k++) {
        minV = Math.min(minV, tr.vx[k]!);
        maxV = Math.max(maxV, tr.vx[k]!);
        if (k > 0 && Math.abs(tr.t[k]! - tr.t[k - 1]! - dt) > 1e-9) bad++;
        if (k > 0 && tr.x[k]! < tr.x[k - 1]! - 0.0015) bad++;
        if (tr.x[k]! < 0 || tr.x[k]! > g.options.length) bad++;
      }
    }
    expect(bad).toBe(0);
    expect(minV).toBeGreaterThanOrEqual(0);
    expect(maxV).toBeLessThanOrEqual(g.options.carSpeedMax + 1);
  });

  it("ground truth is aligned with the track frames", () => {
    expect(g.truth.tracks.length).toBe(g.recording.tracks.length);
    g.recording.tracks.forEach((tr, i) => {
      expect(g.truth.tracks[i]!.trackId).toBe(tr.id);
      expect(g.truth.tracks[i]!.lateral.length).toBe(tr.t.length);
      expect(g.truth.tracks[i]!.longitudinal.length).toBe(tr.t.length);
    });
    const spans = new Map(g.recording.tracks.map((tr) => [tr.id, [tr.t[0]!, tr.t[tr.t.length - 1]!] as const]));
    for (const c of g.truth.cutIns) {
      for (const id of [c.egoTrack, c.cutterTrack]) {
        const [a, b] = spans.get(id)!;
        expect(c.t).toBeGreaterThanOrEqual(a);
        expect(c.t).toBeLessThanOrEqual(b);
      }
      expect(c.gap).toBeLessThanOrEqual(g.options.cutInMaxGap);
    }
    for (const lc of g.truth.laneChanges) {
      const [a, b] = spans.get(lc.trackId)!;
      expect(lc.tEnd).toBeGreaterThanOrEqual(a);
      expect(lc.tStart).toBeLessThanOrEqual(b);
      expect(lc.partial === true).toBe(lc.tStart < a || lc.tEnd > b);
    }
    // stats.vehicleKm is the distance driven inside the section: Σ v·dt over the recorded samples.
    let m = 0;
    for (const tr of g.recording.tracks) for (const v of tr.vx) m += v / g.options.frameRate;
    expect(m / 1000).toBeCloseTo(g.stats.vehicleKm, 1);
    expect(g.stats.vehicleKm).toBeGreaterThanOrEqual(150);
    expect(g.stats.rows).toBe(g.recording.tracks.reduce((s, t) => s + t.t.length, 0));
  });

  it("planted events occur at the configured rate per vehicle-km (inside a Poisson 99.9 % interval)", () => {
    // Events are planted as a Poisson process on the vehicle-km clock, so the count is Poisson(rate · km)
    // (minus the few still waiting at the end); the interval uses the Poisson CDF computed exactly.
    const mu = RATE * g.stats.vehicleKm;
    for (const kind of ["hard-braking", "tight-cut-in"] as const) {
      const n = g.truth.planted.filter((p) => p.kind === kind).length;
      expect(n).toBeGreaterThanOrEqual(poissonQuantile(mu, 0.0005));
      expect(n).toBeLessThanOrEqual(poissonQuantile(mu, 0.9995));
    }
  });

  it("a vehicle at a standstill has no negative acceleration (ax describes the motion, not the brake command)", () => {
    // Kinematics: speed cannot fall below zero, so where it is zero in two consecutive frames the
    // acceleration of the motion is not negative. Planted hard braking stops some vehicles in this run.
    let standing = 0;
    for (const tr of g.recording.tracks)
      for (let k = 0; k + 1 < tr.t.length; k++)
        if (tr.vx[k] === 0 && tr.vx[k + 1] === 0) {
          standing++;
          expect(tr.ax[k]!).toBeGreaterThanOrEqual(0);
        }
    expect(standing).toBeGreaterThan(0);
  });

  it("planted events are what they claim: hard braking at the stated deceleration, tight cut-ins with small gaps", () => {
    const byId = new Map(g.recording.tracks.map((t) => [t.id, t]));
    for (const p of g.truth.planted) {
      const tr = byId.get(p.trackId)!;
      if (p.kind === "hard-braking") {
        expect(p.magnitude).toBeGreaterThanOrEqual(g.options.hardBrakingDecelMin);
        expect(p.magnitude).toBeLessThanOrEqual(g.options.hardBrakingDecelMax);
        for (let k = 0; k < tr.t.length; k++) {
          // While braking and still moving, the clean deceleration is at least the planted one.
          if (tr.t[k]! >= p.tStart && tr.t[k]! < p.tEnd && tr.vx[k]! > 0.5) expect(tr.ax[k]!).toBeLessThanOrEqual(-p.magnitude + 0.002);
        }
      } else {
        const lc = g.truth.laneChanges.find((l) => l.trackId === p.trackId && l.tStart === p.tStart);
        expect(lc).toBeDefined();
        expect(lc!.tEnd).toBeCloseTo(p.tEnd, 3);
        expect(p.magnitude).toBeLessThan(g.options.tightCutInGapMax + 10);
      }
    }
    const tight = g.truth.planted.filter((p) => p.kind === "tight-cut-in");
    const median = tight.map((p) => p.magnitude).sort((a, b) => a - b)[Math.floor(tight.length / 2)]!;
    expect(median).toBeGreaterThanOrEqual(g.options.tightCutInGapMin - 1);
    expect(median).toBeLessThanOrEqual(g.options.tightCutInGapMax + 1);
  });

  it("cut-in truth equals a brute-force search of the tracks at each crossing", () => {
    // Definition (ours, documented in docs/synth.md): the nearest follower in the target lane at the
    // crossing, bumper-to-bumper gap <= cutInMaxGap.
    const tracks = g.recording.tracks;
    const frames = byFrame(g);
    const fr = g.options.frameRate;
    const truthKeys = new Map(g.truth.cutIns.map((c) => [`${c.cutterTrack}@${c.t}`, c]));
    const idx = new Map(tracks.map((t, i) => [t.id, i]));
    let confirmed = 0;
    for (const lc of g.truth.laneChanges) {
      const ci = idx.get(lc.trackId)!;
      const cutter = tracks[ci]!;
      const f = Math.ceil(lc.tCross * fr - 1e-9);
      const kc = f - Math.round(cutter.t[0]! * fr);
      if (lc.tCross < cutter.t[0]! || kc >= cutter.t.length) continue;
      let best: [number, number] | null = null;
      for (const [i, k] of frames.get(f) ?? []) {
        const tr = tracks[i]!;
        if (i === ci || tr.lane[k] !== lc.toLane || tr.x[k]! >= cutter.x[kc]!) continue;
        if (!best || tr.x[k]! > tracks[best[0]]!.x[best[1]]!) best = [i, k];
      }
      const truth = truthKeys.get(`${lc.trackId}@${lc.tCross}`);
      if (!best) {
        expect(truth === undefined || !tracks.some((t) => t.id === truth.egoTrack && t.t[0]! <= lc.tCross)).toBe(true);
        continue;
      }
      const ego = tracks[best[0]]!;
      const gapFrame = cutter.x[kc]! - cutter.length / 2 - (ego.x[best[1]]! + ego.length / 2);
      if (best[1] === 0 || Math.abs(gapFrame - g.options.cutInMaxGap) < 2) continue; // entry frame / threshold edge
      if (gapFrame <= g.options.cutInMaxGap) {
        expect(truth).toBeDefined();
        expect(truth!.egoTrack).toBe(ego.id);
        expect(Math.abs(truth!.gap - gapFrame)).toBeLessThan(1);
        confirmed++;
      } else {
        expect(truth).toBeUndefined();
      }
    }
    expect(confirmed).toBeGreaterThan(20);
    expect(confirmed).toBeGreaterThanOrEqual(g.truth.cutIns.length * 0.9);
  });

  it("position noise has the configured sd and leaves the clean truth untouched", () => {
    // Source: sampling distribution of the sd of n normal draws (relative standard error ≈ 1/√(2n)).
    const opts = { vehicleKm: 40, hardBrakingRate: 0.02, tightCutInRate: 0.02 };
    const clean = generateTraffic({ ...opts, positionNoiseSd: 0 }, new Rng(99));
    const noisy = generateTraffic({ ...opts, positionNoiseSd: 0.1 }, new Rng(99));
    // The truth differs only in the recorded noise parameter.
    expect(truthToJson({ ...noisy.truth, definitions: {} })).toBe(truthToJson({ ...clean.truth, definitions: {} }));
    expect(noisy.truth.definitions.positionNoiseSd).toBe(0.1);
    let n = 0;
    let sx = 0;
    let sxx = 0;
    let syy = 0;
    clean.recording.tracks.forEach((tr, i) => {
      const nz = noisy.recording.tracks[i]!;
      expect(nz.vx).toEqual(tr.vx);
      expect(nz.lane).toEqual(tr.lane);
      for (let k = 0; k < tr.t.length; k++) {
        const dx = nz.x[k]! - tr.x[k]!;
        const dy = nz.y[k]! - tr.y[k]!;
        sx += dx;
        sxx += dx * dx;
        syy += dy * dy;
        n++;
      }
    });
    expect(n).toBeGreaterThan(30000);
    expect(Math.abs(sx / n)).toBeLessThan(0.003);
    // Sample sd of n ≈ 4·10⁴ normal draws is within ±2 % of the true sd with overwhelming probability.
    expect(Math.sqrt(sxx / n)).toBeGreaterThan(0.098);
    expect(Math.sqrt(sxx / n)).toBeLessThan(0.102);
    expect(Math.sqrt(syy / n)).toBeGreaterThan(0.098);
    expect(Math.sqrt(syy / n)).toBeLessThan(0.102);
  });
});

// Sources: the documented truth definition (docs/synth.md, "Ground truth definitions"), worked by hand;
// kinematics of the ballistic update v[k+1] = v[k] + a[k]·dt (the mean acceleration over a window is
// the speed change over it divided by its length); Rice (1944) for the fewer level crossings of a
// low-pass filtered signal.
describe("labelLongitudinalTruth", () => {
  const def: LongitudinalDefinition = { enter: 0.25, exit: 0.15, minDuration: 1 };
  const rep = (v: number, n: number) => Array<number>(n).fill(v);

  it("follows the documented definition on a worked example (instantaneous values, 10 Hz, runs shorter than 1 s)", () => {
    const a = [...rep(0, 5), ...rep(0.3, 12), ...rep(0.2, 3), ...rep(0.1, 4), ...rep(0.3, 12), ...rep(0, 5), ...rep(-0.3, 5), ...rep(0, 5)];
    // Hysteresis: 0.2 >= exit keeps "accelerate"; 0.1 < exit drops to keep for 4 frames (< 10 frames,
    // between two accelerate runs ⇒ filled); the 5-frame decelerate run is too short ⇒ keep.
    const expected = [...rep(LON_KEEP, 5), ...rep(LON_ACCELERATE, 31), ...rep(LON_KEEP, 15)];
    expect(Array.from(labelLongitudinalTruth(a, 10, def))).toEqual(expected);
    expect(Array.from(labelLongitudinalTruth(a, 10, { ...def, averageWindow: 0 }))).toEqual(expected);
    expect(Array.from(labelLongitudinalTruth([...rep(-0.3, 10), ...rep(-0.2, 2), ...rep(0, 3)], 10, def))).toEqual([
      ...rep(LON_DECELERATE, 12),
      ...rep(LON_KEEP, 3),
    ]);
  });

  it("centredMeanAcceleration: mean over the samples within ±window/2, clipped at the ends (worked by hand)", () => {
    // 10 Hz, 1 s window ⇒ 5 samples each side. A single 0.6 m/s² sample at index 0: indices 0..5 see it
    // in windows of 6, 7, …, 11 samples (clipped at the start); from index 6 on it is out of the window.
    const m = centredMeanAcceleration([0.6, ...rep(0, 11)], 10, 1);
    const expected = [0.6 / 6, 0.6 / 7, 0.6 / 8, 0.6 / 9, 0.6 / 10, 0.6 / 11, ...rep(0, 6)];
    expected.forEach((v, i) => expect(m[i]!).toBeCloseTo(v, 12));
    // 25 Hz, 1 s ⇒ 12 samples each side (25 in all): a constant is returned unchanged, a ramp too (inside).
    const ramp = Array.from({ length: 60 }, (_, i) => round3(0.01 * i));
    const r = centredMeanAcceleration(ramp, 25, 1);
    for (let i = 12; i < 48; i++) expect(r[i]!).toBeCloseTo(ramp[i]!, 12);
    expect(Array.from(centredMeanAcceleration(rep(-0.3, 40), 25, 1))).toEqual(rep(-0.3, 40));
  });

  it("an abrupt braking step is labelled over the one-second windows that contain it (worked by hand)", () => {
    // 10 Hz: 3 s at 0, 2 s at −6 m/s² (frames 30..49), 3 s at 0. The mean over ±5 frames reaches
    // −6/11 = −0.55 m/s² as soon as one braking frame is inside: frames 25..54 ⇒ decelerate, 0.5 s
    // either side of the step (the ±window/2 resolution stated in docs/synth.md).
    const a = [...rep(0, 30), ...rep(-6, 20), ...rep(0, 30)];
    const expected = [...rep(LON_KEEP, 25), ...rep(LON_DECELERATE, 30), ...rep(LON_KEEP, 25)];
    expect(Array.from(labelLongitudinalTruth(a, 10, { ...def, averageWindow: 1 }))).toEqual(expected);
    // Instantaneous: exactly the braking frames.
    expect(Array.from(labelLongitudinalTruth(a, 10, def))).toEqual([...rep(LON_KEEP, 30), ...rep(LON_DECELERATE, 20), ...rep(LON_KEEP, 30)]);
  });

  it("the one-second mean acceleration of a generated track is its speed change over that second", () => {
    // Ballistic update (docs/synth.md, Integration): v[k+1] = v[k] + a[k]·dt, so the mean of a[i−12..i+12]
    // equals (v[i+13] − v[i−12]) / (25·dt). Both columns are rounded to 1e-3 (speed error ≤ 1e-3/1 s,
    // acceleration mean ≤ 5e-4), hence the 2e-3 tolerance. Windows that touch a standstill are left out:
    // in the step where a vehicle comes to rest the speed stops falling part-way through the step.
    const fr = g.options.frameRate;
    const dt = 1 / fr;
    let checked = 0;
    let worst = 0;
    for (const tr of g.recording.tracks) {
      const m = centredMeanAcceleration(tr.ax, fr, 1);
      for (let i = 12; i + 13 < tr.t.length; i++) {
        if (tr.vx.subarray(i - 12, i + 14).includes(0)) continue;
        const dv = (tr.vx[i + 13]! - tr.vx[i - 12]!) / (25 * dt);
        worst = Math.max(worst, Math.abs(m[i]! - dv));
        checked++;
      }
    }
    expect(checked).toBeGreaterThan(100000);
    expect(worst).toBeLessThan(2e-3);
  });

  /** Reference: the documented steps written out with explicit windows and segment objects. */
  const reference = (ax: ArrayLike<number>, t: ArrayLike<number>, fr: number, window: number): number[] => {
    const a: number[] = [];
    for (let i = 0; i < ax.length; i++) {
      if (window <= 0) {
        a.push(ax[i]!);
        continue;
      }
      let sum = 0;
      let count = 0;
      for (let k = 0; k < ax.length; k++) {
        if (Math.abs(t[k]! - t[i]!) <= window / 2 + 1e-6) {
          sum += Math.round(ax[k]! * 1000);
          count++;
        }
      }
      a.push(sum / (1000 * count));
    }
    const raw: number[] = [];
    let s = LON_KEEP;
    for (const v of a) {
      if (v >= def.enter) s = LON_ACCELERATE;
      else if (v <= -def.enter) s = LON_DECELERATE;
      else if ((s === LON_ACCELERATE && v < def.exit) || (s === LON_DECELERATE && v > -def.exit)) s = LON_KEEP;
      raw.push(s);
    }
    const minF = Math.round(def.minDuration * fr);
    const segs = (codes: number[]) => {
      const out: { code: number; from: number; to: number }[] = [];
      codes.forEach((c, i) => {
        const last = out[out.length - 1];
        if (last && last.code === c) last.to = i + 1;
        else out.push({ code: c, from: i, to: i + 1 });
      });
      return out;
    };
    const step2 = raw.slice();
    for (const sg of segs(raw)) if (sg.code !== LON_KEEP && sg.to - sg.from < minF) for (let i = sg.from; i < sg.to; i++) step2[i] = LON_KEEP;
    const s2 = segs(step2);
    const out = step2.slice();
    for (let j = 1; j < s2.length - 1; j++) {
      const sg = s2[j]!;
      if (sg.code === LON_KEEP && sg.to - sg.from < minF && s2[j - 1]!.code === s2[j + 1]!.code)
        for (let i = sg.from; i < sg.to; i++) out[i] = s2[j - 1]!.code;
    }
    return out;
  };
  const phases = (codes: ArrayLike<number>): number => {
    let n = 0;
    for (let i = 0; i < codes.length; i++) if (i === 0 || codes[i] !== codes[i - 1]) n++;
    return n;
  };

  it("the generator's truth (1 s mean) agrees with a slow reference implementation on every track", () => {
    let active = 0;
    g.recording.tracks.forEach((tr, i) => {
      const ref = reference(tr.ax, tr.t, g.options.frameRate, 1);
      expect(Array.from(g.truth.tracks[i]!.longitudinal)).toEqual(ref);
      active += ref.filter((c) => c !== LON_KEEP).length;
    });
    expect(active).toBeGreaterThan(1000);
    // The fast path on all tracks against the reference on the instantaneous values (lonAverageWindow 0).
    g.recording.tracks.forEach((tr) => {
      const inst = labelLongitudinalTruth(tr.ax, g.options.frameRate, { ...def, averageWindow: 0 });
      expect(Array.from(inst)).toEqual(reference(tr.ax, tr.t, g.options.frameRate, 0));
    });
    expect(g.truth.definitions.lonEnterThreshold).toBe(0.25);
    expect(g.truth.definitions.lonMinDuration).toBe(1);
    expect(g.truth.definitions.lonAverageWindow).toBe(1);
  });

  it("averaging removes sub-second wobble: fewer phases than labels from instantaneous values (Rice 1944)", () => {
    let averaged = 0;
    let instantaneous = 0;
    g.recording.tracks.forEach((tr, i) => {
      averaged += phases(g.truth.tracks[i]!.longitudinal);
      instantaneous += phases(labelLongitudinalTruth(tr.ax, g.options.frameRate, def));
    });
    expect(averaged).toBeLessThan(instantaneous);
  });

  it("lonAverageWindow: 0 gives the instantaneous definition and leaves the motion unchanged", () => {
    const opts = { vehicleKm: 4, positionNoiseSd: 0.1 };
    const avg = generateTraffic(opts, new Rng(3));
    const inst = generateTraffic({ ...opts, lonAverageWindow: 0 }, new Rng(3));
    expect(inst.truth.definitions.lonAverageWindow).toBe(0);
    expect(inst.recording.tracks.length).toBe(avg.recording.tracks.length);
    inst.recording.tracks.forEach((tr, i) => {
      const other = avg.recording.tracks[i]!;
      expect(tr.x).toEqual(other.x);
      expect(tr.ax).toEqual(other.ax);
      expect(Array.from(inst.truth.tracks[i]!.longitudinal)).toEqual(reference(tr.ax, tr.t, inst.options.frameRate, 0));
    });
    expect(() => resolveTrafficOptions({ lonAverageWindow: -1 })).toThrow(/lonAverageWindow=-1 should be in \[0, 10\] s/);
  });
});

// Sources: run-length encoding worked by hand; error message style from the project rules.
describe("truth file and options", () => {
  it("encodeRuns/decodeRuns round-trip and truthFromJson(truthToJson(t)) restores the truth", () => {
    const codes = Int8Array.from([0, 0, 1, 1, 1, 2, 0]);
    expect(encodeRuns(codes)).toEqual([0, 2, 1, 3, 2, 1, 0, 1]);
    expect(decodeRuns([0, 2, 1, 3, 2, 1, 0, 1], 7)).toEqual(codes);
    expect(() => decodeRuns([0, 2, 1, 3], 6)).toThrow(/5 frames, expected frames=6/);
    const back = truthFromJson(truthToJson(g.truth));
    expect(back.tracks.length).toBe(g.truth.tracks.length);
    back.tracks.forEach((t, i) => {
      expect(t.lateral).toEqual(g.truth.tracks[i]!.lateral);
      expect(t.longitudinal).toEqual(g.truth.tracks[i]!.longitudinal);
    });
    expect(back.laneChanges).toEqual(g.truth.laneChanges);
    expect(back.cutIns).toEqual(g.truth.cutIns);
    expect(back.planted).toEqual(g.truth.planted);
    expect(back.definitions).toEqual(g.truth.definitions);
    expect(() => truthFromJson('{"format":"other"}', "x.json")).toThrow(InputError);
  });

  it("resolveTrafficOptions quotes the bad value and what was expected", () => {
    expect(() => resolveTrafficOptions({ lanes: 0 })).toThrow(/lanes=0 should be an integer in \[1, 8\]/);
    expect(() => resolveTrafficOptions({ truckShare: 1.5 })).toThrow(/truckShare=1.5 should be in \[0, 1\]/);
    expect(() => resolveTrafficOptions({ carSpeedMin: 40, carSpeedMax: 30 })).toThrow(/carSpeedMin=40 should be <= carSpeedMax=30/);
    expect(() => resolveTrafficOptions({ frameRate: 30 })).toThrow(/frameRate=30/);
    expect(() => resolveTrafficOptions({ nonsense: 1 } as never)).toThrow(/unknown traffic option "nonsense"/);
    expect(() => resolveTrafficOptions({ lanes: 0 })).toThrow(InputError);
  });
});
