import { execFileSync } from "node:child_process";
import { existsSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { InputError } from "../src/core/errors.js";
import {
  assignLanes,
  deriveMotion,
  savitzkyGolay,
  savitzkyGolayCoefficients,
  splitAtGaps,
} from "../src/kinematics/index.js";

/** Slow, obviously correct reference: fit the polynomial by least squares on unscaled sample offsets
 * (normal equations, Gaussian elimination with partial pivoting) and evaluate its derivative. */
function slowSavgol(v: Float64Array, w: number, p: number, d: number, dt: number): Float64Array {
  const n = v.length;
  const m = (w - 1) / 2;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    const start = Math.min(Math.max(i - m, 0), n - w);
    const c = start + m; // centre of the fitted window; evaluate at offset i - c
    const G: number[][] = [];
    for (let a = 0; a <= p; a++) {
      const r: number[] = [];
      for (let b = 0; b <= p; b++) {
        let s = 0;
        for (let k = start; k < start + w; k++) s += Math.pow(k - c, a + b);
        r.push(s);
      }
      let s = 0;
      for (let k = start; k < start + w; k++) s += Math.pow(k - c, a) * v[k]!;
      r.push(s);
      G.push(r);
    }
    for (let col = 0; col <= p; col++) {
      let piv = col;
      for (let r = col + 1; r <= p; r++) if (Math.abs(G[r]![col]!) > Math.abs(G[piv]![col]!)) piv = r;
      [G[col], G[piv]] = [G[piv]!, G[col]!];
      for (let r = 0; r <= p; r++) {
        if (r === col) continue;
        const f = G[r]![col]! / G[col]![col]!;
        for (let k = col; k <= p + 1; k++) G[r]![k]! -= f * G[col]![k]!;
      }
    }
    const coef = G.map((r, j) => r[p + 1]! / r[j]!);
    const z = i - c;
    let s = 0;
    for (let j = d; j <= p; j++) {
      let f = 1;
      for (let q = 0; q < d; q++) f *= j - q;
      s += coef[j]! * f * Math.pow(z, j - d);
    }
    out[i] = s / Math.pow(dt, d);
  }
  return out;
}

function expectClose(a: ArrayLike<number>, b: ArrayLike<number>, tol: number): void {
  expect(a.length).toBe(b.length);
  let worst = 0;
  for (let i = 0; i < a.length; i++) worst = Math.max(worst, Math.abs(a[i]! - b[i]!));
  expect(worst).toBeLessThan(tol);
}

describe("savitzkyGolayCoefficients", () => {
  // Published convolution weights: Savitzky & Golay, Anal. Chem. 36 (1964) 1627, tables of
  // "convoluting integers" (also reproduced in Numerical Recipes §14.9).
  it("reproduces the 5- and 7-point quadratic smoothing weights (-3,12,17,12,-3)/35 and (-2,3,6,7,6,3,-2)/21", () => {
    expectClose(savitzkyGolayCoefficients(5, 2, 0)[2]!, [-3, 12, 17, 12, -3].map((c) => c / 35), 1e-14);
    expectClose(savitzkyGolayCoefficients(7, 2, 0)[3]!, [-2, 3, 6, 7, 6, 3, -2].map((c) => c / 21), 1e-14);
    // Cubic centre weights equal the quadratic ones (odd term vanishes by symmetry) — same 1964 table.
    expectClose(savitzkyGolayCoefficients(7, 3, 0)[3]!, [-2, 3, 6, 7, 6, 3, -2].map((c) => c / 21), 1e-14);
  });
  it("reproduces the 9-point quartic smoothing weights (15,-55,30,135,179,135,30,-55,15)/429", () => {
    // Savitzky & Golay 1964, quartic/quintic smoothing table.
    expectClose(savitzkyGolayCoefficients(9, 4, 0)[4]!, [15, -55, 30, 135, 179, 135, 30, -55, 15].map((c) => c / 429), 1e-13);
  });
  it("reproduces the published derivative weights", () => {
    // Savitzky & Golay 1964: 5-point first derivative, quadratic (-2,-1,0,1,2)/10 and cubic (1,-8,0,8,-1)/12;
    // 5-point second derivative, quadratic (2,-1,-2,-1,2)/7.
    expectClose(savitzkyGolayCoefficients(5, 2, 1)[2]!, [-2, -1, 0, 1, 2].map((c) => c / 10), 1e-14);
    expectClose(savitzkyGolayCoefficients(5, 3, 1)[2]!, [1, -8, 0, 8, -1].map((c) => c / 12), 1e-14);
    expectClose(savitzkyGolayCoefficients(5, 2, 2)[2]!, [2, -1, -2, -1, 2].map((c) => c / 7), 1e-14);
  });
});

describe("savitzkyGolay", () => {
  it("reproduces a cubic and its derivatives exactly with order 3, including the edge samples", () => {
    // Exact: a least-squares polynomial of degree >= 3 fitted to samples of a cubic is that cubic.
    const dt = 0.04;
    const n = 60;
    const f = (t: number) => 2 - 3 * t + 0.7 * t * t - 0.25 * t * t * t;
    const f1 = (t: number) => -3 + 1.4 * t - 0.75 * t * t;
    const f2 = (t: number) => 1.4 - 1.5 * t;
    const v = Float64Array.from({ length: n }, (_, i) => f(i * dt));
    for (const w of [5, 11, 25]) {
      expectClose(savitzkyGolay(v, { window: w, order: 3 }), Float64Array.from({ length: n }, (_, i) => f(i * dt)), 1e-11);
      expectClose(savitzkyGolay(v, { window: w, order: 3, derivative: 1, dt }), Float64Array.from({ length: n }, (_, i) => f1(i * dt)), 1e-9);
      expectClose(savitzkyGolay(v, { window: w, order: 4, derivative: 2, dt }), Float64Array.from({ length: n }, (_, i) => f2(i * dt)), 1e-7);
    }
  });

  it("matches a slow per-point least-squares fit for random data (all window/order/derivative combinations)", () => {
    const rng = new Rng(7);
    const v = Float64Array.from({ length: 40 }, () => rng.normal(0, 1));
    for (const w of [3, 5, 9, 15])
      for (let p = 0; p < Math.min(w, 5); p++)
        for (const d of [0, 1, 2] as const) {
          const dt = 0.1;
          expectClose(savitzkyGolay(v, { window: w, order: p, derivative: d, dt }), slowSavgol(v, w, p, d, dt), 1e-8);
        }
  });

  it("matches scipy.signal.savgol_filter(mode='interp')", () => {
    const py = "/usr/bin/python3";
    const probe = existsSync(py) ? (() => { try { execFileSync(py, ["-c", "import scipy.signal"]); return true; } catch { return false; } })() : false;
    if (!probe) {
      console.log("skipped: /usr/bin/python3 with scipy not available");
      return;
    }
    const rng = new Rng(11);
    const v = Array.from({ length: 50 }, () => rng.normal(0, 1));
    const cases = [[7, 2, 0], [7, 3, 1], [11, 3, 2], [25, 3, 1], [9, 4, 2]] as const;
    const script = `import json,sys
from scipy.signal import savgol_filter
v=json.loads(sys.argv[1]); out=[]
for w,p,d in ${JSON.stringify(cases)}:
    out.append(list(savgol_filter(v, w, p, deriv=d, delta=0.04, mode='interp')))
print(json.dumps(out))`;
    const ref = JSON.parse(execFileSync(py, ["-c", script, JSON.stringify(v)]).toString()) as number[][];
    cases.forEach(([w, p, d], k) => {
      expectClose(savitzkyGolay(Float64Array.from(v), { window: w, order: p, derivative: d, dt: 0.04 }), ref[k]!, 1e-6);
    });
  });

  it("rejects even windows, windows longer than the data and order >= window, quoting the value", () => {
    const v = new Float64Array(10);
    expect(() => savitzkyGolay(v, { window: 4, order: 2 })).toThrow(/window=4 should be an odd integer/);
    expect(() => savitzkyGolay(v, { window: 11, order: 2 })).toThrow(/window=11 should be <= values.length=10/);
    expect(() => savitzkyGolay(v, { window: 5, order: 5 })).toThrow(InputError);
  });
});

describe("splitAtGaps", () => {
  it("splits where a step exceeds maxGap and returns half-open runs covering every sample", () => {
    const t = Float64Array.from([0, 0.04, 0.08, 0.2, 0.24, 1.0, 1.04, 1.08]);
    expect(splitAtGaps(t, 0.06)).toEqual([[0, 3], [3, 5], [5, 6 + 2]]);
    expect(splitAtGaps(t, 10)).toEqual([[0, 8]]);
    expect(splitAtGaps(new Float64Array(0), 1)).toEqual([]);
    expect(splitAtGaps(Float64Array.from([5]), 1)).toEqual([[0, 1]]);
  });
  it("treats a step equal to maxGap as contiguous", () => {
    expect(splitAtGaps(Float64Array.from([0, 1, 2, 3.5]), 1)).toEqual([[0, 3], [3, 4]]);
  });
  it("rejects unsorted times, naming the index", () => {
    expect(() => splitAtGaps(Float64Array.from([0, 1, 0.5]), 1)).toThrow(/t\[2\]=0.5 should be finite and >= t\[1\]=1/);
  });
});

describe("deriveMotion", () => {
  it("gives vx = 20 + 1.5 t and ax = 1.5 for x = 20 t + 0.75 t² (exact kinematics)", () => {
    const n = 200;
    const t = Float64Array.from({ length: n }, (_, i) => i / 25);
    const x = t.map((s) => 20 * s + 0.5 * 1.5 * s * s);
    const y = t.map((s) => 1.75 - 0.1 * s);
    const m = deriveMotion({ t, x, y });
    expectClose(m.vx, t.map((s) => 20 + 1.5 * s), 1e-8);
    expectClose(m.ax, new Float64Array(n).fill(1.5), 1e-7);
    expectClose(m.vy, new Float64Array(n).fill(-0.1), 1e-9);
    expectClose(m.x, x, 1e-9);
  });

  it("smooths each run separately so a gap does not smear motion across it", () => {
    // Two runs with different constant speeds; one polynomial across the gap would blend them.
    const t: number[] = [], x: number[] = [];
    for (let i = 0; i < 50; i++) { t.push(i * 0.04); x.push(25 * i * 0.04); }
    for (let i = 0; i < 50; i++) { t.push(5 + i * 0.04); x.push(200 + 30 * i * 0.04); }
    const m = deriveMotion({ t: Float64Array.from(t), x: Float64Array.from(x), y: new Float64Array(100) });
    expectClose(m.vx.subarray(0, 50), new Float64Array(50).fill(25), 1e-9);
    expectClose(m.vx.subarray(50), new Float64Array(50).fill(30), 1e-9);
    expectClose(m.ax, new Float64Array(100), 1e-8);
  });

  it("falls back for short runs: smaller window (exact for a quadratic), two-point difference, NaN for a lone sample", () => {
    const f = (s: number) => 3 + 10 * s + 2 * s * s;
    // run A: 4 samples (window 3, order 2: exact for a quadratic); run B: 2 samples; run C: 1 sample;
    // run D: long enough for the full window.
    const tA = [0, 0.04, 0.08, 0.12], tB = [1, 1.04], tC = [2], tD = Array.from({ length: 60 }, (_, i) => 3 + i * 0.04);
    const t = Float64Array.from([...tA, ...tB, ...tC, ...tD]);
    const x = t.map(f);
    const m = deriveMotion({ t, x, y: new Float64Array(t.length) });
    for (let i = 0; i < 4; i++) {
      expect(m.vx[i]).toBeCloseTo(10 + 4 * t[i]!, 9);
      expect(m.ax[i]).toBeCloseTo(4, 7);
    }
    // two samples: slope of the chord, zero acceleration
    expect(m.vx[4]).toBeCloseTo((f(1.04) - f(1)) / 0.04, 9);
    expect(m.vx[5]).toBeCloseTo((f(1.04) - f(1)) / 0.04, 9);
    expect(m.ax[4]).toBe(0);
    expect(m.vx[6]).toBeNaN();
    expect(m.ax[6]).toBeNaN();
    expect(m.x[6]).toBe(f(2));
    for (let i = 7; i < t.length; i++) expect(m.vx[i]).toBeCloseTo(10 + 4 * t[i]!, 8);
  });

  it("keeps 0.1 m position noise at 25 Hz from faking acceleration (noise matches the linear-filter variance)", () => {
    // A linear filter sum h_k e_k of i.i.d. noise with sd σ has sd σ·sqrt(Σ h_k²) (variance of a
    // weighted sum); interior weights are the centre row of the coefficient table.
    const rng = new Rng(3);
    const n = 25 * 600, dt = 0.04, sigma = 0.1;
    const t = Float64Array.from({ length: n }, (_, i) => i * dt);
    const x = t.map((s) => 30 * s + rng.normal(0, sigma));
    const y = t.map(() => 1.75 + rng.normal(0, sigma));
    const m = deriveMotion({ t, x, y });
    const sd = (a: Float64Array, mean: number) => Math.sqrt(a.reduce((s, v) => s + (v - mean) ** 2, 0) / a.length);
    const gain = (h: Float64Array) => Math.sqrt(h.reduce((s, c) => s + c * c, 0));
    const sdV = (sigma / dt) * gain(savitzkyGolayCoefficients(25, 3, 1)[12]!);
    const sdA = (sigma / dt ** 2) * gain(savitzkyGolayCoefficients(51, 3, 2)[25]!);
    const inner = (a: Float64Array) => a.subarray(25, n - 25);
    expect(sd(inner(m.vx), 30)).toBeGreaterThan(0.9 * sdV);
    expect(sd(inner(m.vx), 30)).toBeLessThan(1.1 * sdV);
    expect(sd(inner(m.ax), 0)).toBeGreaterThan(0.9 * sdA);
    expect(sd(inner(m.ax), 0)).toBeLessThan(1.1 * sdA);
    // The figures the defaults were chosen for (docs/kinematics.md): sd(vx) ≈ 0.17 m/s, sd(ax) ≈ 0.09 m/s².
    expect(sdV).toBeCloseTo(0.174, 2);
    expect(sdA).toBeCloseTo(0.09, 2);
    // Including the noisier edge samples, no false acceleration beyond 1 m/s² over 10 minutes
    // (a 1 s acceleration window would reach about 3 m/s² here).
    expect(Math.max(...m.ax.map(Math.abs))).toBeLessThan(1);
    expect(Math.max(...deriveMotion({ t, x, y }, { accelWindowS: 1 }).ax.map(Math.abs))).toBeGreaterThan(1);
  });

  it("returns the input positions unchanged with smoothPositions: false, same derivatives", () => {
    const rng = new Rng(9);
    const t = Float64Array.from({ length: 80 }, (_, i) => i * 0.04);
    const x = t.map((s) => 25 * s + rng.normal(0, 0.1));
    const y = t.map(() => rng.normal(0, 0.1));
    const a = deriveMotion({ t, x, y });
    const b = deriveMotion({ t, x, y }, { smoothPositions: false });
    expect(Array.from(b.x)).toEqual(Array.from(x));
    expect(Array.from(a.x)).not.toEqual(Array.from(x));
    expect(Array.from(b.vx)).toEqual(Array.from(a.vx));
    expect(Array.from(b.ay)).toEqual(Array.from(a.ay));
  });

  it("validates options", () => {
    const tr = { t: Float64Array.from([0, 1]), x: new Float64Array(2), y: new Float64Array(2) };
    expect(() => deriveMotion(tr, { order: 1 })).toThrow(/order=1 should be an integer between 2 and 6/);
    expect(() => deriveMotion(tr, { windowS: -1 })).toThrow(/windowS=-1/);
  });
});

describe("assignLanes", () => {
  const markings = [-0.5, 3.25, 7.0, 10.75];
  it("numbers lanes from the right (0) with half-open intervals and -1 outside the carriageway", () => {
    const y = Float64Array.from([-1, -0.5, 0, 3.25, 3.2499, 7.0, 10.75, 10.76, NaN, 9]);
    expect(Array.from(assignLanes(y, markings))).toEqual([-1, 0, 0, 1, 0, 2, 2, -1, -1, 2]);
  });
  it("agrees with a linear scan on random positions", () => {
    const rng = new Rng(5);
    const y = Float64Array.from({ length: 5000 }, () => rng.uniform(-2, 12));
    const got = assignLanes(y, markings);
    for (let i = 0; i < y.length; i++) {
      let ref = -1;
      for (let j = 0; j < markings.length - 1; j++)
        if (y[i]! >= markings[j]! && (y[i]! < markings[j + 1]! || (j === markings.length - 2 && y[i]! <= markings[j + 1]!))) ref = j;
      expect(got[i]).toBe(ref);
    }
  });
  it("rejects markings that are not strictly ascending", () => {
    expect(() => assignLanes(new Float64Array(1), [0, 3.5, 3.5])).toThrow(/laneMarkings\[2\]=3.5 should be greater than laneMarkings\[1\]=3.5/);
    expect(() => assignLanes(new Float64Array(1), [0])).toThrow(/at least 2/);
  });
});
