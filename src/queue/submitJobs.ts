import { mkdir } from "node:fs/promises";
import { join, resolve } from "node:path";
import { Queue } from "bullmq";
import { writeFileAtomic } from "../core/io.js";
import type { ResolvedPipelineOptions } from "../pipeline/options.js";
import type { PortableReadOptions } from "../extract/extractionOptions.js";
import { extractionOptions } from "../extract/extractionOptions.js";
import { EXPECTED_FILE, FAILED_DIR, type ExpectedShards, type FailedJob } from "../shard/planInputs.js";
import { safeName } from "../shard/shardNames.js";
import { JOB_ATTEMPTS, extractJobId, type ExtractJobData } from "./extractJob.js";
import { checkQueueReachable, redisClient, type QueueAddress } from "./queueAddress.js";

export interface SubmitResult {
  /** Jobs added now; the others were already on the queue for this shard folder. */
  added: number;
  total: number;
}

/**
 * Put one extraction job per tracks file on the queue and write the shard folder's expected.json
 * (so that plan knows which recordings make the set complete). Jobs retry up to JOB_ATTEMPTS times
 * with exponential back-off (1 s, 2 s, …).
 */
export async function submitJobs(a: QueueAddress, sources: readonly string[], read: PortableReadOptions, options: ResolvedPipelineOptions, shardDir: string): Promise<SubmitResult> {
  await checkQueueReachable(a);
  const dir = resolve(shardDir);
  await mkdir(dir, { recursive: true });
  const expected: ExpectedShards = { recordings: sources.map((source) => ({ source })) };
  await writeFileAtomic(join(dir, EXPECTED_FILE), `${JSON.stringify(expected, null, 2)}\n`);
  const manifestOptions = extractionOptions(read, options);
  const connection = redisClient(a);
  const queue = new Queue<ExtractJobData>(a.name, { connection });
  try {
    let added = 0;
    for (const source of sources) {
      const jobId = extractJobId(dir, source);
      if (await queue.getJob(jobId)) continue;
      await queue.add("extract", { source, read, options, shardDir: dir, manifestOptions }, { jobId, attempts: JOB_ATTEMPTS, backoff: { type: "exponential", delay: 1000 } });
      added++;
    }
    return { added, total: sources.length };
  } finally {
    await queue.close();
    connection.disconnect();
  }
}

export interface JobsOutcome {
  done: string[];
  failed: FailedJob[];
}

/**
 * Wait until every job of this shard folder has completed or failed for good, then write a report
 * of each failed job into <shardDir>/failed/ (plan names them) and return the outcome.
 */
export async function waitForJobs(a: QueueAddress, sources: readonly string[], shardDir: string, onTick?: (done: number, failed: number, total: number) => void): Promise<JobsOutcome> {
  await checkQueueReachable(a);
  const dir = resolve(shardDir);
  const connection = redisClient(a);
  const queue = new Queue<ExtractJobData>(a.name, { connection });
  try {
    for (;;) {
      const done: string[] = [];
      const failed: FailedJob[] = [];
      for (const source of sources) {
        const job = await queue.getJob(extractJobId(dir, source));
        if (!job) {
          failed.push({ source, attempts: 0, reason: "no such job on the queue (submit it first)" });
          continue;
        }
        const state = await job.getState();
        if (state === "completed") done.push(source);
        else if (state === "failed") failed.push({ source, attempts: job.attemptsMade, reason: job.failedReason || "unknown" });
      }
      onTick?.(done.length, failed.length, sources.length);
      if (done.length + failed.length === sources.length) {
        for (const f of failed) await writeFailedReport(dir, f);
        return { done, failed };
      }
      await new Promise((r) => setTimeout(r, 500));
    }
  } finally {
    await queue.close();
    connection.disconnect();
  }
}

/** <shardDir>/failed/<recording>.json: the recording, its attempts and the last reason. */
export async function writeFailedReport(shardDir: string, f: FailedJob): Promise<void> {
  await mkdir(join(shardDir, FAILED_DIR), { recursive: true });
  await writeFileAtomic(join(shardDir, FAILED_DIR, `${safeName(f.source)}.json`), `${JSON.stringify(f, null, 2)}\n`);
}
