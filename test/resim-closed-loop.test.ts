import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { logicalTemplateXml, openDriveXml } from "../src/exports/index.js";
import type { Road } from "../src/recording/types.js";
import { readOpenScenario } from "../src/resim/readOpenScenario.js";
import { simulateScenario } from "../src/resim/simulateScenario.js";
import { handBuiltLogicalScenarios } from "./helpers/logicalFixtures.js";
import { referencePython, runPython } from "./plan-fixtures.js";

const tmp = mkdtempSync(join(tmpdir(), "roadsieve-cl-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));
const road: Road = { name: "Orrowind Motorway", laneMarkings: [0, 3.75, 7.5, 11.25], frameRate: 25, speedLimit: 36.11, xRange: [0, 2000] };

describe("closed loop: the reference driver behind a leader braking at 8 m/s² from 0.5 s THW", () => {
  // Leader and ego at 30 m/s, 15 m bumper to bumper (THW 0.5 s); the leader brakes at 8 m/s² for 2 s
  // (to 14 m/s) starting at 2 s. Pure IDM (no braking limit), desired speed 33 m/s, the generator's
  // car parameters T = 1.4 s, a = 1.4 m/s², b = 2 m/s², s0 = 2 m, δ = 4.
  const ls = handBuiltLogicalScenarios().find((l) => l.classId === "leader-braking")!;
  ls.representative.values = { egoSpeed: 30, leaderSpeed: 30, gap: 15, leaderDecel: 8, brakeDuration: 2 };
  const file = join(tmp, "braking.xosc");
  writeFileSync(file, logicalTemplateXml(ls, road, { roadFile: "road.xodr", duration: 12 }).xml);
  writeFileSync(join(tmp, "road.xodr"), openDriveXml(road));
  const driver = { desiredSpeed: 33, maxDecel: 1e6, laneChanges: false, substeps: 20 };

  const py = referencePython();
  it.skipIf(!py)(`reports the minimum TTC, equal within 1 % to an independent integration of the IDM equations${py ? "" : " (skipped: /usr/bin/python3 with scipy is missing)"}`, async () => {
    const run = simulateScenario(await readOpenScenario(file), { ego: "closed-loop", driver });
    expect(run.ego.collision).toBe(false);
    expect(run.ego.minTtc).not.toBeNull();
    // Independent reference: the IDM ODE of Treiber, Hennecke & Helbing (Phys. Rev. E 62, 2000),
    //   dv/dt = a [1 − (v/v0)^δ − (s*/s)²],  s* = s0 + vT + vΔv / (2√(ab)),  ds/dt = v_l − v,
    // integrated by scipy's adaptive Runge–Kutta (rtol 1e-10) with the leader's speed profile, TTC = s / (v − v_l)
    // sampled at the player's frame times (25 Hz).
    const ref = runPython(
      py!,
      String.raw`
import json, numpy as np
from scipy.integrate import solve_ivp
v0, T, a, b, s0, d = 33.0, 1.4, 1.4, 2.0, 2.0, 4
def vl(t): return 30.0 if t < 2 else max(14.0, 30.0 - 8.0 * (t - 2))
def f(t, y):
    v, s = y
    dv = v - vl(t)
    ss = s0 + max(0.0, v * T + v * dv / (2 * np.sqrt(a * b)))
    return [a * (1 - (v / v0) ** d - (ss / s) ** 2), vl(t) - v]
ts = np.arange(0, 12.0 + 1e-9, 0.04)
sol = solve_ivp(f, (0, 12), [30.0, 15.0], t_eval=ts, rtol=1e-10, atol=1e-10, max_step=0.01)
v, s = sol.y
l = np.array([vl(t) for t in ts])
closing = v > l
ttc = np.where(closing, s / np.where(closing, v - l, 1), np.inf)
print(json.dumps({"minTtc": float(ttc.min()), "minGap": float(s.min())}))
`,
    ) as { minTtc: number; minGap: number };
    expect(Math.abs(run.ego.minTtc! - ref.minTtc) / ref.minTtc).toBeLessThan(0.01);
  });

  it("in replay the ego keeps its speed and runs into the braking leader (the template gives the ego no action)", async () => {
    const run = simulateScenario(await readOpenScenario(file), { ego: "replay" });
    expect(run.ego.collision).toBe(true);
    expect(run.ego.collisionAhead).toBe(true);
  });
});
