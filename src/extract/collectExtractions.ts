import type { Progress } from "../core/progress.js";
import type { ExtractedRecording } from "../pipeline/extractRecording.js";
import type { ResolvedPipelineOptions } from "../pipeline/options.js";
import type { ReadRecordingOptions } from "../recording/readRecording.js";
import type { RejectedTrack } from "../recording/types.js";
import type { PlanSource } from "../shard/planInputs.js";
import { readShard } from "../shard/readShard.js";
import { extractFiles } from "./extractFiles.js";
import { extractionOptions, portableReadOptions } from "./extractionOptions.js";

/**
 * Every input's extraction, in input order: tracks files are extracted on worker threads (one
 * recording per thread at a time), shards are read back and checked against this run's extraction
 * options and tool version. Either way each recording is reduced to its scenario rows before the
 * next is read in the same thread.
 */
export async function collectExtractions(
  inputs: readonly PlanSource[],
  read: ReadRecordingOptions,
  options: ResolvedPipelineOptions,
  opts: { workers?: number; progress?: Progress; onRejected?: (source: string, rejected: RejectedTrack[]) => void } = {},
): Promise<ExtractedRecording[]> {
  const out: ExtractedRecording[] = new Array(inputs.length);
  const tracks = inputs.flatMap((x, i) => (x.kind === "tracks" ? [{ path: x.path, i }] : []));
  const extracting =
    tracks.length > 0
      ? extractFiles(
          tracks.map((t) => t.path),
          portableReadOptions(read),
          options,
          {
            workers: opts.workers,
            progress: opts.progress,
            onResult: (r, j) => {
              const { rejected, ...ex } = r;
              out[tracks[j]!.i] = ex;
              if (rejected.length > 0) opts.onRejected?.(r.summary.source, rejected);
            },
          },
        )
      : Promise.resolve([]);
  // Shards are read on this thread while the workers extract; a failure here still waits for them.
  const expected = extractionOptions(read, options);
  const reading = (async () => {
    for (let i = 0; i < inputs.length; i++) {
      const x = inputs[i]!;
      if (x.kind === "shard") out[i] = await readShard(x.manifest, { options: expected });
    }
  })();
  const [a, b] = await Promise.allSettled([extracting, reading]);
  if (a.status === "rejected") throw a.reason;
  if (b.status === "rejected") throw b.reason;
  return out;
}
