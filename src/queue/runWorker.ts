import { Worker, type Job } from "bullmq";
import { ExtractPool, type ShardReply } from "../extract/extractPool.js";
import { JOB_ATTEMPTS, type ExtractJobData } from "./extractJob.js";
import { checkQueueReachable, queueUrl, redisClient, type QueueAddress } from "./queueAddress.js";
import { writeFailedReport } from "./submitJobs.js";

export interface RunWorkerOptions {
  /** Jobs at once (each on its own extraction thread). Default 1: run one worker process per core. */
  concurrency?: number;
  /**
   * Seconds a job's lock lasts without renewal. A worker that dies mid-job loses its jobs to the
   * others after about this long (BullMQ's stalled-job check runs at the same interval). Default 30.
   */
  lockSeconds?: number;
  /** One line per event ("start", "wrote", "already there", "failed", …). */
  log?: (line: string) => void;
}

/** A running worker: `stopped` resolves when it has closed, `stop()` finishes the current jobs and closes. */
export interface RunningWorker {
  stop(): Promise<void>;
  stopped: Promise<void>;
  /** Jobs being processed right now. */
  activeJobs(): number;
}

/**
 * Take extraction jobs from the queue until stopped. Each job runs on an extraction thread (so
 * this thread stays free to renew job locks while a long recording is reduced) and writes its shard
 * to the job's shard folder; writeShard commits each shard exactly once even when a job runs twice
 * (a worker died after writing but before acknowledging). A job that throws is retried by BullMQ;
 * after its last attempt it is reported in <shardDir>/failed/.
 */
export async function runWorker(a: QueueAddress, options: RunWorkerOptions = {}): Promise<RunningWorker> {
  await checkQueueReachable(a);
  const concurrency = options.concurrency ?? 1;
  const lockMs = Math.round((options.lockSeconds ?? 30) * 1000);
  const log = options.log ?? (() => {});
  const pool = new ExtractPool(concurrency);
  let active = 0;
  const connection = redisClient(a);
  connection.on("error", (e) => log(`queue connection: ${e.message}`));
  const worker = new Worker<ExtractJobData, ShardReply["shard"]>(
    a.name,
    async (job) => {
      active++;
      try {
        return await processJob(job);
      } finally {
        active--;
      }
    },
    { connection, concurrency, lockDuration: lockMs, stalledInterval: lockMs, maxStalledCount: 2 },
  );
  async function processJob(job: Job<ExtractJobData>): Promise<ShardReply["shard"]> {
    const d = job.data;
    log(`start ${d.source} (attempt ${job.attemptsMade + 1} of ${job.opts.attempts ?? JOB_ATTEMPTS})`);
    const r = await pool.extractToShard(d.source, d.read, d.options, d.shardDir, d.manifestOptions);
    log(`${r.shard.status === "written" ? "wrote" : "already there"} ${r.shard.manifest}`);
    return r.shard;
  }
  worker.on("failed", (job, err) => {
    if (!job) return;
    const attempts = job.opts.attempts ?? JOB_ATTEMPTS;
    log(`failed ${job.data.source} attempt ${job.attemptsMade} of ${attempts}: ${err.message.split("\n")[0]}`);
    if (job.attemptsMade >= attempts)
      void writeFailedReport(job.data.shardDir, { source: job.data.source, attempts: job.attemptsMade, reason: err.message.split("\n")[0]! }).catch((e: Error) => log(`cannot write the failure report: ${e.message}`));
  });
  worker.on("error", (e) => log(`worker: ${e.message}`));
  await worker.waitUntilReady();
  log(`waiting for jobs on ${queueUrl(a)} queue ${a.name}`);
  let resolveStopped!: () => void;
  const stopped = new Promise<void>((r) => (resolveStopped = r));
  let stopping: Promise<void> | null = null;
  const stop = (): Promise<void> =>
    (stopping ??= (async () => {
      await worker.close();
      await pool.close();
      connection.disconnect();
      resolveStopped();
    })());
  return { stop, stopped, activeJobs: () => active };
}
