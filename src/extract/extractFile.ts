import type { Progress } from "../core/progress.js";
import { extractRecording, type ExtractedRecording } from "../pipeline/extractRecording.js";
import type { ResolvedPipelineOptions } from "../pipeline/options.js";
import { readRecording } from "../recording/readRecording.js";
import type { RejectedTrack } from "../recording/types.js";
import { compactManeuvers } from "../shard/compactManeuvers.js";
import type { PortableReadOptions } from "./extractionOptions.js";

/** One recording reduced to its scenario rows, plus the tracks that were left out on reading. */
export interface ExtractedFile extends ExtractedRecording {
  rejected: RejectedTrack[];
}

/**
 * Read one tracks file and reduce it to what planning needs: scenarios with their tensors, the
 * maneuver segments (per-sample arrays dropped, compactManeuvers) and the summary. The tracks go
 * out of scope when this returns, so a caller that handles one file at a time holds at most one
 * recording's tracks.
 */
export async function extractFile(path: string, read: PortableReadOptions, options: ResolvedPipelineOptions, progress?: Progress): Promise<ExtractedFile> {
  const rec = await readRecording(path, { ...read, progress });
  const ex = extractRecording(rec, options, progress);
  return { set: ex.set, maneuvers: compactManeuvers(ex.maneuvers), summary: ex.summary, timings: ex.timings, rejected: rec.rejected };
}
