import { Worker } from "node:worker_threads";
import { InputError } from "../core/errors.js";
import type { Progress, ProgressEvent } from "../core/progress.js";
import type { RecordingSummary } from "../pipeline/extractRecording.js";
import type { ResolvedPipelineOptions } from "../pipeline/options.js";
import type { RejectedTrack } from "../recording/types.js";
import type { WriteShardResult } from "../shard/writeShard.js";
import type { ExtractedFile } from "./extractFile.js";
import type { PortableReadOptions } from "./extractionOptions.js";

/** A job sent to a worker thread. */
export interface PoolJob {
  id: number;
  path: string;
  read: PortableReadOptions;
  options: ResolvedPipelineOptions;
  /** When set, the thread writes a shard here instead of sending the result back. */
  shardDir?: string;
  manifestOptions?: Record<string, unknown>;
}

/** What a worker thread sends back. */
export type PoolReply =
  | { id: number; progress: ProgressEvent }
  | { id: number; result: ExtractedFile }
  | { id: number; shard: WriteShardResult; summary: RecordingSummary; rejected: RejectedTrack[] }
  | { id: number; error: { name: string; message: string; stack?: string } };

export type ShardReply = { shard: WriteShardResult; summary: RecordingSummary; rejected: RejectedTrack[] };

interface Pending {
  resolve(v: unknown): void;
  reject(e: Error): void;
  progress?: Progress;
}

/**
 * Start a worker thread running extractWorker. From the built package that is extractWorker.js
 * beside this file; from the TypeScript sources (tests, tsx) the thread loads the .ts file through
 * tsx's loader, which is a development dependency only.
 */
function startWorker(): Worker {
  const here = import.meta.url;
  if (here.endsWith(".ts")) {
    const target = new URL("./extractWorker.ts", here).href;
    const api = import.meta.resolve("tsx/esm/api");
    return new Worker(`import(${JSON.stringify(api)}).then((a) => a.tsImport(${JSON.stringify(target)}, ${JSON.stringify(here)}))`, { eval: true });
  }
  return new Worker(new URL("./extractWorker.js", here));
}

/**
 * A fixed set of worker threads that extract recordings, one job per thread at a time. Which thread
 * takes which job depends on timing, but every result goes back to the job that asked for it, so
 * callers that place results by input position get the same output for any number of threads.
 */
export class ExtractPool {
  private readonly workers: Worker[] = [];
  private readonly idle: Worker[] = [];
  private readonly queue: { job: PoolJob; pending: Pending }[] = [];
  private readonly pending = new Map<number, Pending>();
  private readonly busy = new Map<Worker, number>();
  private nextId = 0;
  private closed = false;
  private failure: Error | null = null;

  constructor(readonly threads: number) {
    if (!(Number.isInteger(threads) && threads >= 1)) throw new InputError(`workers=${threads} should be an integer >= 1`);
    for (let i = 0; i < threads; i++) {
      const w = startWorker();
      w.on("message", (m: PoolReply) => this.onMessage(w, m));
      w.on("error", (e) => this.onCrash(w, e));
      w.on("exit", (code) => {
        if (!this.closed) this.onCrash(w, new Error(`extraction thread exited with code ${code}`));
      });
      this.workers.push(w);
      this.idle.push(w);
    }
  }

  /** Extract one file and return the result. */
  extract(path: string, read: PortableReadOptions, options: ResolvedPipelineOptions, progress?: Progress): Promise<ExtractedFile> {
    return this.submit({ id: 0, path, read, options }, progress) as Promise<ExtractedFile>;
  }

  /** Extract one file and write its shard into `dir` (in the thread); returns where it went. */
  extractToShard(path: string, read: PortableReadOptions, options: ResolvedPipelineOptions, dir: string, manifestOptions: Record<string, unknown>, progress?: Progress): Promise<ShardReply> {
    return this.submit({ id: 0, path, read, options, shardDir: dir, manifestOptions }, progress) as Promise<ShardReply>;
  }

  private submit(job: PoolJob, progress?: Progress): Promise<unknown> {
    if (this.closed) return Promise.reject(new Error("the extraction pool is closed"));
    if (this.failure) return Promise.reject(this.failure);
    job.id = ++this.nextId;
    return new Promise((resolve, reject) => {
      this.queue.push({ job, pending: { resolve, reject, progress } });
      this.dispatch();
    });
  }

  private dispatch(): void {
    while (this.idle.length > 0 && this.queue.length > 0) {
      const w = this.idle.pop()!;
      const { job, pending } = this.queue.shift()!;
      this.pending.set(job.id, pending);
      this.busy.set(w, job.id);
      w.postMessage(job);
    }
  }

  private onMessage(w: Worker, m: PoolReply): void {
    const p = this.pending.get(m.id);
    if (!p) return;
    if ("progress" in m) {
      p.progress?.(m.progress);
      return;
    }
    this.pending.delete(m.id);
    this.busy.delete(w);
    this.idle.push(w);
    if ("error" in m) {
      // Errors do not keep their class across threads: bad input stays an InputError (exit 2 on
      // the command line), anything else is a failure with the thread's stack.
      const e = m.error.name === "InputError" ? new InputError(m.error.message) : Object.assign(new Error(m.error.message), { stack: m.error.stack });
      p.reject(e);
    } else if ("result" in m) p.resolve(m.result);
    else p.resolve({ shard: m.shard, summary: m.summary, rejected: m.rejected });
    this.dispatch();
  }

  private onCrash(w: Worker, e: Error): void {
    if (this.closed) return;
    this.failure = e;
    const id = this.busy.get(w);
    if (id !== undefined) {
      this.pending.get(id)?.reject(e);
      this.pending.delete(id);
    }
    for (const q of this.queue.splice(0)) q.pending.reject(e);
  }

  /** End the threads. Jobs still queued are rejected. */
  async close(): Promise<void> {
    this.closed = true;
    for (const q of this.queue.splice(0)) q.pending.reject(new Error("the extraction pool was closed"));
    await Promise.all(this.workers.map((w) => w.terminate()));
  }
}
