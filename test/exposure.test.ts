import { describe, expect, it } from "vitest";
import {
  chiSquareQuantile,
  clusterExposure,
  compensatedSum,
  describeExposure,
  erfc,
  exposureClassByFrequency,
  exposureClassByTimeShare,
  exposureContext,
  inverseRegularizedGamma,
  logGamma,
  normalQuantile,
  poissonInterval,
  poissonRate,
  regularizedGammaP,
  regularizedGammaQ,
  scenarioWeights,
  toShares,
} from "../src/exposure/index.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { makeScenario, referencePython, runPython } from "./plan-fixtures.js";

const py = referencePython();

describe("gamma family", () => {
  it("logGamma matches closed forms", () => {
    // Γ(1/2) = √π; ln Γ(101) = ln(100!) (handbook values, Abramowitz & Stegun ch. 6).
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 14);
    let lnFact = 0;
    for (let k = 2; k <= 100; k++) lnFact += Math.log(k);
    expect(logGamma(101)).toBeCloseTo(lnFact, 10);
    expect(logGamma(1)).toBeCloseTo(0, 14);
    expect(logGamma(2)).toBeCloseTo(0, 14);
  });

  it("regularizedGammaP(a, x) for integer a equals the Poisson tail 1 − Σ_{k<a} e^{−x} x^k / k!", () => {
    // Identity P(n, x) = P(Poisson(x) >= n) (Abramowitz & Stegun 6.5.13), checked by direct summation.
    for (const [a, x] of [[1, 0.3], [3, 2], [10, 4.5], [10, 15], [25, 20]] as const) {
      let term = Math.exp(-x);
      let cdf = 0;
      for (let k = 0; k < a; k++) {
        cdf += term;
        term *= x / (k + 1);
      }
      expect(regularizedGammaP(a, x)).toBeCloseTo(1 - cdf, 13);
      expect(regularizedGammaQ(a, x)).toBeCloseTo(cdf, 13);
    }
  });

  it("inverseRegularizedGamma inverts P and Q across the range", () => {
    for (const a of [0.3, 1, 2.5, 10, 300, 50000])
      for (const p of [1e-10, 0.025, 0.5, 0.975]) {
        const x = inverseRegularizedGamma(a, p);
        expect(Math.abs(regularizedGammaP(a, x) - p) / p).toBeLessThan(1e-9);
        const xu = inverseRegularizedGamma(a, p, true);
        expect(Math.abs(regularizedGammaQ(a, xu) - p) / p).toBeLessThan(1e-9);
      }
  });

  it("normalQuantile and chiSquareQuantile give the handbook values", () => {
    // z_0.975 = 1.959963985, χ²_0.95(1) = 3.841459 (standard tables, e.g. Abramowitz & Stegun 26.2, 26.4).
    expect(normalQuantile(0.975)).toBeCloseTo(1.959963984540054, 12);
    expect(normalQuantile(0.5)).toBe(0);
    expect(chiSquareQuantile(0.95, 1)).toBeCloseTo(3.841458820694124, 10);
    expect(erfc(0)).toBe(1);
    expect(erfc(1)).toBeCloseTo(0.15729920705028513, 14); // erfc(1), A&S Table 7.1
  });

  it.skipIf(!py)("agrees with scipy.special / scipy.stats on a grid (reference library)", () => {
    if (!py) return;
    const as = [0.5, 1, 3.7, 20, 1000];
    const xs = [0.01, 0.9, 3, 19, 1100];
    const ps = [0.001, 0.05, 0.5, 0.95, 0.999];
    const ref = runPython(
      py,
      `import json
from scipy.special import gammainc, gammaincc, gammaincinv, gammaln
from scipy.stats import norm
as_=${JSON.stringify(as)}; xs=${JSON.stringify(xs)}; ps=${JSON.stringify(ps)}
print(json.dumps({"P":[[float(gammainc(a,x)) for x in xs] for a in as_],"Q":[[float(gammaincc(a,x)) for x in xs] for a in as_],
"inv":[[float(gammaincinv(a,p)) for p in ps] for a in as_],"ln":[float(gammaln(a)) for a in as_],"z":[float(norm.ppf(p)) for p in ps]}))`,
    ) as { P: number[][]; Q: number[][]; inv: number[][]; ln: number[]; z: number[] };
    as.forEach((a, i) => {
      expect(logGamma(a)).toBeCloseTo(ref.ln[i]!, 10);
      xs.forEach((x, j) => {
        expect(regularizedGammaP(a, x)).toBeCloseTo(ref.P[i]![j]!, 12);
        const q = regularizedGammaQ(a, x);
        const rq = ref.Q[i]![j]!;
        if (rq > 1e-300) expect(Math.abs(q - rq) / rq).toBeLessThan(1e-9);
      });
      ps.forEach((p, j) => expect(Math.abs(inverseRegularizedGamma(a, p) / ref.inv[i]![j]! - 1)).toBeLessThan(1e-11));
    });
    ps.forEach((p, j) => expect(normalQuantile(p)).toBeCloseTo(ref.z[j]!, 12));
  });
});

describe("poissonInterval (Garwood 1936)", () => {
  it("reproduces published exact Poisson limits at 95 %", () => {
    // Tables of exact Poisson confidence limits (e.g. Ulm 1990, Am. J. Epidemiol. 131:373; Documenta
    // Geigy Scientific Tables): 0 → [0, 3.689], 1 → [0.0253, 5.572], 10 → [4.795, 18.39].
    const c0 = poissonInterval(0);
    expect(c0.lower).toBe(0);
    expect(c0.upper).toBeCloseTo(3.689, 3);
    expect(c0.upper).toBeCloseTo(-Math.log(0.025), 12); // closed form for 0 events
    const c1 = poissonInterval(1);
    expect(c1.lower).toBeCloseTo(0.0253, 4);
    expect(c1.upper).toBeCloseTo(5.572, 3);
    const c10 = poissonInterval(10);
    expect(c10.lower).toBeCloseTo(4.795, 3);
    expect(c10.upper).toBeCloseTo(18.39, 2);
  });

  it("has the right coverage at 90 % and rejects bad input", () => {
    // For 0 events the two-sided 90 % upper limit is −ln 0.05 = 2.9957 (the "rule of three").
    expect(poissonInterval(0, 0.9).upper).toBeCloseTo(2.995732273553991, 12);
    expect(() => poissonInterval(-1)).toThrow(InputError);
    expect(() => poissonInterval(1.5)).toThrow(InputError);
    expect(() => poissonInterval(3, 1)).toThrow(/level=1/);
  });

  it.skipIf(!py)("matches scipy chi2.ppf for counts 0..200 (reference library)", () => {
    if (!py) return;
    const ks = [0, 1, 2, 3, 5, 8, 13, 50, 200, 12345];
    const ref = runPython(
      py,
      `import json
from scipy.stats import chi2
ks=${JSON.stringify(ks)}
print(json.dumps([[0.0 if k==0 else float(chi2.ppf(0.025,2*k)/2), float(chi2.ppf(0.975,2*k+2)/2)] for k in ks]))`,
    ) as number[][];
    ks.forEach((k, i) => {
      const ci = poissonInterval(k);
      if (k > 0) expect(Math.abs(ci.lower / ref[i]![0]! - 1)).toBeLessThan(1e-12);
      expect(Math.abs(ci.upper / ref[i]![1]! - 1)).toBeLessThan(1e-12);
    });
  });

  it("poissonRate scales the count interval by per / exposure", () => {
    const r = poissonRate(10, 2000, 1000);
    expect(r.rate).toBe(5);
    expect(r.lower).toBeCloseTo(4.795388696132437 / 2, 12);
    expect(r.upper).toBeCloseTo(18.39035604201778 / 2, 12);
  });
});

describe("compensatedSum and toShares", () => {
  it("compensatedSum([1, 1e100, 1, −1e100]) is 2 where naive summation gives 0 (Neumaier 1974)", () => {
    const v = [1, 1e100, 1, -1e100];
    expect(v.reduce((a, b) => a + b, 0)).toBe(0);
    expect(compensatedSum(v)).toBe(2);
    expect(compensatedSum(v, [0, 2])).toBe(2);
  });

  it("shares of 200 000 random weights add up to 1 within 1e-12", () => {
    const rng = new Rng(7);
    const w = Float64Array.from({ length: 200000 }, () => rng.exponential(1) * (rng.float() < 0.01 ? 1000 : 1));
    const s = toShares(w);
    expect(Math.abs(compensatedSum(s) - 1)).toBeLessThan(1e-12);
    let naive = 0;
    for (const x of s) naive += x;
    expect(Math.abs(naive - 1)).toBeLessThan(1e-12);
  });
});

describe("scenarioWeights", () => {
  it("weighs a slow long window by hours and a fast short one by km", () => {
    const jam = makeScenario(0, { seconds: 120, km: 0.2 });
    const free = makeScenario(1, { seconds: 10, km: 0.35 });
    expect(Array.from(scenarioWeights([jam, free], "km"))).toEqual([0.2, 0.35]);
    expect(Array.from(scenarioWeights([jam, free], "hours"))).toEqual([120 / 3600, 10 / 3600]);
    expect(Array.from(scenarioWeights([jam, free], "count"))).toEqual([1, 1]);
    expect(() => scenarioWeights([makeScenario(0, { km: -1 })], "km")).toThrow(InputError);
    expect(() => scenarioWeights([jam], "miles" as never)).toThrow(/weightBy="miles"/);
  });
});

describe("exposure classes (ISO 26262-3 Annex B, from memory)", () => {
  it("exposureClassByTimeShare: E2 below 1 %, E3 from 1 % to 10 %, E4 above 10 %", () => {
    expect(exposureClassByTimeShare(0.0099)).toBe("E2");
    expect(exposureClassByTimeShare(0.01)).toBe("E3");
    expect(exposureClassByTimeShare(0.1)).toBe("E3");
    expect(exposureClassByTimeShare(0.1001)).toBe("E4");
  });

  it("exposureClassByFrequency reads almost-every-drive and yearly counts", () => {
    expect(exposureClassByFrequency({ probabilityPerDrive: 0.95, occurrencesPerDrive: 3 }).class).toBe("E4");
    expect(exposureClassByFrequency({ probabilityPerDrive: 0.2, occurrencesPerDrive: 0.2 }).class).toBeNull();
    // 0.2 per drive × 500 drives a year = 100 a year ≥ 12 → E3; 0.004 × 500 = 2 → E2; 0.001 × 500 = 0.5 → E1.
    expect(exposureClassByFrequency({ probabilityPerDrive: 0.2, occurrencesPerDrive: 0.2, drivesPerYear: 500 }).class).toBe("E3");
    expect(exposureClassByFrequency({ probabilityPerDrive: 0.004, occurrencesPerDrive: 0.004, drivesPerYear: 500 }).class).toBe("E2");
    expect(exposureClassByFrequency({ probabilityPerDrive: 0.001, occurrencesPerDrive: 0.001, drivesPerYear: 500 }).class).toBe("E1");
  });
});

describe("clusterExposure", () => {
  // Two drives; cluster 0 = 3 windows, cluster 1 = 2 windows, one noise window.
  const scenarios = [
    makeScenario(0, { egoTrack: 1, window: 0, km: 0.5, seconds: 20 }),
    makeScenario(1, { egoTrack: 1, window: 1, km: 0.3, seconds: 10 }),
    makeScenario(2, { egoTrack: 1, window: 2, km: 0.2, seconds: 30 }),
    makeScenario(3, { egoTrack: 2, window: 0, km: 0.4, seconds: 15 }),
    makeScenario(4, { egoTrack: 2, window: 1, km: 0.4, seconds: 15 }),
    makeScenario(5, { egoTrack: 2, window: 2, km: 0.2, seconds: 10 }),
  ];
  const labels = Int32Array.from([0, 1, 0, 0, 1, -1]);
  const medoids = Int32Array.from([3, 1]);

  it("gives km, hours, shares and rates per cluster with noise in its own row", () => {
    const t = clusterExposure({ scenarios, labels, medoids });
    expect(t.rows.map((r) => r.cluster)).toEqual([0, 1, -1]);
    const [c0, c1, noise] = t.rows;
    expect(c0!.km).toBeCloseTo(1.1, 14);
    expect(c0!.share).toBeCloseTo(1.1 / 2.0, 14);
    expect(c0!.hours).toBeCloseTo(65 / 3600, 14);
    expect(c0!.timeShare).toBeCloseTo(65 / 100, 14);
    expect(c0!.scenarios).toBe(3);
    expect(c0!.drives).toBe(2);
    expect(c0!.medoidId).toBe("orrowind-a/2/0");
    // 3 occurrences in 2 km → 1500 per 1000 km; interval = Garwood(3) · 500.
    const g3 = poissonInterval(3);
    expect(c0!.ratePer1000km.rate).toBeCloseTo(1500, 9);
    expect(c0!.ratePer1000km.lower).toBeCloseTo(g3.lower * 500, 9);
    expect(c0!.ratePer1000km.upper).toBeCloseTo(g3.upper * 500, 9);
    expect(c0!.exposureClass).toBe("E4");
    expect(c1!.driveShare).toBe(1);
    expect(noise!.medoid).toBeNull();
    expect(noise!.share).toBeCloseTo(0.1, 14);
    expect(noise!.exposureClass).toBe("E3"); // 10 s of 100 s is exactly 10 % → E3 (1–10 % inclusive)
    expect(Math.abs(t.shareSum - 1)).toBeLessThan(1e-12);
    expect(Math.abs(t.timeShareSum - 1)).toBeLessThan(1e-12);
  });

  it("shares of 50 000 random scenarios in 300 clusters plus noise add up to 1 within 1e-12", () => {
    const rng = new Rng(11);
    const many = Array.from({ length: 50000 }, (_, i) =>
      makeScenario(i, { egoTrack: i % 97, window: i, km: rng.exponential(3) * (rng.float() < 0.05 ? 100 : 1), seconds: 1 + rng.exponential(0.1) }),
    );
    const lab = Int32Array.from({ length: many.length }, () => (rng.float() < 0.1 ? -1 : rng.int(300)));
    const t = clusterExposure({ scenarios: many, labels: lab });
    expect(t.rows.length).toBe(301);
    let plain = 0;
    for (const r of t.rows) plain += r.share;
    expect(Math.abs(plain - 1)).toBeLessThan(1e-12);
    expect(Math.abs(t.shareSum - 1)).toBeLessThan(1e-12);
    expect(Math.abs(t.timeShareSum - 1)).toBeLessThan(1e-12);
  });

  it("rejects a medoid outside its cluster, mismatched labels and an all-zero catalogue", () => {
    expect(() => clusterExposure({ scenarios, labels, medoids: Int32Array.from([1, 1]) })).toThrow(/medoids\[0\]=1 is not a member of cluster 0/);
    expect(() => clusterExposure({ scenarios, labels: Int32Array.from([0, 1]) })).toThrow(InputError);
    expect(() => exposureContext([makeScenario(0, { km: 0 })])).toThrow(/0 km/);
  });

  it("describeExposure uses the typical drive length for the per-drive probability when given", () => {
    const ctx = exposureContext(scenarios, { typicalDriveKm: 50, drivesPerYear: 400 });
    const f = describeExposure(ctx, [5]);
    // 1 occurrence in 2 km → 0.5 per km → 25 per 50-km drive → P(≥1) = 1 − e^−25 → "almost every drive".
    expect(f.frequency.class).toBe("E4");
    const ctx2 = exposureContext(scenarios, { typicalDriveKm: 0.01, drivesPerYear: 400 });
    // 0.5 per km × 0.01 km = 0.005 per drive × 400 = 2 a year → E2.
    expect(exposureContext(scenarios).drives).toBe(2);
    expect(describeExposure(ctx2, [5]).frequency.class).toBe("E2");
  });
});
