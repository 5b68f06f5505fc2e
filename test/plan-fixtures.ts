/**
 * Hand-built scenario lists for the exposure, coverage and plan tests, so that those tests do not
 * depend on the recording, maneuver or scenario-extraction modules. Recording names are fictional.
 */
import { spawnSync } from "node:child_process";
import { existsSync } from "node:fs";
import { Rng } from "../src/core/rng.js";
import type { Scenario } from "../src/scenario/types.js";

export function makeScenario(index: number, over: Partial<Scenario> = {}): Scenario {
  const recording = over.recording ?? "orrowind-a";
  const egoTrack = over.egoTrack ?? 1;
  const window = over.window ?? index;
  const seconds = over.seconds ?? 10;
  const tStart = over.tStart ?? window * seconds;
  return {
    index,
    id: `${recording}/${egoTrack}/${window}`,
    recording,
    egoTrack,
    egoKind: "car",
    window,
    startFrame: window * 250,
    endFrame: (window + 1) * 250,
    tStart,
    tEnd: tStart + seconds,
    seconds,
    km: 0.3,
    meanSpeed: 30,
    laneStart: 1,
    laneEnd: 1,
    lateral: ["lane-keep"],
    longitudinal: ["keep"],
    slotOccupancy: [1, 0, 0, 0, 0, 0, 0, 0],
    events: [],
    criticality: { minTtc: Infinity, minThw: 2, maxDrac: 0, maxDecel: 0.5, flags: [] },
    ...over,
  };
}

/** Debian's interpreter with scipy/sklearn, or null (tests that need it skip with a printed reason). */
export function referencePython(): string | null {
  const py = "/usr/bin/python3";
  if (!existsSync(py)) return null;
  const r = spawnSync(py, ["-c", "import scipy, sklearn"], { encoding: "utf8" });
  return r.status === 0 ? py : null;
}

/** Run a Python snippet that prints JSON and parse it. */
export function runPython(py: string, code: string): unknown {
  const r = spawnSync(py, ["-c", code], { encoding: "utf8", maxBuffer: 1 << 28 });
  if (r.status !== 0) throw new Error(`python failed: ${r.stderr}`);
  return JSON.parse(r.stdout);
}

/**
 * A synthetic catalogue: `drives` ego drives of `windows` windows each, drawn from a few common
 * situation kinds, with rare critical windows planted at known indices. Labels cluster the common
 * kinds; planted windows get label -1 (noise) or sit inside a common cluster, as chosen.
 */
export interface PlantedCatalogue {
  scenarios: Scenario[];
  labels: Int32Array;
  medoids: Int32Array;
  embedding: { data: Float64Array; rows: number; cols: number };
  planted: number[];
}

export function plantedCatalogue(seed: number, drives = 20, windows = 30, plantedCount = 6): PlantedCatalogue {
  const rng = new Rng(seed);
  const kinds = [
    { lat: ["lane-keep"], lon: ["keep"], occ: [1, 0, 0, 0, 0, 0, 0, 0], speed: 33, weight: 0.45 },
    { lat: ["lane-keep"], lon: ["decelerate", "keep"], occ: [1, 1, 0, 0, 0, 0, 0, 0], speed: 12, weight: 0.25 },
    { lat: ["lane-change-left"], lon: ["accelerate"], occ: [1, 0, 1, 0, 1, 0, 0, 0], speed: 30, weight: 0.2 },
    { lat: ["lane-change-right"], lon: ["keep"], occ: [0, 0, 0, 0, 0, 1, 0, 0], speed: 28, weight: 0.1 },
  ] as const;
  const scenarios: Scenario[] = [];
  const labels: number[] = [];
  const points: number[][] = [];
  let idx = 0;
  for (let d = 0; d < drives; d++) {
    for (let w = 0; w < windows; w++) {
      let u = rng.float();
      let k = 0;
      while (k < kinds.length - 1 && u >= kinds[k]!.weight) {
        u -= kinds[k]!.weight;
        k++;
      }
      const kind = kinds[k]!;
      const speed = kind.speed * (0.9 + 0.2 * rng.float());
      const seconds = 10;
      scenarios.push(
        makeScenario(idx, {
          recording: `orrowind-${d % 3}`,
          egoTrack: 100 + d,
          window: w,
          seconds,
          km: (speed * seconds) / 1000,
          meanSpeed: speed,
          lateral: [...kind.lat],
          longitudinal: [...kind.lon],
          slotOccupancy: [...kind.occ],
          criticality: { minTtc: Infinity, minThw: 1.5 + rng.float(), maxDrac: 0, maxDecel: 1, flags: [] },
        }),
      );
      labels.push(k);
      points.push([k * 10 + rng.normal(0, 1), rng.normal(0, 1)]);
      idx++;
    }
  }
  // Plant critical windows: half inside a common cluster (averaged away by a medoid unless kept),
  // half as DBSCAN noise.
  const planted: number[] = [];
  const n = scenarios.length;
  const step = Math.floor(n / (plantedCount + 1));
  for (let p = 0; p < plantedCount; p++) {
    const i = step * (p + 1) + 1;
    const s = scenarios[i]!;
    s.criticality = { minTtc: 0.6 + 0.1 * p, minThw: 0.3, maxDrac: 5, maxDecel: 7, flags: ["ttc", "harsh-braking"] };
    s.events = [{ kind: "cut-in", t: s.tStart + 2, other: 900 + p }];
    if (p % 2 === 1) {
      labels[i] = -1;
      points[i] = [60 + p, 60];
    }
    planted.push(i);
  }
  // Medoid of each cluster: the member nearest the cluster mean (a real scenario).
  const k = kinds.length;
  const medoids = new Int32Array(k).fill(-1);
  for (let c = 0; c < k; c++) {
    let mx = 0;
    let my = 0;
    let cnt = 0;
    for (let i = 0; i < n; i++) if (labels[i] === c) {
      mx += points[i]![0]!;
      my += points[i]![1]!;
      cnt++;
    }
    mx /= cnt;
    my /= cnt;
    let best = Infinity;
    for (let i = 0; i < n; i++) if (labels[i] === c && !planted.includes(i)) {
      const dd = (points[i]![0]! - mx) ** 2 + (points[i]![1]! - my) ** 2;
      if (dd < best) {
        best = dd;
        medoids[c] = i;
      }
    }
  }
  const data = new Float64Array(n * 2);
  points.forEach((p, i) => {
    data[2 * i] = p[0]!;
    data[2 * i + 1] = p[1]!;
  });
  return { scenarios, labels: Int32Array.from(labels), medoids, embedding: { data, rows: n, cols: 2 }, planted };
}
