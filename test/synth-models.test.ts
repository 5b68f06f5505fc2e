import { describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { idmAcceleration, idmEquilibriumGap, idmFreeAcceleration, type IdmParams } from "../src/synth/idm.js";
import { mobilIncentive, mobilIsSafe, type MobilParams } from "../src/synth/mobil.js";
import { resolveTrafficOptions } from "../src/synth/options.js";
import { Simulator } from "../src/synth/simulator.js";

// Parameters of the worked examples: v0 = 30 m/s, T = 1.5 s, s0 = 2 m, a = 1 m/s², b = 1.5 m/s², δ = 4.
const P: IdmParams = { desiredSpeed: 30, timeGap: 1.5, minGap: 2, maxAccel: 1, comfortDecel: 1.5, exponent: 4 };

/** Options for scripted scenes: no randomness in the motion, no planted events. */
const quiet = (extra: Record<string, unknown> = {}) =>
  resolveTrafficOptions({
    accelNoiseSd: 0,
    weaveAmplitude: 0,
    laneOffsetSd: 0,
    hardBrakingRate: 0,
    tightCutInRate: 0,
    ...extra,
  });

describe("IDM (Treiber, Hennecke & Helbing 2000)", () => {
  it("idmFreeAcceleration(v=20) = a[1 − (v/v0)^δ] = 65/81 m/s² (hand computed)", () => {
    // 1 − (20/30)^4 = 1 − 16/81 = 65/81 = 0.802469…
    expect(idmFreeAcceleration(P, 20)).toBeCloseTo(65 / 81, 12);
    expect(idmFreeAcceleration(P, 30)).toBeCloseTo(0, 12);
  });

  it("idmAcceleration with a slower leader matches the formula worked by hand", () => {
    // v = 20, leader 15 m/s (Δv = 5), s = 40 m:
    // s* = 2 + 20·1.5 + 20·5 / (2·√(1·1.5)) = 32 + 40.824829 = 72.824829 m
    // a  = 1 − 16/81 − (72.824829/40)² = 1 − 0.197531 − 3.314660 = −2.512191 m/s²
    expect(idmAcceleration(P, 20, 40, 5)).toBeCloseTo(-2.512190692719649, 9);
  });

  it("idmEquilibriumGap(v) = (s0 + vT)/√(1 − (v/v0)^δ) (hand computed)", () => {
    // v = 20: 32 / √(65/81) = 35.722004 m; v = 25: 39.5 / √(1 − 625/1296) = 54.895701 m
    expect(idmEquilibriumGap(P, 20)).toBeCloseTo(35.722003561692034, 9);
    expect(idmEquilibriumGap(P, 25)).toBeCloseTo(54.89570113388321, 9);
    // At the equilibrium gap the IDM acceleration vanishes.
    expect(idmAcceleration(P, 20, idmEquilibriumGap(P, 20), 0)).toBeCloseTo(0, 12);
  });

  it("the simulator applies the free-road acceleration to a lone vehicle", () => {
    const sim = new Simulator(quiet({ lanes: 1 }), new Rng(1), { xEntry: -1e9, xExit: 1e9, inflow: false, recordRange: null });
    const u = sim.addVehicle({ x: 0, v: 20, lane: 0, idm: P });
    sim.step(false);
    expect(u.a).toBeCloseTo(65 / 81, 12);
    // Ballistic update: x = v dt + a dt²/2, v = v + a dt with dt = 0.04 s.
    expect(u.x).toBeCloseTo(20 * 0.04 + 0.5 * (65 / 81) * 0.04 * 0.04, 12);
    expect(u.v).toBeCloseTo(20 + (65 / 81) * 0.04, 12);
  });

  for (const vLead of [20, 25]) {
    it(`a platoon behind a leader held at ${vLead} m/s settles at the IDM equilibrium gap within 2 %`, () => {
      // Equilibrium gap s_e(v) = (s0 + vT)/√(1 − (v/v0)^δ), Treiber, Hennecke & Helbing (2000).
      const sim = new Simulator(quiet({ lanes: 1 }), new Rng(2), { xEntry: -1e9, xExit: 1e9, inflow: false, recordRange: null });
      const n = 8;
      const cars = [];
      // Start away from equilibrium: alternating gaps of 25 and 80 m, all at 18 m/s.
      let x = 0;
      for (let i = 0; i < n; i++) {
        cars.push(sim.addVehicle({ x, v: 18, lane: 0, idm: P, length: 4.5, allowLaneChange: false }));
        x += 4.5 + (i % 2 === 0 ? 25 : 80);
      }
      const leader = sim.addVehicle({ x, v: vLead, lane: 0, idm: P, length: 4.5, held: true, allowLaneChange: false });
      for (let s = 0; s < 25 * 600; s++) sim.step(false);
      const expected = idmEquilibriumGap(P, vLead);
      const chain = [...cars, leader];
      for (let i = 0; i + 1 < chain.length; i++) {
        const gap = chain[i + 1]!.x - chain[i]!.x - 4.5;
        expect(Math.abs(gap - expected) / expected).toBeLessThan(0.02);
        expect(chain[i]!.v).toBeCloseTo(vLead, 2);
      }
    });
  }
});

describe("MOBIL (Kesting, Treiber & Helbing 2007)", () => {
  // Accelerations before/after a prospective change (m/s²), values chosen for hand arithmetic.
  const acc = { c: -0.5, cNew: 0.6, n: 0.2, nNew: -0.4, o: -0.3, oNew: 0.1 };
  const sym: MobilParams = { politeness: 0.5, threshold: 0.1, safeDecel: 4, keepRight: false, bias: 0.3 };
  const eur: MobilParams = { ...sym, keepRight: true };

  it("mobilIncentive, symmetric: ã_c − a_c + p(ã_n − a_n + ã_o − a_o) − Δa_th (hand computed)", () => {
    // 1.1 + 0.5·(−0.6 + 0.4) − 0.1 = 0.9
    expect(mobilIncentive(acc, sym, "left")).toBeCloseTo(0.9, 12);
    expect(mobilIncentive(acc, sym, "right")).toBeCloseTo(0.9, 12);
  });

  it("mobilIncentive, asymmetric keep-right variant (hand computed)", () => {
    // to the left:  1.1 + 0.5·(−0.6) − (0.1 + 0.3) = 0.4
    // to the right: 1.1 + 0.5·(0.4) − (0.1 − 0.3) = 1.5
    expect(mobilIncentive(acc, eur, "left")).toBeCloseTo(0.4, 12);
    expect(mobilIncentive(acc, eur, "right")).toBeCloseTo(1.5, 12);
  });

  it("mobilIsSafe rejects a change that makes the new follower brake harder than b_safe", () => {
    expect(mobilIsSafe(acc, sym)).toBe(true);
    expect(mobilIsSafe({ ...acc, nNew: -4.01 }, sym)).toBe(false);
    expect(mobilIsSafe({ ...acc, cNew: -4.5 }, sym)).toBe(false);
  });

  it("the simulator overtakes a slow truck when the left lane is free, and waits while it is unsafe", () => {
    // Car (v0 = 33) at 30 m/s closing on a truck held at 22 m/s, gap 69.5 m, in lane 0; lane 1 free.
    // By hand: s* = 2 + 45 + 30·8/(2√1.5) = 144.98 m, a_c = 1 − (30/33)^4 − (144.98/69.5)² = −4.03 m/s²;
    // in lane 1 ã_c = 1 − (30/33)^4 = 0.317 m/s²; incentive 4.35 − (Δa_th + Δa_bias) > 0 ⇒ change left.
    const o = quiet({ lanes: 2 });
    const car: IdmParams = { ...P, desiredSpeed: 33 };
    const truck: IdmParams = { ...P, desiredSpeed: 22, maxAccel: 0.6 };
    const sim = new Simulator(o, new Rng(3), { xEntry: -1e9, xExit: 1e9, inflow: false, recordRange: null });
    const c = sim.addVehicle({ x: 0, v: 30, lane: 0, idm: car });
    sim.addVehicle({ kind: "truck", x: 80, v: 22, lane: 0, idm: truck, held: true, allowLaneChange: false });
    for (let s = 0; s < 25; s++) sim.step(false);
    expect(sim.laneChanges.length).toBe(1);
    expect(sim.laneChanges[0]!.vehicle).toBe(c);
    expect(sim.laneChanges[0]!.to).toBe(1);

    // Same scene with a fast car 12 m behind in lane 1: the new follower would have to brake harder
    // than b_safe = 4 m/s², so no change happens while it is there.
    const sim2 = new Simulator(o, new Rng(3), { xEntry: -1e9, xExit: 1e9, inflow: false, recordRange: null });
    const c2 = sim2.addVehicle({ x: 0, v: 30, lane: 0, idm: car });
    sim2.addVehicle({ kind: "truck", x: 80, v: 22, lane: 0, idm: truck, held: true, allowLaneChange: false });
    const fast = sim2.addVehicle({ x: -16.5, v: 36, lane: 1, idm: { ...car, desiredSpeed: 36 }, held: true, allowLaneChange: false });
    const gap = -fast.x - 4.5; // 12 m bumper to bumper
    // ã_n for the fast car behind c2: s = 12 m, Δv = 6 m/s ⇒ far below −4 m/s².
    expect(idmAcceleration(fast.idm, 36, gap, 36 - 30)).toBeLessThan(-4);
    sim2.step(false);
    expect(sim2.laneChanges.filter((l) => l.vehicle === c2).length).toBe(0);
  });
});
