import { availableParallelism } from "node:os";
import type { Progress } from "../core/progress.js";
import type { ResolvedPipelineOptions } from "../pipeline/options.js";
import type { ExtractedFile } from "./extractFile.js";
import type { PortableReadOptions } from "./extractionOptions.js";
import { ExtractPool } from "./extractPool.js";

/** Default number of extraction threads: one per core, at most 2 (this project's machines have 2). */
export function defaultWorkers(files: number): number {
  return Math.max(1, Math.min(2, availableParallelism(), files));
}

/**
 * Extract many recordings on `workers` threads, each thread reading and reducing one recording at a
 * time. Results come back in input order, whatever thread finished first, so the merged catalogue
 * (and the plan) does not depend on the number of workers. `onResult` sees each result as it is
 * placed, for progress and for rejected-track messages.
 */
export async function extractFiles(
  paths: readonly string[],
  read: PortableReadOptions,
  options: ResolvedPipelineOptions,
  opts: { workers?: number; progress?: Progress; onResult?: (r: ExtractedFile, index: number) => void } = {},
): Promise<ExtractedFile[]> {
  const pool = new ExtractPool(opts.workers ?? defaultWorkers(paths.length));
  const results: ExtractedFile[] = new Array(paths.length);
  let done = 0;
  try {
    opts.progress?.({ stage: "extract", done: 0, total: paths.length });
    await Promise.all(
      paths.map(async (p, i) => {
        const r = await pool.extract(p, read, options, pool.threads === 1 ? opts.progress : undefined);
        results[i] = r;
        opts.onResult?.(r, i);
        opts.progress?.({ stage: "extract", done: ++done, total: paths.length, message: r.summary.id });
      }),
    );
  } finally {
    await pool.close();
  }
  return results;
}
