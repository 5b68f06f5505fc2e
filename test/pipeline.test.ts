import { describe, expect, it } from "vitest";
import { assignScenarios } from "../src/cluster/assignScenarios.js";
import { Rng } from "../src/core/rng.js";
import { compensatedSum } from "../src/exposure/compensatedSum.js";
import { extractRecording } from "../src/pipeline/extractRecording.js";
import { planCatalogue } from "../src/pipeline/planCatalogue.js";
import { resolvePipelineOptions } from "../src/pipeline/options.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { planToJson } from "../src/plan/writePlan.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";

// One generated recording shared by the tests: 60 vehicle-km of our fictional motorway with planted
// hard braking and tight cut-ins at a high rate, 0.1 m position noise as in a drone survey.
const traffic = generateTraffic(
  { vehicleKm: 60, hardBrakingRate: 0.12, tightCutInRate: 0.12, positionNoiseSd: 0.1, recordingId: "pipeline-test" },
  new Rng(11),
);
const rec = traffic.recording;
const result = runPipeline([rec], { seed: 5, map: "pca" });
const sc = result.scenarios.scenarios;

/** Planted events that lie fully inside the recorded span of the involved track (others cannot be observed). */
function observablePlanted(): typeof traffic.truth.planted {
  const span = new Map(rec.tracks.map((t) => [t.id, [t.t[0]!, t.t[t.t.length - 1]!]]));
  return traffic.truth.planted.filter((p) => {
    const s = span.get(p.trackId);
    return s !== undefined && p.tStart >= s[0]! && p.tEnd <= s[1]!;
  });
}

describe("runPipeline(recordings) on generated traffic", () => {
  it("tiles every drive: scenario km add up to the distance each ego travelled", () => {
    // Exact bookkeeping (windows share their boundary samples): sum over windows of x[end] - x[start]
    // equals x[last] - x[first] per drive, so the totals agree to rounding.
    let driven = 0;
    for (const t of rec.tracks) if (t.t.length > 1) driven += (t.x[t.x.length - 1]! - t.x[0]!) / 1000;
    const windows = compensatedSum(sc.map((s) => s.km));
    expect(Math.abs(windows - driven)).toBeLessThan(1e-9 * driven);
    expect(result.recordings[0]!.km).toBeCloseTo(windows, 9);
  });

  it("accounts for every kilometre: test-case shares plus what the budget left out sum to 1 within 1e-12", () => {
    const p = result.plan.exploration;
    const total = compensatedSum([...p.testCases.map((t) => t.share), ...p.leftOut.map((l) => l.share)]);
    expect(Math.abs(total - 1)).toBeLessThan(1e-12);
    const time = compensatedSum([...p.testCases.map((t) => t.timeShare), ...p.leftOut.map((l) => l.timeShare)]);
    expect(Math.abs(time - 1)).toBeLessThan(1e-12);
  });

  it("represents each cluster by a real recorded scenario of that cluster", () => {
    for (let c = 0; c < result.medoids.indices.length; c++) {
      const m = result.medoids.indices[c]!;
      if (m < 0) continue;
      expect(result.labels[m]).toBe(c);
      const tc = result.plan.exploration.testCases.find((t) => t.scenarioIndex === m);
      if (tc) expect(tc.scenarioId).toBe(sc[m]!.id);
    }
  });

  it("keeps every observable planted critical event in the exploration view (the budget now counts concrete test cases)", () => {
    const planted = observablePlanted();
    expect(planted.length).toBeGreaterThanOrEqual(8);
    for (const budget of [undefined]) {
      const r = result;
      for (const p of planted) {
        const involved = new Set([p.trackId, ...(p.affectedTrack !== undefined ? [p.affectedTrack] : [])]);
        const hit = r.plan.exploration.testCases.some((t) => involved.has(t.source.egoTrack) && t.source.tStart <= p.tEnd && t.source.tEnd >= p.tStart);
        expect(hit, `planted ${p.kind} of track ${p.trackId} at ${p.tStart}–${p.tEnd} s, budget ${budget}`).toBe(true);
      }
    }
  });

  it("gives byte-identical plans for the same input and seed, and records the seed it ran with", () => {
    const again = runPipeline([rec], { seed: 5, map: "pca" });
    expect(planToJson(again.plan)).toBe(planToJson(result.plan));
    const other = runPipeline([rec], { seed: 6, map: "pca", k: result.k });
    expect(Array.from(other.map.coords.data)).toEqual(Array.from(result.map.coords.data)); // PCA has no randomness
    expect(other.plan.provenance.seed).toBe(6);
  });

  it("is the two halves wired in order: extractRecording then planCatalogue give runPipeline's plan byte for byte", () => {
    // The one-call path is defined as this composition (issue 12: the step-by-step path must agree).
    const x = extractRecording(rec, { seed: 5, map: "pca" });
    expect(x.summary.scenarios).toBe(sc.length);
    const r = planCatalogue([x.set], [x.summary], [x.maneuvers], { seed: 5, map: "pca" });
    expect(planToJson(r.plan)).toBe(planToJson(result.plan));
  });

  it("carries a clustering model that puts the run's own scenarios back into their clusters exactly", () => {
    // The run's labels are the reference (k-means nearest centre, DBSCAN border rule: Ester et al. 1996).
    const a = assignScenarios(result.model, result.embedding);
    expect(Array.from(a.labels)).toEqual(Array.from(result.labels));
    expect(result.model.k).toBe(result.k);
    expect(result.model.extraction?.scenario).toEqual(JSON.parse(JSON.stringify(result.scenarios.options)));
  });

  it("resolves options idempotently, so the stage functions may be given resolved options", () => {
    // extractRecording, planCatalogue and planFromClustering resolve again what they are given.
    const cases = [{}, { seed: 3, k: 4, dbscan: false as const }, { kRange: [3, 5] as [number, number], dbscan: { minPts: 6 }, weightBy: "hours" as const, plan: { budget: 7 } }];
    for (const c of cases) {
      const once = resolvePipelineOptions(c);
      expect(resolvePipelineOptions(once)).toEqual(once);
    }
  });

  it("rejects a k larger than the number of scenarios with a message quoting both", () => {
    expect(() => runPipeline([rec], { k: sc.length + 1, map: "pca" })).toThrow(new RegExp(`k=${sc.length + 1} should be <= the number of scenarios \\(${sc.length}\\)`));
  });
});
