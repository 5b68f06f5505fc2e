import { describe, expect, it } from "vitest";
import { runOutcome } from "../src/planerror/runOutcome.js";
import type { SimulationRun } from "../src/resim/simulateScenario.js";
import type { Track } from "../src/recording/types.js";

function track(id: number, x: (t: number) => number, v: number, a: (t: number) => number, n: number, dt: number): Track {
  const t = Float64Array.from({ length: n }, (_, i) => i * dt);
  return {
    id, recording: "r", kind: "car", length: 4, width: 1.8, t,
    x: t.map(x), y: new Float64Array(n), vx: new Float64Array(n).fill(v), vy: new Float64Array(n), ax: t.map(a), ay: new Float64Array(n), lane: new Int32Array(n),
  };
}

describe("runOutcome", () => {
  it("counts time below THW/TTC thresholds and max deceleration on a hand-worked car-following case", () => {
    // Worked example (hand computation): ego centre 30t at 30 m/s, leader centre 50.2 + 25t at 25 m/s,
    // both 4 m long → bumper gap 46.2 − 5t. THW = gap / v_ego (time headway, common practice definition)
    // < 0.9 s ⇔ t > 3.84 s → frames 3.9 and 4.0 at 10 Hz → 0.2 s. TTC = gap / (v_ego − v_lead)
    // (Hayward's TTC) < 3 s ⇔ t > 6.24 s → never in 0…4 s. Distance 30 m/s × 4 s = 120 m.
    const n = 41, dt = 0.1;
    const ego = track(1, (t) => 30 * t, 30, (t) => (Math.abs(t - 2) < 1e-9 ? -4.5 : 0), n, dt);
    const lead = track(2, (t) => 50.2 + 25 * t, 25, () => 0, n, dt);
    const run: SimulationRun = {
      recording: { id: "r", source: "generated", checksum: "", road: { lanes: [] } as never, tracks: [ego, lead], rejected: [], warnings: [] },
      frameRate: 10, frames: n, trackIds: { ego: 1, t2: 2 },
      ego: { minTtc: 3.2, minThw: 26 / 30, collision: false, collisionTime: null, collisionWith: null, collisionAhead: null },
      warnings: [],
    };
    const o = runOutcome(run);
    expect(o.timeBelowThw).toBeCloseTo(0.2, 9);
    expect(o.timeBelowTtc).toBe(0);
    expect(o.maxDecel).toBeCloseTo(4.5, 12);
    expect(o.distance).toBeCloseTo(120, 9);
    // A stricter TTC threshold of 10 s: 46.2 − 5t < 50 holds on every frame → 41 frames × 0.1 s.
    expect(runOutcome(run, "ego", { thw: 0.9, ttc: 10, decel: 4 }).timeBelowTtc).toBeCloseTo(4.1, 9);
  });
});
