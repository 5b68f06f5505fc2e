/**
 * Worker-thread side of ExtractPool: takes one job at a time from the parent, extracts the file
 * and either sends the result back (its tensor buffer transferred, not copied) or writes a shard
 * and sends back only where it went.
 */
import { parentPort } from "node:worker_threads";
import type { ProgressEvent } from "../core/progress.js";
import { throttleProgress } from "../core/progress.js";
import { writeShard } from "../shard/writeShard.js";
import { extractFile } from "./extractFile.js";
import type { PoolJob, PoolReply } from "./extractPool.js";

const port = parentPort!;
port.on("message", (job: PoolJob) => {
  const progress = throttleProgress((event: ProgressEvent) => port.postMessage({ id: job.id, progress: event } satisfies PoolReply));
  run(job, progress).then(
    ([reply, transfer]) => port.postMessage(reply, transfer),
    (e: unknown) => {
      const err = e as Error;
      port.postMessage({ id: job.id, error: { name: err?.name ?? "Error", message: err?.message ?? String(e), stack: err?.stack } } satisfies PoolReply);
    },
  );
});

async function run(job: PoolJob, progress: (e: ProgressEvent) => void): Promise<[PoolReply, ArrayBuffer[]]> {
  const ex = await extractFile(job.path, job.read, job.options, progress);
  if (job.shardDir !== undefined) {
    const shard = await writeShard(job.shardDir, ex, job.manifestOptions!);
    return [{ id: job.id, shard, summary: ex.summary, rejected: ex.rejected }, []];
  }
  const buf = ex.set.tensors.buffer;
  return [{ id: job.id, result: ex }, buf instanceof ArrayBuffer ? [buf] : []];
}
