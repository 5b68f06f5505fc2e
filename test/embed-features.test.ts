import { describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import type { Matrix } from "../src/core/matrix.js";
import { detectAllManeuvers } from "../src/maneuvers/index.js";
import { buildScenes } from "../src/scene/index.js";
import { buildScenarios } from "../src/scenario/index.js";
import { applyStandardization, describeFeatures, embedScenarios, FEATURE_GROUPS, rawFeatures, standardize } from "../src/embed/index.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { buildRecording, buildTrack } from "./maneuvers.fixtures.js";
import { loadIris } from "./helpers/iris.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const col = (m: Matrix, j: number): number[] => Array.from({ length: m.rows }, (_, i) => m.data[i * m.cols + j]!);

describe("standardize", () => {
  const reason = sklearnMissing();
  it.skipIf(reason !== null)(`matches scikit-learn's StandardScaler on Iris${reason ? ` (skipped: ${reason})` : ""}`, () => {
    const { X } = loadIris();
    const st = standardize(X, { balanceGroups: false });
    const ws = new PyWorkspace();
    try {
      ws.writeF64("x.bin", X.data);
      const ref = ws.run<{ z: number[]; mean: number[]; scale: number[] }>(
        `from sklearn.preprocessing import StandardScaler\nX=np.fromfile(DIR+'/x.bin',dtype='<f8').reshape(-1,4)\ns=StandardScaler().fit(X)\nprint(json.dumps({'z':s.transform(X).ravel().tolist(),'mean':s.mean_.tolist(),'scale':s.scale_.tolist()}))`,
      );
      ref.z.forEach((v, i) => expect(st.matrix.data[i]!).toBeCloseTo(v, 10));
      ref.mean.forEach((v, j) => expect(st.mean[j]!).toBeCloseTo(v, 12));
      ref.scale.forEach((v, j) => expect(st.scale[j]!).toBeCloseTo(v, 12));
    } finally {
      ws.dispose();
    }
  });

  it("weighs groups so that a group's total variance is its weight squared, whatever its size", () => {
    const { X } = loadIris();
    // Sepal columns form one group of 2, petal length one group of 1, petal width is weighted 0.
    const st = standardize(X, { groups: ["sepal", "sepal", "petalL", "petalW"], weights: { petalL: 2, petalW: 0 } });
    const variance = (j: number): number => {
      const v = col(st.matrix, j);
      const m = v.reduce((a, b) => a + b, 0) / v.length;
      return v.reduce((a, b) => a + (b - m) ** 2, 0) / v.length;
    };
    expect(variance(0) + variance(1)).toBeCloseTo(1, 10);
    expect(variance(2)).toBeCloseTo(4, 10);
    expect(variance(3)).toBe(0);
    expect(st.weight[0]).toBeCloseTo(1 / Math.SQRT2, 12);
  });

  it("maps constant columns to 0 with a warning and applies fitted parameters to new rows", () => {
    const m: Matrix = { data: Float64Array.from([1, 5, 2, 5, 3, 5]), rows: 3, cols: 2 };
    const st = standardize(m);
    expect(col(st.matrix, 1)).toEqual([0, 0, 0]);
    expect(st.warnings.join(" ")).toMatch(/1 constant column/);
    // z of 2 in [1, 2, 3] is 0; of 4 it is 2 / sd = 2 / sqrt(2/3).
    const again = applyStandardization({ data: Float64Array.from([2, 5, 4, 7]), rows: 2, cols: 2 }, st);
    expect(again.data[0]).toBeCloseTo(0, 12);
    expect(again.data[2]).toBeCloseTo(2 / Math.sqrt(2 / 3), 12);
    expect(() => standardize(m, { groups: ["a"] })).toThrow(/groups has 1 entries, expected one per column \(2\)/);
    expect(() => standardize(m, { groups: ["a", "b"], weights: { c: 1 } })).toThrow(/names group "c"/);
    expect(() => standardize(m, { groups: ["a", "b"], weights: { a: -1 } })).toThrow(InputError);
  });
});

describe("embedScenarios", () => {
  const gen = generateTraffic({ vehicleKm: 15, flowPerLane: 1200, positionNoiseSd: 0.1, tightCutInRate: 0.1 }, new Rng(21));
  const rec = gen.recording;
  const man = detectAllManeuvers(rec);
  const set = buildScenarios(rec, man, buildScenes(rec, man));

  it("names every feature with a unit, a meaning and a group", () => {
    const f = describeFeatures(set.shape.steps);
    const emb = embedScenarios(set);
    expect(emb.features).toEqual(f);
    expect(emb.matrix.cols).toBe(f.length);
    expect(emb.matrix.rows).toBe(set.scenarios.length);
    expect(new Set(f.map((x) => x.name)).size).toBe(f.length);
    for (const x of f) {
      expect(x.unit.length).toBeGreaterThan(0);
      expect(x.meaning.length).toBeGreaterThan(10);
      expect(FEATURE_GROUPS).toContain(x.group);
    }
    expect(emb.groups).toEqual([...FEATURE_GROUPS]);
    expect(emb.matrix.data.every((v) => Number.isFinite(v))).toBe(true);
  });

  it("holds the scenario facts in their units in the raw matrix", () => {
    const raw = rawFeatures(set);
    const names = describeFeatures(set.shape.steps).map((f) => f.name);
    const j = (name: string): number => names.indexOf(name);
    set.scenarios.forEach((sc, i) => {
      expect(raw.data[i * raw.cols + j("ego.speed.mean")]).toBeCloseTo(sc.meanSpeed, 9);
      expect(raw.data[i * raw.cols + j("ev.cut-in")]).toBe(sc.events.filter((e) => e.kind === "cut-in").length);
      expect(raw.data[i * raw.cols + j("nb.ahead.occupancy")]).toBeCloseTo(sc.slotOccupancy[0]!, 12);
      expect(raw.data[i * raw.cols + j("man.laneChanges.left")]).toBe(sc.stats!.laneChangesLeft);
    });
    expect(set.scenarios.some((s) => s.events.some((e) => e.kind === "cut-in"))).toBe(true);
  });

  it("gives a group of weight 0 no influence", () => {
    const emb = embedScenarios(set, { groupWeights: { timeline: 0 } });
    emb.features.forEach((f, jj) => {
      if (f.group === "timeline") expect(col(emb.matrix, jj).every((v) => v === 0)).toBe(true);
    });
    expect(() => embedScenarios(set, { groupWeights: { weather: 1 } as never })).toThrow(/groupWeights names group "weather"/);
  });

  it("puts lane changes to the left closer to each other than to lane keeping", () => {
    // 24 egos far apart on an empty road: 12 change left (3–7 s, starting 2–4 s into the window),
    // 12 keep their lane; speeds vary between 24 and 35 m/s in both groups.
    const rng = new Rng(77);
    const tracks = Array.from({ length: 24 }, (_, k) =>
      buildTrack({
        id: k + 1,
        duration: 10,
        v0: rng.uniform(24, 35),
        lane0: 0,
        x0: k * 1000,
        moves: k < 12 ? [{ t0: rng.uniform(2, 4), duration: rng.uniform(3, 6), d: 3.75 }] : [],
        noiseSd: 0.1,
        seed: k + 100,
      }),
    );
    const r = buildRecording(tracks);
    const m = detectAllManeuvers(r);
    const s2 = buildScenarios(r, m, buildScenes(r, m), { window: { mode: "fixed", lengthS: 10 } });
    expect(s2.scenarios).toHaveLength(24);
    const emb = embedScenarios(s2);
    const d = (a: number, b: number): number => {
      let x = 0;
      for (let k = 0; k < emb.matrix.cols; k++) x += (emb.matrix.data[a * emb.matrix.cols + k]! - emb.matrix.data[b * emb.matrix.cols + k]!) ** 2;
      return Math.sqrt(x);
    };
    // Every lane change has its nearest neighbour among the lane changes.
    for (let a = 0; a < 12; a++) {
      let best = -1;
      for (let b = 0; b < 24; b++) if (b !== a && (best < 0 || d(a, b) < d(a, best))) best = b;
      expect(best).toBeLessThan(12);
    }
  });
});
