import { describe, expect, it } from "vitest";
import {
  abundance,
  additionalSamplesForShare,
  catalogueCoverage,
  chao1,
  clusterKinds,
  couponCollector,
  couponCollectorEqual,
  discoveryCurve,
  expectedRichness,
  extrapolatedRichness,
  frequencyCounts,
  groupProbabilities,
  harmonicNumber,
  KM_PER_MILE,
  parseTypeKey,
  rarefiedRichness,
  scenarioTypeKey,
  scenarioTypeKeys,
  unseenMass,
  zeroFailureDistance,
  zeroFailureRateBound,
  zipfProbabilities,
} from "../src/coverage/index.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { makeScenario, referencePython, runPython } from "./plan-fixtures.js";

const py = referencePython();

// Check values from the issue: counts [5, 3, 2, 1, 1, 1] (n = 13, S_obs = 6, f1 = 3, f2 = 1).
const SMALL = [5, 3, 2, 1, 1, 1];
// iNEXT spider data (Ellison et al. 2010), as printed in the iNEXT vignette "A Quick Introduction to
// iNEXT via Examples" (Hsieh, Ma & Chao 2016): Girdled n = 168, S_obs = 26, f1 = 12, f2 = 4;
// Logged n = 252, S_obs = 37, f1 = 14, f2 = 4 (the vectors reproduce the printed f1..f10).
const GIRDLED = [46, 22, 17, 15, 15, 9, 8, 6, 6, 4, 2, 2, 2, 2, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1];
const LOGGED = [88, 22, 16, 15, 13, 10, 8, 8, 7, 7, 7, 5, 4, 4, 4, 3, 3, 3, 3, 2, 2, 2, 2, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1, 1];

/** Exact E[distinct] in a random m-subset by enumerating every subset (slow reference for rarefaction). */
function rarefyByEnumeration(counts: number[], m: number): number {
  const items: number[] = [];
  counts.forEach((c, k) => {
    for (let j = 0; j < c; j++) items.push(k);
  });
  const n = items.length;
  let total = 0;
  let subsets = 0;
  const pick: number[] = [];
  const rec = (start: number): void => {
    if (pick.length === m) {
      total += new Set(pick.map((i) => items[i])).size;
      subsets++;
      return;
    }
    for (let i = start; i <= n - (m - pick.length); i++) {
      pick.push(i);
      rec(i + 1);
      pick.pop();
    }
  };
  rec(0);
  return total / subsets;
}

describe("abundance and unseen mass", () => {
  it("frequencyCounts and abundance count kinds deterministically", () => {
    const fc = frequencyCounts(SMALL);
    expect([fc.n, fc.sObs, fc.f1, fc.f2]).toEqual([13, 6, 3, 1]);
    const ab = abundance(["b", "a", "c", "a", "b", "d"]);
    expect(ab.kinds).toEqual(["a", "b", "c", "d"]);
    expect(ab.counts).toEqual([2, 2, 1, 1]);
    expect(() => frequencyCounts([0, 0])).toThrow(InputError);
    expect(() => frequencyCounts([1.5])).toThrow(/expected an integer count/);
  });

  it("unseenMass([5,3,2,1,1,1]) = f1/N = 3/13 = 0.230769 (Good 1953; check value from the issue)", () => {
    expect(unseenMass(SMALL)).toBeCloseTo(0.230769, 6);
  });

  it("unseenMass 'chao-jost' reproduces iNEXT's printed sample coverage (Girdled 0.9289, Logged 0.9446)", () => {
    expect(1 - unseenMass(GIRDLED, "chao-jost")).toBeCloseTo(0.9289, 4);
    expect(1 - unseenMass(LOGGED, "chao-jost")).toBeCloseTo(0.9446, 4);
  });
});

describe("chao1", () => {
  it("bias-corrected 7.5 and classic 10.5 for [5,3,2,1,1,1] (check values from the issue)", () => {
    expect(chao1(SMALL).estimate).toBeCloseTo(7.5, 12);
    expect(chao1(SMALL, { variant: "classic" }).estimate).toBeCloseTo(10.5, 12);
  });

  it("classic with (n−1)/n matches iNEXT's printed estimate, s.e. and log-normal interval (spider data)", () => {
    // iNEXT vignette $AsyEst: Girdled 43.893, s.e. 14.306, 95 % [30.511, 96.971];
    // Logged 61.403, s.e. 18.532, 95 % [43.502, 128.583].
    const g = chao1(GIRDLED, { variant: "classic", finiteSampleFactor: true });
    expect(g.estimate).toBeCloseTo(43.893, 3);
    expect(g.se).toBeCloseTo(14.306, 3);
    expect(g.lower).toBeCloseTo(30.511, 3);
    expect(g.upper).toBeCloseTo(96.971, 3);
    const l = chao1(LOGGED, { variant: "classic", finiteSampleFactor: true });
    expect(l.estimate).toBeCloseTo(61.403, 3);
    expect(l.se).toBeCloseTo(18.532, 3);
    expect(l.lower).toBeCloseTo(43.502, 3);
    expect(l.upper).toBeCloseTo(128.583, 3);
  });

  it("matches Chao & Chiu (2016) edge-forest values 461.625 (Chao1) and 458.016 (Chao1-bc)", () => {
    // Frequency counts as transcribed in the tabula R package tests (test-Chao.R), from Chao & Chiu 2016.
    const x = [...Array.from({ length: 21 }, (_, i) => i + 1), 23, 25, 27, 28, 30, 32, 34, 35, 36, 37, 41, 45, 46, 49, 52, 89, 110, 123, 140];
    const times = [113, 50, 39, 29, 15, 11, 13, 5, 6, 6, 3, 4, 3, 5, 2, 5, 2, 2, 2, 2, 1, 2, 1, 1, 1, 1, 1, 0, 0, 2, 1, 1, 1, 1, 1, 0, 1, 1, 0, 0];
    const edge: number[] = [];
    x.forEach((v, i) => {
      for (let k = 0; k < times[i]!; k++) edge.push(v);
    });
    expect(chao1(edge, { variant: "classic", finiteSampleFactor: true }).estimate).toBeCloseTo(461.625, 3);
    expect(chao1(edge, { variant: "bias-corrected", finiteSampleFactor: true }).estimate).toBeCloseTo(458.016, 3);
  });

  it("the interval never falls below S_obs, and f1 <= 1 uses the no-unseen-term interval", () => {
    const r = chao1([4, 3, 2, 2, 1]);
    expect(r.f0).toBe(0);
    expect(r.estimate).toBe(5);
    expect(r.lower).toBeGreaterThanOrEqual(5);
    expect(r.upper).toBeGreaterThan(5);
    // Bias-corrected with f2 = 0: 3 singletons, f0 = 3·2/2 = 3; variance by the f2 = 0 formula.
    const z = chao1([1, 1, 1, 5]);
    expect(z.estimate).toBe(7);
    expect(z.variance).toBeCloseTo(3 + (3 * 25) / 4 - 81 / (4 * 7), 12);
    expect(z.lower).toBeGreaterThan(4);
  });
});

describe("rarefaction and extrapolation", () => {
  it("rarefiedRichness([5,3,2,1,1,1], m) = 1.820513 / 3.555556 / 5.265734 at 2 / 5 / 10 (Hurlbert 1971; issue)", () => {
    expect(rarefiedRichness(SMALL, 2)).toBeCloseTo(1.820513, 6);
    expect(rarefiedRichness(SMALL, 5)).toBeCloseTo(3.555556, 6);
    expect(rarefiedRichness(SMALL, 10)).toBeCloseTo(5.265734, 6);
    // tabula (R) snapshot for the same counts, Magurran (1988) trap 2: m = 3, 4, 6, 7.
    expect(rarefiedRichness(SMALL, 3)).toBeCloseTo(2.5, 6);
    expect(rarefiedRichness(SMALL, 4)).toBeCloseTo(3.06993, 5);
    expect(rarefiedRichness(SMALL, 6)).toBeCloseTo(3.97669, 5);
    expect(rarefiedRichness(SMALL, 7)).toBeCloseTo(4.348485, 6);
    expect(rarefiedRichness(SMALL, 13)).toBe(6);
  });

  it("rarefiedRichness equals exhaustive enumeration of every subset (slow reference)", () => {
    for (const m of [1, 2, 5, 8, 12]) expect(rarefiedRichness(SMALL, m)).toBeCloseTo(rarefyByEnumeration(SMALL, m), 12);
    const other = [4, 4, 3, 1, 1];
    for (const m of [3, 7, 10]) expect(rarefiedRichness(other, m)).toBeCloseTo(rarefyByEnumeration(other, m), 12);
  });

  it("matches iNEXT's printed interpolated and extrapolated richness for Girdled", () => {
    // iNEXT vignette $iNextEst: m = 10 → 6.479, 19 → 9.450, 168 → 26, 327 → 34.396, 336 → 34.731
    // (iNEXT's f0 uses the (n−1)/n factor).
    const f0 = chao1(GIRDLED, { variant: "classic", finiteSampleFactor: true }).f0;
    expect(rarefiedRichness(GIRDLED, 10)).toBeCloseTo(6.479, 3);
    expect(rarefiedRichness(GIRDLED, 19)).toBeCloseTo(9.45, 3);
    expect(expectedRichness(GIRDLED, 168)).toBe(26);
    expect(extrapolatedRichness(GIRDLED, 327, { f0 })).toBeCloseTo(34.396, 3);
    expect(extrapolatedRichness(GIRDLED, 336, { f0 })).toBeCloseTo(34.731, 3);
  });

  it("extrapolation starts at S_obs and tends to the Chao1 estimate", () => {
    const c = chao1(GIRDLED);
    expect(extrapolatedRichness(GIRDLED, 168)).toBe(26);
    expect(extrapolatedRichness(GIRDLED, 168 * 1e6)).toBeCloseTo(c.estimate, 9);
    expect(() => extrapolatedRichness(GIRDLED, 100)).toThrow(/should be >= n=168/);
    expect(() => rarefiedRichness(GIRDLED, 200)).toThrow(/should be <= n=168/);
  });
});

describe("additionalSamplesForShare (Chao et al. 2009)", () => {
  it("is (n f1 / (2 f2)) ln[f0 / ((1 − g) Ŝ)] with the classic f0 (Eq. 12)", () => {
    const n = 168;
    const f0 = (12 * 12) / 8;
    const s = 26 + f0;
    const m = additionalSamplesForShare(GIRDLED, 0.9, { variant: "classic" });
    expect(m).toBeCloseTo(((n * 12) / 8) * Math.log(f0 / (0.1 * s)), 10);
  });

  it("'exact' solves the Shen–Chao–Lin extrapolation exactly and approaches Eq. 12 for large n", () => {
    const mExact = additionalSamplesForShare(GIRDLED, 0.9, { method: "exact" });
    const c = chao1(GIRDLED);
    expect(extrapolatedRichness(GIRDLED, 168 + mExact, { f0: c.f0 })).toBeCloseTo(0.9 * c.estimate, 9);
    // Scale the sample 100×: counts ×100 keep f1 = f2 = 0, so use a large sample with the same f1, f2.
    const big = [...GIRDLED.filter((x) => x > 2).map((x) => x * 1000), ...GIRDLED.filter((x) => x <= 2)];
    const a = additionalSamplesForShare(big, 0.9);
    const b = additionalSamplesForShare(big, 0.9, { method: "exact" });
    expect(Math.abs(a / b - 1)).toBeLessThan(1e-4);
  });

  it("is 0 when the share is already reached and Infinity for g = 1", () => {
    expect(additionalSamplesForShare(GIRDLED, 0.5)).toBe(0);
    expect(additionalSamplesForShare(GIRDLED, 1)).toBe(Infinity);
    expect(additionalSamplesForShare([3, 3, 2], 0.99)).toBe(0);
  });
});

describe("coupon collector", () => {
  it("equal probabilities: n H_n = 14.7, 224.96027, 518.73775 for n = 6, 50, 100 (issue check values)", () => {
    expect(couponCollectorEqual(6).expected).toBeCloseTo(14.7, 12);
    expect(couponCollectorEqual(50).expected).toBeCloseTo(224.96027, 5);
    expect(couponCollectorEqual(100).expected).toBeCloseTo(518.73775, 5);
    // n = 50 million: 9.1524 × 10⁸.
    expect(couponCollectorEqual(5e7).expected / 1e8).toBeCloseTo(9.1524, 4);
    // H_n asymptotic branch agrees with direct summation at the switch-over.
    let h = 0;
    for (let k = 1000001; k >= 1; k--) h += 1 / k;
    expect(harmonicNumber(1000001)).toBeCloseTo(h, 11);
  });

  it("the integral reproduces n H_n for equal groups, and 19/3 for p = (1/2, 1/4, 1/4) exactly", () => {
    expect(couponCollector([{ p: 1 / 50, count: 50 }]).expected).toBeCloseTo(224.96027, 5);
    expect(couponCollector([{ p: 2e-8, count: 5e7 }]).expected / 1e8).toBeCloseTo(9.1524, 4);
    expect(couponCollector([{ p: 0.5, count: 1 }, { p: 0.25, count: 2 }]).expected).toBeCloseTo(19 / 3, 11);
  });

  it("matches inclusion–exclusion E = Σ_{S≠∅} (−1)^{|S|+1} / P(S) for random small distributions (slow reference)", () => {
    const rng = new Rng(3);
    for (let trial = 0; trial < 5; trial++) {
      const k = 3 + rng.int(8);
      const w = Array.from({ length: k }, () => 0.05 + rng.float());
      const tot = w.reduce((a, b) => a + b, 0);
      const p = w.map((x) => x / tot);
      let e = 0;
      for (let mask = 1; mask < 1 << k; mask++) {
        let ps = 0;
        let bits = 0;
        for (let j = 0; j < k; j++) if (mask & (1 << j)) {
          ps += p[j]!;
          bits++;
        }
        e += (bits % 2 === 1 ? 1 : -1) / ps;
      }
      expect(couponCollector(p.map((x) => ({ p: x, count: 1 }))).expected).toBeCloseTo(e, 9);
    }
  });

  it("Zipf s = 1, n = 10: 56.246300 (issue check value)", () => {
    expect(couponCollector(zipfProbabilities(10, 1)).expected).toBeCloseTo(56.2463, 5);
  });

  it("grouped Zipf (δ = 1e-3) agrees with an ungrouped brute-force integral for n = 5000 (slow reference)", () => {
    const n = 5000;
    let h = 0;
    for (let i = n; i >= 1; i--) h += 1 / i;
    const p = Array.from({ length: n }, (_, i) => 1 / ((i + 1) * h));
    // Brute force: trapezoid rule in u = ln t on a fine grid, every term evaluated.
    const f = (u: number): number => {
      const t = Math.exp(u);
      let lg = 0;
      for (const pi of p) lg += Math.log(-Math.expm1(-pi * t));
      return t * -Math.expm1(lg);
    };
    const lo = Math.log(1);
    const hi = Math.log(5e6);
    const steps = 4000;
    const hstep = (hi - lo) / steps;
    let s = 0.5 * (f(lo) + f(hi));
    for (let k = 1; k < steps; k++) s += f(lo + k * hstep);
    const brute = 1 + s * hstep; // ∫₀¹ (1 − F) dt ≈ 1 since F(1) is negligible
    const z = zipfProbabilities(n, 1, 1e-3);
    expect(z.groups.length).toBeLessThan(n);
    const r = couponCollector(z);
    expect(Math.abs(r.expected / brute - 1)).toBeLessThan(Math.max(z.relativeErrorBound, 1e-9));
    const exact = couponCollector(zipfProbabilities(n, 1, 0));
    expect(Math.abs(exact.expected / brute - 1)).toBeLessThan(1e-8);
  });

  it("Zipf s = 1, n = 50 million: expectation ≈ 1.414e10, 99.9 % quantile ≈ 1.97e10 (issue check values)", () => {
    const r = couponCollector(zipfProbabilities(5e7, 1, 1e-3), { quantiles: [0.999] });
    expect(r.expected / 1e10).toBeCloseTo(1.414, 3);
    expect(r.quantiles[0]!.draws / 1e10).toBeCloseTo(1.97, 2);
    expect(r.relativeErrorBound).toBeLessThanOrEqual(1e-3);
    // A finer grouping moves the result by far less than the bound.
    const fine = couponCollector(zipfProbabilities(5e7, 1, 2e-4));
    expect(Math.abs(fine.expected / r.expected - 1)).toBeLessThan(1e-5);
  });

  it("quantiles are those of the Poissonized time: Monte Carlo CDF at the reported quantiles", () => {
    // Simulate T = time of the last first arrival of independent Poisson streams (rates p_i); the
    // empirical CDF at t_q should be q within 4 standard errors √(q(1−q)/N).
    const rng = new Rng(20240);
    const p = [0.5, 0.25, 0.25];
    const qs = [0.5, 0.9, 0.99];
    const r = couponCollector(p.map((x) => ({ p: x, count: 1 })), { quantiles: qs });
    const N = 40000;
    const hits = qs.map(() => 0);
    let mean = 0;
    for (let k = 0; k < N; k++) {
      let t = 0;
      for (const pi of p) t = Math.max(t, rng.exponential(pi));
      mean += t / N;
      r.quantiles.forEach((qq, j) => {
        if (t <= qq.draws) hits[j]!++;
      });
    }
    qs.forEach((q, j) => expect(Math.abs(hits[j]! / N - q)).toBeLessThan(4 * Math.sqrt((q * (1 - q)) / N)));
    // Mean of T: SD of T is below 7 here, so 4 SE ≈ 0.14.
    expect(Math.abs(mean - 19 / 3)).toBeLessThan(0.14);
    // Equal case: closed-form quantile.
    const e = couponCollectorEqual(6, { quantiles: [0.9] });
    expect(Math.pow(-Math.expm1(-e.quantiles[0]!.draws / 6), 6)).toBeCloseTo(0.9, 12);
  });

  it("groupProbabilities merges exact ties (δ = 0) and near ties within δ", () => {
    const g0 = groupProbabilities([0.25, 0.25, 0.5]);
    expect(g0.groups).toEqual([{ p: 0.5, count: 1 }, { p: 0.25, count: 2 }]);
    expect(g0.relativeErrorBound).toBe(0);
    const g1 = groupProbabilities([0.3, 0.3003, 0.3997], 0.002);
    expect(g1.groups.length).toBe(2);
    expect(g1.relativeErrorBound).toBeCloseTo(0.3003 / 0.3 - 1, 12);
    expect(() => couponCollector([{ p: 0.5, count: 1 }])).toThrow(/add up to 0.5/);
    expect(couponCollector([{ p: 0.1, count: 1 }], { partial: true }).expected).toBeCloseTo(10, 9);
  });

  it.skipIf(!py)("agrees with scipy.integrate.quad on Zipf n = 10 and n = 200 (reference library)", () => {
    if (!py) return;
    const ref = runPython(
      py,
      `import json, numpy as np
from scipy.integrate import quad
out=[]
for n in (10, 200):
    p = 1.0/np.arange(1, n+1); p /= p.sum()
    f = lambda t: 1.0 - np.prod(-np.expm1(-p*t))
    v = 0.0; a = 0.0
    for b in np.geomspace(1, 1e7, 80):
        v += quad(f, a, b, epsabs=0, epsrel=1e-12, limit=200)[0]; a = b
    out.append(v)
print(json.dumps(out))`,
    ) as number[];
    expect(couponCollector(zipfProbabilities(10, 1)).expected).toBeCloseTo(ref[0]!, 8);
    expect(Math.abs(couponCollector(zipfProbabilities(200, 1, 0)).expected / ref[1]! - 1)).toBeLessThan(1e-9);
  });
});

describe("zero-failure demonstration (Kalra & Paddock 2016)", () => {
  it("1.09 fatalities per 100 million miles at 95 % needs about 275 million miles", () => {
    const miles = zeroFailureDistance(1.09e-8, 0.95);
    expect(miles / 1e6).toBeCloseTo(274.8, 1);
    expect(zeroFailureRateBound(miles, 0.95)).toBeCloseTo(1.09e-8, 20);
    expect(zeroFailureDistance(1.09e-8 / KM_PER_MILE) / miles).toBeCloseTo(KM_PER_MILE, 12);
    expect(() => zeroFailureDistance(0)).toThrow(InputError);
  });
});

describe("scenarioTypeKey", () => {
  it("builds the documented readable signature (coarse defaults and the fine options)", () => {
    const s = makeScenario(0, {
      lateral: ["lane-keep", "lane-change-left"],
      longitudinal: ["keep", "accelerate"],
      slotOccupancy: [0.9, 0.5, 0, 0, 0.51, 0, 0, 0],
      events: [{ kind: "cut-in", t: 3, other: 7 }],
    });
    expect(scenarioTypeKey(s)).toBe("LCL|A|occ:ahead,left|ev:cut-in");
    const fine = { lateral: "sequence", longitudinal: "sequence", occupancy: "slots" } as const;
    expect(scenarioTypeKey(s, fine)).toBe("LK>LCL|K>A|occ:ahead,left-behind|ev:cut-in");
    expect(scenarioTypeKey(s, { longitudinal: "none" })).toBe("LCL|occ:ahead,left|ev:cut-in");
    expect(scenarioTypeKey(s, { occupiedAbove: 0.95 })).toBe("LCL|A|occ:-|ev:cut-in");
    // Lane keeping only; both accelerating and decelerating; the right lane beside.
    const k = makeScenario(1, { lateral: ["lane-keep"], longitudinal: ["decelerate", "keep", "accelerate"], slotOccupancy: [0, 0, 0, 0, 0, 0.8, 0, 0] });
    expect(scenarioTypeKey(k)).toBe("LK|A+D|occ:right|ev:-");
    expect(parseTypeKey(scenarioTypeKey(k)).longitudinal).toEqual(["A", "D"]);
  });

  it("orders events by SCENE_EVENTS, appends sorted flags once, and cuts long sequences with '+'", () => {
    const s = makeScenario(0, {
      lateral: [],
      longitudinal: ["keep", "decelerate", "keep", "accelerate"],
      slotOccupancy: [0, 0, 0, 0, 0, 0, 0, 0],
      events: [
        { kind: "closing-in", t: 1, other: 2 },
        { kind: "cut-in", t: 2, other: 3 },
        { kind: "cut-in", t: 4, other: 5 },
      ],
      criticality: { minTtc: 1, minThw: 0.4, maxDrac: 3, maxDecel: 7, flags: ["thw", "harsh-braking", "thw"] },
    });
    const key = scenarioTypeKey(s, { lateral: "sequence", longitudinal: "sequence" });
    expect(key).toBe("-|K>D>K…|occ:-|ev:cut-in,closing-in,harsh-braking,thw");
    expect(scenarioTypeKey(s, { includeFlags: false })).toBe("LK|A+D|occ:-|ev:cut-in,closing-in");
    expect(parseTypeKey(key)).toEqual({
      lateral: [],
      lateralCut: false,
      longitudinal: ["K", "D", "K"],
      longitudinalCut: true,
      occupied: [],
      events: ["cut-in", "closing-in", "harsh-braking", "thw"],
    });
    const lc = makeScenario(2, { lateral: ["lane-change-left", "lane-keep", "lane-change-right", "lane-keep", "lane-change-left", "lane-keep", "lane-change-right"] });
    expect(scenarioTypeKey(lc).split("|")[0]).toBe("LCL>LCR>LCL…");
  });

  it("rejects a wrong slot count and bad options", () => {
    expect(() => scenarioTypeKey(makeScenario(0, { slotOccupancy: [1, 0] }))).toThrow(/2 slot occupancy values; expected 8/);
    expect(() => scenarioTypeKeys([makeScenario(0)], { occupiedAbove: 1 })).toThrow(/occupiedAbove=1/);
    expect(() => scenarioTypeKeys([makeScenario(0)], { maxManeuvers: 0 })).toThrow(/maxManeuvers=0/);
    expect(() => scenarioTypeKeys([makeScenario(0)], { occupancy: "lanes" as never })).toThrow(/occupancy="lanes"/);
  });
});

describe("discoveryCurve and catalogueCoverage", () => {
  const kinds = ["a", "a", "b", "a", "c", "b", "a", "d", "a", "e", "c", "f", "b"]; // counts a5 b3 c2 d1 e1 f1
  const km = kinds.map((_, i) => 0.1 + 0.01 * i);

  it("discoveryCurve: observed staircase in order, expected curve = rarefaction / S_obs / extrapolation", () => {
    const d = discoveryCurve(kinds, km, { knots: 5 });
    expect(d.observed.distinct).toEqual([1, 1, 2, 2, 3, 3, 3, 4, 4, 5, 5, 6, 6]);
    expect(d.observed.km[12]).toBeCloseTo(km.reduce((a, b) => a + b, 0), 12);
    const at = (m: number): number => d.expected.distinct[d.expected.scenarios.indexOf(m)]!;
    expect(at(13)).toBe(6);
    expect(d.expected.method[d.expected.scenarios.indexOf(13)]).toBe("observed");
    expect(at(7)).toBeCloseTo(rarefiedRichness(SMALL, 7), 12);
    expect(at(26)).toBeCloseTo(extrapolatedRichness(SMALL, 26), 12);
    expect(d.asymptote).toBeCloseTo(7.5, 12);
    for (let j = 1; j < d.expected.distinct.length; j++) expect(d.expected.distinct[j]!).toBeGreaterThanOrEqual(d.expected.distinct[j - 1]!);
  });

  it("catalogueCoverage assembles unseen mass, Chao1, effort and coupon views", () => {
    const c = catalogueCoverage(kinds, km, {}, "type keys");
    expect(c.observed).toBe(6);
    expect(c.unseenMass).toBeCloseTo(3 / 13, 14);
    expect(c.chao1.estimate).toBeCloseTo(7.5, 12);
    expect(c.table[0]).toEqual({ kind: "a", count: 5 });
    // f0 = 1.5 rounds to 2 unseen kinds: equal model over 8 kinds, E = 8 H_8, further 8 H_2 = 12.
    expect(c.couponCollector.equal.kinds).toBe(8);
    expect(c.couponCollector.equal.expectedScenarios).toBeCloseTo(8 * harmonicNumber(8), 12);
    expect(c.couponCollector.equal.additionalScenarios).toBeCloseTo(12, 12);
    // Estimated model: 2 unseen kinds share the Chao–Jost mass u = (3/13)(36/38); finding both takes
    // H_2 · 2 / u = 3 / u = 13 · 38 / 36 draws.
    expect(c.couponCollector.estimated.additionalScenarios).toBeCloseTo((13 * 38) / 36, 12);
    expect(c.couponCollector.estimated.kinds).toBe(8);
    expect(c.effort.map((e) => e.share)).toEqual([0.9, 0.95, 0.99]);
    expect(c.effort[0]!.additionalKm).toBeCloseTo(c.effort[0]!.additionalScenarios * c.kmPerScenario, 12);
    expect(() => catalogueCoverage(kinds, km, { targetShares: [1] })).toThrow(/targetShares contains 1/);
  });

  it("catalogueCoverage stays finite when every kind was seen once", () => {
    const c = catalogueCoverage(["a", "b", "c"], [1, 1, 1]);
    expect(c.unseenMass).toBe(1);
    expect(c.chao1.estimate).toBe(6); // 3 + 3·2/2
    expect(Number.isFinite(c.couponCollector.estimated.expectedScenarios)).toBe(true);
    expect(catalogueCoverage(["a"], [2]).chao1.estimate).toBe(1);
  });

  it("clusterKinds counts each noise scenario as its own kind or leaves noise out", () => {
    const labels = Int32Array.from([0, 0, -1, 1, -1]);
    expect(clusterKinds(labels).kinds).toEqual(["c0", "c0", "noise:2", "c1", "noise:4"]);
    const ex = clusterKinds(labels, "excluded");
    expect(ex.kinds).toEqual(["c0", "c0", "c1"]);
    expect(Array.from(ex.indices)).toEqual([0, 1, 3]);
  });
});
