import { createHash } from "node:crypto";
import type { PortableReadOptions } from "../extract/extractionOptions.js";
import type { ResolvedPipelineOptions } from "../pipeline/options.js";

/** One extraction job: everything a stateless worker needs to turn one recording into its shard. */
export interface ExtractJobData {
  /** Tracks file, as every worker sees it (shared storage, same path on every machine). */
  source: string;
  read: PortableReadOptions;
  options: ResolvedPipelineOptions;
  /** Shard folder on shared storage. */
  shardDir: string;
  manifestOptions: Record<string, unknown>;
}

/** Attempts per job before it is reported as failed for good. */
export const JOB_ATTEMPTS = 3;

/**
 * Job id from the shard folder and the source: submitting the same recording twice for the same
 * folder adds no second job (BullMQ keeps one job per id).
 */
export function extractJobId(shardDir: string, source: string): string {
  return `extract-${createHash("sha256").update(`${shardDir}\0${source}`).digest("hex").slice(0, 24)}`;
}
