import { sha256Text } from "../core/io.js";
import type { Progress } from "../core/progress.js";
import type { Rng } from "../core/rng.js";
import { VERSION } from "../core/version.js";
import { LAT_KEEP, LAT_LEFT, LAT_RIGHT } from "../maneuvers/labels.js";
import type { Recording, Road, Track } from "../recording/types.js";
import { labelLongitudinalTruth } from "./labelLongitudinalTruth.js";
import { recordedOptions, resolveTrafficOptions, varietyActive, type TrafficOptions } from "./options.js";
import { Simulator } from "./simulator.js";
import type { GroundTruth, PlantedEvent, TrackTruth, TruthCutIn, TruthLaneChange } from "./types.js";
import type { Vehicle } from "./vehicle.js";

/** Figures of a generated run. */
export interface TrafficStats {
  /** Vehicle-kilometres driven inside the observed section (clean simulator speeds). */
  vehicleKm: number;
  /** Vehicle-hours inside the observed section (recorded samples × frame interval). */
  vehicleHours: number;
  /** Recorded tracks. */
  vehicles: number;
  laneChanges: number;
  cutIns: number;
  planted: number;
  /** Recorded samples (rows of the tracks table). */
  rows: number;
  /** Length of the recording (s). */
  duration: number;
}

export interface GeneratedTraffic {
  recording: Recording;
  truth: GroundTruth;
  /** The resolved options (defaults filled in). */
  options: TrafficOptions;
  /** Seed of the Rng the run was made with. */
  seed: number;
  stats: TrafficStats;
  warnings: string[];
}

const PROFILE_NAMES = ["minimum-jerk", "constant-speed", "sinusoidal"] as const;

/** Round to 1e-3 (mm, ms, mm/s): files stay small and byte-reproducible. */
export function round3(v: number): number {
  const r = Math.round(v * 1000) / 1000;
  return r === 0 ? 0 : r;
}

/**
 * Generate a recording of highway traffic with its ground truth.
 *
 * The run is sized by `vehicleKm`: after a warm-up (the road fills and traffic settles) the observed
 * section [0, length] is recorded at `frameRate` until vehicles have driven that many kilometres
 * inside it. Tracks hold positions with optional Gaussian noise (`positionNoiseSd`) and the
 * simulator's clean velocities and accelerations; the ground truth is always derived from the clean
 * state. Same options and seed ⇒ identical output.
 */
export function generateTraffic(options: Partial<TrafficOptions>, rng: Rng, progress?: Progress): GeneratedTraffic {
  const o = resolveTrafficOptions(options);
  const frameMs = 1000 / o.frameRate;
  const sim = new Simulator(o, rng, {
    xEntry: -o.warmupLength,
    xExit: o.length + o.runoutLength,
    inflow: true,
    recordRange: [0, o.length],
  });

  // Warm-up: by default twice the time to drive the whole simulated road at 30 m/s.
  const roadLength = o.warmupLength + o.length + o.runoutLength;
  const warmupS = o.warmupTime > 0 ? o.warmupTime : (2 * roadLength) / 30;
  const warmupMs = Math.ceil((warmupS * 1000) / frameMs) * frameMs;
  const warmupSteps = Math.round(warmupMs / sim.dtMs);
  const stage = "generate traffic";
  progress?.({ stage, done: 0, total: o.vehicleKm, message: "warm-up" });
  for (let i = 0; i < warmupSteps; i++) sim.step(false);

  // Record. A guard stops runs whose demand is far too low to reach the target in reasonable time.
  const targetM = o.vehicleKm * 1000;
  const expectedS = (o.vehicleKm * 3600) / ((o.flowPerLane * o.lanes * o.length) / 1000);
  const maxFrames = Math.ceil((50 * expectedS + 3600) * o.frameRate);
  const warnings: string[] = [];
  while (sim.observedMeters < targetM) {
    if (sim.frames >= maxFrames) {
      warnings.push(
        `stopped after ${(sim.frames / o.frameRate).toFixed(0)} s of recording at ${(sim.observedMeters / 1000).toFixed(1)} of vehicleKm=${o.vehicleKm}: the road carries far less than flowPerLane=${o.flowPerLane} suggests`,
      );
      break;
    }
    sim.step(true);
    for (let s = 1; s < o.substeps; s++) sim.step(false);
    if (progress && sim.frames % 250 === 0)
      progress({ stage, done: Math.min(o.vehicleKm, sim.observedMeters / 1000), total: o.vehicleKm });
  }
  progress?.({ stage, done: o.vehicleKm, total: o.vehicleKm });

  if (sim.maxQueue > 10)
    warnings.push(
      `up to ${sim.maxQueue} vehicles queued at the entry: the inflow flowPerLane=${o.flowPerLane} veh/h exceeds what the road takes up`,
    );
  if (sim.pendingPlanted > 0)
    warnings.push(`${sim.pendingPlanted} planted event(s) found no suitable vehicle before the run ended`);
  warnings.push(...sim.warnings);

  const { recording, truth, rows } = assemble(sim, o, rng, warmupMs);
  recording.warnings.push(...warnings);
  const duration = sim.frames / o.frameRate;
  const stats: TrafficStats = {
    vehicleKm: sim.observedMeters / 1000,
    vehicleHours: (rows / o.frameRate) / 3600,
    vehicles: recording.tracks.length,
    laneChanges: truth.laneChanges.length,
    cutIns: truth.cutIns.length,
    planted: truth.planted.length,
    rows,
    duration,
  };
  return { recording, truth, options: o, seed: rng.seed, stats, warnings };
}

/** The road description of a generated recording. */
export function generatedRoad(o: TrafficOptions): Road {
  const road: Road = {
    name: o.roadName,
    laneMarkings: Array.from({ length: o.lanes + 1 }, (_, i) => round3(i * o.laneWidth)),
    frameRate: o.frameRate,
    xRange: [0, o.length],
    direction: "+x",
  };
  if (o.speedLimit > 0) road.speedLimit = o.speedLimit;
  return road;
}

function assemble(
  sim: Simulator,
  o: TrafficOptions,
  rng: Rng,
  warmupMs: number,
): { recording: Recording; truth: GroundTruth; rows: number } {
  const frameMs = 1000 / o.frameRate;
  const toS = (ms: number): number => round3((ms - warmupMs) / 1000);
  const noise = rng.fork("position-noise");
  const sd = o.positionNoiseSd;
  const tracks: Track[] = [];
  const truthTracks: TrackTruth[] = [];
  const spans = new Map<Vehicle, [number, number]>();
  let rows = 0;

  const changesByVehicle = new Map<Vehicle, typeof sim.laneChanges>();
  for (const lc of sim.laneChanges) {
    const list = changesByVehicle.get(lc.vehicle);
    if (list) list.push(lc);
    else changesByVehicle.set(lc.vehicle, [lc]);
  }

  for (const u of sim.recorded) {
    const rec = u.rec!;
    const n = rec.x.length;
    rows += n;
    const t = new Float64Array(n);
    const x = new Float64Array(n);
    const y = new Float64Array(n);
    const vx = new Float64Array(n);
    const vy = new Float64Array(n);
    const ax = new Float64Array(n);
    const ay = new Float64Array(n);
    const lane = new Int32Array(n);
    for (let k = 0; k < n; k++) {
      t[k] = ((u.firstFrame + k) * frameMs) / 1000;
      let px = rec.x.data[k]!;
      let py = rec.y.data[k]!;
      if (sd > 0) {
        px += noise.normal(0, sd);
        py += noise.normal(0, sd);
      }
      x[k] = round3(px);
      y[k] = round3(py);
      vx[k] = round3(rec.v.data[k]!);
      vy[k] = round3(rec.vy.data[k]!);
      ax[k] = round3(rec.a.data[k]!);
      ay[k] = round3(rec.ay.data[k]!);
      lane[k] = rec.lane.data[k]!;
    }
    tracks.push({
      id: u.trackId,
      recording: o.recordingId,
      kind: u.kind,
      length: round3(u.length),
      width: round3(u.width),
      t,
      x,
      y,
      vx,
      vy,
      ax,
      ay,
      lane,
    });
    const firstMs = warmupMs + u.firstFrame * frameMs;
    const lastMs = warmupMs + (u.firstFrame + n - 1) * frameMs;
    spans.set(u, [firstMs, lastMs]);

    const lateral = new Int8Array(n).fill(LAT_KEEP);
    for (const lc of changesByVehicle.get(u) ?? []) {
      const code = lc.to > lc.from ? LAT_LEFT : LAT_RIGHT;
      const k0 = Math.max(0, Math.ceil((lc.startMs - firstMs) / frameMs));
      const k1 = Math.min(n - 1, Math.floor((lc.endMs - firstMs) / frameMs));
      for (let k = k0; k <= k1; k++) lateral[k] = code;
    }
    const longitudinal = labelLongitudinalTruth(ax, o.frameRate, {
      enter: o.lonEnterThreshold,
      exit: o.lonExitThreshold,
      minDuration: o.lonMinDuration,
      averageWindow: o.lonAverageWindow,
    });
    truthTracks.push({ trackId: u.trackId, longitudinal, lateral });
  }

  const inside = (u: Vehicle, ms: number): boolean => {
    const s = spans.get(u);
    return s !== undefined && ms >= s[0] && ms <= s[1];
  };

  const laneChanges: TruthLaneChange[] = [];
  for (const lc of sim.laneChanges) {
    const s = spans.get(lc.vehicle);
    if (!s || lc.endMs < s[0] || lc.startMs > s[1]) continue;
    const item: TruthLaneChange = {
      trackId: lc.vehicle.trackId,
      direction: lc.to > lc.from ? "left" : "right",
      tStart: toS(lc.startMs),
      tCross: toS(lc.crossMs),
      tEnd: toS(lc.endMs),
      fromLane: lc.from,
      toLane: lc.to,
    };
    if (lc.startMs < s[0] || lc.endMs > s[1]) item.partial = true;
    if (varietyActive(o)) {
      item.profile = PROFILE_NAMES[lc.shape];
      if (lc.tag) item.case = lc.tag;
    }
    laneChanges.push(item);
  }

  const cutIns: TruthCutIn[] = [];
  for (const c of sim.cutIns) {
    if (!inside(c.ego, c.tMs) || !inside(c.cutter, c.tMs)) continue;
    cutIns.push({ egoTrack: c.ego.trackId, cutterTrack: c.cutter.trackId, t: toS(c.tMs), gap: round3(c.gap) });
  }

  const planted: PlantedEvent[] = [];
  for (const p of sim.planted) {
    if (!inside(p.vehicle, p.startMs)) continue;
    const e: PlantedEvent = {
      kind: p.kind,
      trackId: p.vehicle.trackId,
      tStart: toS(p.startMs),
      tEnd: toS(p.endMs),
      magnitude: round3(p.magnitude),
    };
    if (p.affected && p.affected.trackId >= 0) e.affectedTrack = p.affected.trackId;
    planted.push(e);
  }

  const truth: GroundTruth = {
    tracks: truthTracks,
    laneChanges,
    cutIns,
    planted,
    definitions: truthDefinitions(o),
  };
  if (varietyActive(o)) truth.markingRiders = sim.recorded.filter((u) => u.rideSide !== 0).map((u) => u.trackId);
  const recording: Recording = {
    id: o.recordingId,
    source: "generated",
    checksum: sha256Text(JSON.stringify({ generator: "roadsieve synth", version: VERSION, seed: rng.seed, options: recordedOptions(o) })),
    road: generatedRoad(o),
    tracks,
    rejected: [],
    warnings: [],
  };
  return { recording, truth, rows };
}

/**
 * The numbers behind the ground-truth labels, so that a detector can be judged with the same
 * definitions. Lateral labels: lane change from the start to the end of the lateral movement (frames
 * with tStart <= t <= tEnd). Longitudinal labels: see labelLongitudinalTruth.
 */
export function truthDefinitions(o: TrafficOptions): Record<string, number> {
  return {
    frameRate: o.frameRate,
    lanes: o.lanes,
    laneWidth: o.laneWidth,
    observedStart: 0,
    observedEnd: o.length,
    cutInMaxGap: o.cutInMaxGap,
    lonEnterThreshold: o.lonEnterThreshold,
    lonExitThreshold: o.lonExitThreshold,
    lonMinDuration: o.lonMinDuration,
    lonAverageWindow: o.lonAverageWindow,
    laneChangeDurationMean: o.laneChangeDurationMean,
    laneChangeDurationSd: o.laneChangeDurationSd,
    hardBrakingRate: o.hardBrakingRate,
    hardBrakingDecelMin: o.hardBrakingDecelMin,
    hardBrakingDecelMax: o.hardBrakingDecelMax,
    tightCutInRate: o.tightCutInRate,
    tightCutInGapMin: o.tightCutInGapMin,
    tightCutInGapMax: o.tightCutInGapMax,
    positionNoiseSd: o.positionNoiseSd,
  };
}
