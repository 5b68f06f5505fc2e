/**
 * Library calls with bad arguments: one InputError everywhere, bounded label ranges, overflow
 * detected, and normalQuantile accurate in both tails (issue 10, point 5).
 */
import { describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { kmeans } from "../src/cluster/kmeans.js";
import { medoids } from "../src/cluster/medoids.js";
import { chao1 } from "../src/coverage/chao1.js";
import { couponCollectorEqual } from "../src/coverage/couponCollector.js";
import { rarefiedRichness } from "../src/coverage/rarefaction.js";
import { zeroFailureDistance } from "../src/coverage/zeroFailure.js";
import { compensatedSum, toShares } from "../src/exposure/compensatedSum.js";
import { exposureClassByTimeShare } from "../src/exposure/exposureClass.js";
import { normalQuantile, normalQuantileUpper } from "../src/exposure/gamma.js";
import { poissonInterval } from "../src/exposure/poissonInterval.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import type { Recording } from "../src/recording/types.js";
import { referencePython, runPython } from "./plan-fixtures.js";

const py = referencePython();

function thrown(f: () => unknown): unknown {
  try {
    f();
  } catch (e) {
    return e;
  }
  return undefined;
}

describe("every invalid library argument is an InputError", () => {
  // Each call breaks one documented precondition of the function (see its doc comment).
  const cases: Array<[string, () => unknown, RegExp]> = [
    ["zeroFailureDistance(0)", () => zeroFailureDistance(0), /rate=0 should be a finite number > 0/],
    ["zeroFailureDistance(1, 1)", () => zeroFailureDistance(1, 1), /confidence=1 should be strictly between 0 and 1/],
    ["chao1 with an unknown variant", () => chao1([1, 2], { variant: "x" as never }), /variant="x"/],
    ["rarefiedRichness beyond n", () => rarefiedRichness([1, 2], 5), /m=5 should be <= n=3/],
    ["couponCollectorEqual(-1)", () => couponCollectorEqual(-1), /n=-1 should be an integer >= 1/],
    ["poissonInterval(-1)", () => poissonInterval(-1), /count=-1 should be an integer >= 0/],
    ["poissonInterval(1, 2)", () => poissonInterval(1, 2), /level=2|should be a confidence level/],
    ["toShares of zero weights", () => toShares(new Float64Array([0, 0])), /weights add up to 0/],
    ["exposureClassByTimeShare(2)", () => exposureClassByTimeShare(2), /timeShare=2 should be a fraction/],
    ["normalQuantile(2)", () => normalQuantile(2), /p=2 should be in \[0, 1\]/],
    ["runPipeline([null])", () => runPipeline([null] as unknown as Recording[]), /recordings\[0\] should be a recording object.*got null/],
    ["runPipeline(null)", () => runPipeline(null as unknown as Recording[]), /recordings should be a list of recordings \(from readRecording or generateTraffic\); got null/],
    [
      "runPipeline with a track lacking x",
      () => runPipeline([{ id: "r", road: { name: "a", laneMarkings: [0, 3.5], frameRate: 25 }, tracks: [{ t: new Float64Array(2) }] } as unknown as Recording]),
      /recordings\[0\] \("r"\)\.tracks\[0\]\.x should be a Float64Array as long as t; got undefined/,
    ],
  ];
  for (const [name, f, pattern] of cases)
    it(name, () => {
      const e = thrown(f);
      expect(e).toBeInstanceOf(InputError);
      expect((e as Error).message).toMatch(pattern);
    });
  it("compensatedSum still adds exactly (sanity of the edited module)", () => {
    // 1e16 + 1 - 1e16 = 1 exactly with compensated (Neumaier) summation; naive gives 0.
    expect(compensatedSum(new Float64Array([1e16, 1, -1e16]))).toBe(1);
  });
});

describe("cluster stage bounds", () => {
  it("medoids refuses a label of 1e9 before allocating per-cluster arrays", () => {
    const X = { data: new Float64Array([0, 0, 1, 1]), rows: 2, cols: 2 };
    const before = process.memoryUsage().rss;
    const e = thrown(() => medoids(X, new Int32Array([0, 1e9])));
    expect(e).toBeInstanceOf(InputError);
    expect((e as Error).message).toMatch(/labels\[1\]=1000000000 should be < n_samples=2/);
    // Sizing by the label would have taken 1e9 × 4 bytes at least (Int32Array of k); nothing near it.
    expect(process.memoryUsage().rss - before).toBeLessThan(2 ** 28);
  });

  it("k-means on ±1e200 is an error naming the value, not NaN inertia and arbitrary labels", () => {
    // (2·1e200)² = 4e400 overflows IEEE-754 double (max ≈ 1.798e308).
    const X = { data: new Float64Array([1e200, 0, -1e200, 0, 1e200, 1, -1e200, 1]), rows: 4, cols: 2 };
    const e = thrown(() => kmeans(X, 2, { seed: 1 }));
    expect(e).toBeInstanceOf(InputError);
    expect((e as Error).message).toMatch(/X: row 0, column 0 is 1e\+200; values this large overflow squared distances/);
    // Values that stay finite are accepted: 1e150² · 4 · 2 · 4 ≈ 3.2e301 < 1.798e308.
    const ok = kmeans({ data: X.data.map((v) => v / 1e50), rows: 4, cols: 2 }, 2, { seed: 1 });
    expect(Number.isFinite(ok.inertia)).toBe(true);
    expect(new Set(ok.labels).size).toBe(2);
    expect(ok.labels[0]).toBe(ok.labels[2] === ok.labels[0] ? ok.labels[0] : ok.labels[0]);
  });
});

describe("normalQuantile in both tails", () => {
  // A log grid over the whole lower tail, plus the region boundaries of AS 241 (|p − 1/2| = 0.425,
  // r = 5 ↔ p = e^-25 ≈ 1.39e-11) and points near 1/2.
  const grid = Array.from({ length: 200 }, (_, i) => 10 ** (-300 + i * 1.5)).filter((p) => p < 0.5);
  const lower = [...grid, 0.075, 0.0749999, 0.0750001, Math.exp(-25), Math.exp(-25) * 1.0000001, 1e-300, 1e-200, 1e-100, 1e-50, 1e-20, 1e-12, 1e-8, 1e-4, 0.001, 0.01, 0.02424, 0.02426, 0.1, 0.2, 0.2499, 0.25, 0.3, 0.45, 0.4999999, 0.5 - 1e-12];
  // p close to 1 as doubles; 1 − p is exact for these (Sterbenz), so the reference is well defined.
  const upper = [1 - 1e-12, 1 - 1e-9, 1 - 1e-6, 0.999, 0.99, 0.975, 0.9, 0.7, 0.5 + 1e-9, 0.5000001];
  const tiny = [1e-300, 1e-100, 1e-30, 1e-16, 1e-12];
  it.skipIf(!py)("agrees with scipy.stats.norm.ppf and norm.isf to 1e-15 relative (reference library)", () => {
    if (!py) return;
    const ref = runPython(
      py,
      `import json
from scipy.stats import norm
lo=${JSON.stringify(lower)}; up=${JSON.stringify(upper)}; q=${JSON.stringify(tiny)}
print(json.dumps({"lo":[float(norm.ppf(p)) for p in lo],"up":[float(norm.ppf(p)) for p in up],"isf":[float(norm.isf(p)) for p in q]}))`,
    ) as { lo: number[]; up: number[]; isf: number[] };
    const rel = (a: number, b: number) => Math.abs(a - b) / Math.abs(b);
    const worst = { lo: 0, up: 0, isf: 0 };
    lower.forEach((p, i) => (worst.lo = Math.max(worst.lo, rel(normalQuantile(p), ref.lo[i]!))));
    upper.forEach((p, i) => (worst.up = Math.max(worst.up, rel(normalQuantile(p), ref.up[i]!))));
    tiny.forEach((q, i) => (worst.isf = Math.max(worst.isf, rel(normalQuantileUpper(q), ref.isf[i]!))));
    expect(worst.lo).toBeLessThanOrEqual(1e-15);
    expect(worst.up).toBeLessThanOrEqual(1e-15);
    expect(worst.isf).toBeLessThanOrEqual(1e-15);
  });
  it("is antisymmetric: Φ⁻¹(1 − p) = −Φ⁻¹(p) exactly where 1 − p is exact", () => {
    // Dyadic p: 1 − p is exact, so the two calls see the same tail probability.
    for (const p of [0.25, 0.125, 2 ** -10, 2 ** -40]) expect(normalQuantile(1 - p)).toBe(-normalQuantile(p));
  });
});
