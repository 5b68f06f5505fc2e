import type { Progress } from "../core/progress.js";
import { detectAllManeuvers } from "../maneuvers/detectAllManeuvers.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import type { RecordingConditions } from "../recording/conditions.js";
import type { Recording } from "../recording/types.js";
import { buildScenarios } from "../scenario/buildScenarios.js";
import type { ScenarioSet } from "../scenario/types.js";
import { buildScenes } from "../scene/buildScenes.js";
import { measureScenarioParameters } from "../logical/measureScenarioParameters.js";
import { resolvePipelineOptions, type PipelineOptions, type ResolvedPipelineOptions } from "./options.js";

/** What a recording contributed, for reports and provenance. */
export interface RecordingSummary {
  id: string;
  source: string;
  checksum: string;
  road: string;
  /** The recording's conditions as stated in its road description ({} when none). */
  conditions: RecordingConditions;
  lanes: number;
  frameRate: number;
  tracks: number;
  rows: number;
  rejected: number;
  scenarios: number;
  km: number;
  hours: number;
  warnings: string[];
}

/** One recording's part of a pipeline run: everything that does not need the other recordings. */
export interface ExtractedRecording {
  set: ScenarioSet;
  maneuvers: TrackManeuvers[];
  summary: RecordingSummary;
  /** Seconds per stage ("maneuvers", "neighbours", "scenarios"). */
  timings: Record<string, number>;
}

/**
 * The per-recording half of the pipeline: maneuvers → neighbours (scenes) → scenario windows, and the
 * recording's summary. Recordings are independent here, so this is the unit that can run in another
 * process or be cached; `planCatalogue` takes the results of all recordings. Options are resolved
 * here as well (resolving is idempotent), so either `PipelineOptions` or resolved options may be passed.
 */
export function extractRecording(
  recording: Recording,
  options: PipelineOptions | ResolvedPipelineOptions = {},
  progress?: Progress,
): ExtractedRecording {
  const o = resolvePipelineOptions(options);
  const timings: Record<string, number> = {};
  const timed = <T>(name: string, f: () => T): T => {
    const t0 = performance.now();
    const r = f();
    timings[name] = (timings[name] ?? 0) + (performance.now() - t0) / 1000;
    return r;
  };
  const rec = recording;
  const m = timed("maneuvers", () => detectAllManeuvers(rec, o.maneuvers, progress));
  const scenes = timed("neighbours", () => buildScenes(rec, m, o.scene, progress));
  const set = timed("scenarios", () => buildScenarios(rec, m, scenes, o.scenario, progress));
  // Class and parameters of every scenario, while the tracks, maneuvers and scenes are at hand.
  timed("parameters", () => measureScenarioParameters(rec, m, scenes, set, o.measure));
  let rows = 0;
  for (const t of rec.tracks) rows += t.t.length;
  let km = 0;
  let seconds = 0;
  for (const s of set.scenarios) {
    km += s.km;
    seconds += s.seconds;
  }
  const recWarnings = [...rec.warnings];
  for (const tm of m)
    for (const w of tm.warnings) {
      // Maneuver warnings usually name their track already; do not name it twice.
      const prefix = `track ${tm.trackId}: `;
      recWarnings.push(w.startsWith(prefix) ? w : prefix + w);
    }
  for (const w of set.warnings) recWarnings.push(w);
  const summary: RecordingSummary = {
    id: rec.id,
    source: rec.source,
    checksum: rec.checksum,
    road: rec.road.name,
    conditions: { ...(rec.road.conditions ?? {}) },
    lanes: rec.road.laneMarkings.length - 1,
    frameRate: rec.road.frameRate,
    tracks: rec.tracks.length,
    rows,
    rejected: rec.rejected.length,
    scenarios: set.scenarios.length,
    km,
    hours: seconds / 3600,
    warnings: recWarnings,
  };
  return { set, maneuvers: m, summary, timings };
}
