import type { SimulationRun } from "../resim/simulateScenario.js";

/** Thresholds the outcome counts time below (s); defaults are common practice for motorway car-following. */
export interface OutcomeThresholds {
  /** Time headway below which a frame counts as close following (s; default 0.9). */
  thw: number;
  /** Time-to-collision below which a frame counts as critical (s; default 3). */
  ttc: number;
  /** Deceleration above which the run counts as a hard-braking event (m/s²; default 4). */
  decel: number;
}

export const OUTCOME_THRESHOLDS: Readonly<OutcomeThresholds> = Object.freeze({ thw: 0.9, ttc: 3, decel: 4 });

/** Outcome metrics of one run of the entity under test. */
export interface RunOutcome {
  minTtc: number | null;
  minThw: number | null;
  /** Largest deceleration of the ego (m/s², positive = braking; 0 when it never brakes). */
  maxDecel: number;
  collision: boolean;
  /** Time (s) with THW below thresholds.thw / TTC below thresholds.ttc towards the same-lane leader. */
  timeBelowThw: number;
  timeBelowTtc: number;
  /** Distance the ego drove (m), the exposure of the run. */
  distance: number;
}

/**
 * Per-frame THW = gap / v_ego and TTC = gap / (v_ego − v_lead) (when closing) towards the nearest
 * vehicle ahead in the ego's lane, gap bumper to bumper — the usual definitions (ISO 22839 uses the
 * same TTC); maximum deceleration is −min a_x of the ego. Frames are matched by time (half a frame).
 */
export function runOutcome(run: SimulationRun, egoName = "ego", thresholds: OutcomeThresholds = OUTCOME_THRESHOLDS): RunOutcome {
  const egoId = run.trackIds[egoName];
  const ego = run.recording.tracks.find((t) => t.id === egoId);
  const base = { minTtc: run.ego.minTtc, minThw: run.ego.minThw, collision: run.ego.collision };
  if (!ego || ego.t.length === 0) return { ...base, maxDecel: 0, timeBelowThw: 0, timeBelowTtc: 0, distance: 0 };
  const dt = 1 / run.frameRate;
  const index = run.recording.tracks
    .filter((t) => t !== ego && t.t.length > 0)
    .map((t) => ({ t, t0: t.t[0]! }));
  let maxDecel = 0;
  let below = 0;
  let belowTtc = 0;
  let distance = 0;
  for (let i = 0; i < ego.t.length; i++) {
    maxDecel = Math.max(maxDecel, -ego.ax[i]!);
    if (i > 0) distance += Math.abs(ego.x[i]! - ego.x[i - 1]!);
    const te = ego.t[i]!;
    let gap = Infinity;
    let vLead = 0;
    for (const { t: o, t0 } of index) {
      const j = Math.round((te - t0) / dt);
      if (j < 0 || j >= o.t.length || Math.abs(o.t[j]! - te) > dt / 2) continue;
      if (o.lane[j] !== ego.lane[i] || o.x[j]! <= ego.x[i]!) continue;
      const g = o.x[j]! - o.length / 2 - (ego.x[i]! + ego.length / 2);
      if (g < gap) {
        gap = g;
        vLead = o.vx[j]!;
      }
    }
    if (!Number.isFinite(gap)) continue;
    const v = ego.vx[i]!;
    if (v > 0 && gap / v < thresholds.thw) below += dt;
    if (v > vLead && gap / (v - vLead) < thresholds.ttc) belowTtc += dt;
  }
  return { ...base, maxDecel, timeBelowThw: below, timeBelowTtc: belowTtc, distance };
}
