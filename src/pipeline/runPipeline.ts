import { checkRecordings } from "./checkRecordings.js";
import { InputError } from "../core/errors.js";
import type { Progress } from "../core/progress.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import type { Recording } from "../recording/types.js";
import type { ScenarioSet } from "../scenario/types.js";
import { extractRecording, type RecordingSummary } from "./extractRecording.js";
import { resolvePipelineOptions, type PipelineOptions } from "./options.js";
import { checkDistinctIds, planCatalogue, type PipelineResult } from "./planCatalogue.js";

export type { RecordingSummary } from "./extractRecording.js";
export type { PipelineResult } from "./planCatalogue.js";

/**
 * The whole chain for recordings already read, as wiring only: `extractRecording` per recording
 * (maneuvers → neighbours → scenario windows), then `planCatalogue` on all of them (embedding →
 * clustering → medoids → 2-D map → test plan). A notebook that calls the same two functions in the
 * same order gets the same plan, byte for byte. Pure: no files are read or written here.
 */
export function runPipeline(recordings: Recording[], options: PipelineOptions = {}, progress?: Progress): PipelineResult {
  checkRecordings(recordings);
  const o = resolvePipelineOptions(options);
  if (recordings.length === 0) throw new InputError("runPipeline needs at least one recording");
  checkDistinctIds(recordings);
  const sets: ScenarioSet[] = [];
  const maneuvers: TrackManeuvers[][] = [];
  const summaries: RecordingSummary[] = [];
  const timings: Record<string, number> = {};
  for (const rec of recordings) {
    const x = extractRecording(rec, o, progress);
    sets.push(x.set);
    maneuvers.push(x.maneuvers);
    summaries.push(x.summary);
    for (const [k, v] of Object.entries(x.timings)) timings[k] = (timings[k] ?? 0) + v;
  }
  const result = planCatalogue(sets, summaries, maneuvers, o, progress);
  for (const [k, v] of Object.entries(result.timings)) timings[k] = (timings[k] ?? 0) + v;
  result.timings = timings;
  return result;
}
