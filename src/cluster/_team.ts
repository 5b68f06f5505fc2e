import { availableParallelism } from "node:os";
import { MessageChannel, Worker, type MessagePort } from "node:worker_threads";

/**
 * A small synchronous thread team over shared memory. The kernel source (a self-contained script
 * defining `makeState(bufs, meta)` and `OPS`, an array of `(state, chunk0, chunk1) => void`) runs on
 * the main thread and in `threads - 1` eval workers. `run(op)` splits the chunks statically (thread
 * t takes a fixed contiguous range), runs the main thread's share, then blocks in Atomics.wait until
 * the workers are done — Node allows that on the main thread, which keeps the public API synchronous.
 * Workers are unref'd so they never keep the process alive; `close()` ends them.
 */

/** A typed-array region the kernel wraps again on its own side. */
export interface BufRef {
  buffer: ArrayBufferLike;
  byteOffset: number;
  length: number;
}

type KernelOp = (state: unknown, c0: number, c1: number) => void;
interface Kernel {
  makeState(bufs: Record<string, BufRef | null>, meta: Record<string, number>): unknown;
  OPS: KernelOp[];
}

const compiled = new Map<string, Kernel>();
function compile(source: string): Kernel {
  let k = compiled.get(source);
  if (!k) {
    // eslint-disable-next-line @typescript-eslint/no-implied-eval -- same text as the workers run
    k = new Function(`${source}\nreturn { makeState: makeState, OPS: OPS };`)() as Kernel;
    compiled.set(source, k);
  }
  return k;
}

// Worker loop. Ops: -1 = exit, -2 = take a new job (buffers and metadata) from the message port,
// -3 = drop the job's buffers, >= 0 = run OPS[op] on this thread's share of the chunks.
const WORKER_PRELUDE = String.raw`
const { workerData, receiveMessageOnPort } = require("node:worker_threads");
const ctrl = new Int32Array(workerData.ctrl);
const port = workerData.port;
const t = workerData.index;
let S = null, T = 1;
Atomics.add(ctrl, 4, 1); Atomics.notify(ctrl, 4);
let gen = 0;
for (;;) {
  Atomics.wait(ctrl, 0, gen);
  gen = Atomics.load(ctrl, 0);
  const op = Atomics.load(ctrl, 1);
  if (op === -1) break;
  try {
    if (op === -2) {
      const m = receiveMessageOnPort(port).message;
      S = makeState(m.bufs, m.meta); T = m.threads;
    } else if (op === -3) {
      S = null;
    } else {
      const nc = Atomics.load(ctrl, 5);
      OPS[op](S, Math.floor((nc * t) / T), Math.floor((nc * (t + 1)) / T));
    }
  } catch (e) { Atomics.store(ctrl, 3, 1); }
  Atomics.add(ctrl, 2, 1); Atomics.notify(ctrl, 2);
}
`;

interface PoolWorker {
  worker: Worker;
  port: MessagePort;
}

/**
 * Workers stay alive between calls (unref'd, so they never keep the process alive): start-up and
 * the JIT warm-up of the kernel are paid once per process, not once per k-means call. One pool per
 * kernel source; a pool is lent to one Team at a time.
 */
interface Pool {
  ctrl: Int32Array;
  workers: PoolWorker[];
  busy: boolean;
}
const pools = new Map<string, Pool>();

/** Number of threads "auto" stands for. */
export function autoThreads(): number {
  return Math.max(1, availableParallelism());
}

/** True when a region can be handed to workers without copying. */
export function isShared(a: { buffer: ArrayBufferLike }): boolean {
  return typeof SharedArrayBuffer !== "undefined" && a.buffer instanceof SharedArrayBuffer;
}

export function sharedF64(length: number, shared: boolean): Float64Array {
  return shared ? new Float64Array(new SharedArrayBuffer(length * 8)) : new Float64Array(length);
}
export function sharedI32(length: number, shared: boolean): Int32Array {
  return shared ? new Int32Array(new SharedArrayBuffer(length * 4)) : new Int32Array(length);
}

export function ref(a: Float64Array | Int32Array | null): BufRef | null {
  return a === null ? null : { buffer: a.buffer, byteOffset: a.byteOffset, length: a.length };
}

export class Team {
  readonly threads: number;
  /** Set when workers could not start; the team then runs on the main thread only. */
  readonly startupProblem: string | undefined;
  private readonly kernel: Kernel;
  private readonly state: unknown;
  private pool: Pool | null = null;
  private readonly source: string;
  private closed = false;

  /**
   * @param threads wanted thread count (>= 1); every buffer in `bufs` must be a SharedArrayBuffer
   *   region when threads > 1.
   */
  constructor(source: string, bufs: Record<string, BufRef | null>, meta: Record<string, number>, threads: number) {
    this.source = source;
    this.kernel = compile(source);
    this.state = this.kernel.makeState(bufs, meta);
    let problem: string | undefined;
    if (threads > 1) {
      try {
        const pool = borrowPool(source, threads - 1);
        this.pool = pool;
        for (let t = 0; t < threads - 1; t++) pool.workers[t]!.port.postMessage({ bufs, meta, threads });
        this.signal(-2, 0, threads);
      } catch (e) {
        problem = `worker threads unavailable (${(e as Error).message}); ran on one thread`;
        if (this.pool) {
          this.pool.busy = false;
          discardPool(source);
          this.pool = null;
        }
      }
    }
    this.startupProblem = problem;
    this.threads = problem === undefined ? threads : 1;
  }

  /** Run one kernel op over chunks [0, nChunks), split statically over the threads. */
  run(op: number, nChunks: number): void {
    if (this.closed) throw new Error("Team.run after close(): create a new Team");
    const T = this.threads;
    if (T === 1) {
      this.kernel.OPS[op]!(this.state, 0, nChunks);
      return;
    }
    this.signal(op, nChunks, T, () => this.kernel.OPS[op]!(this.state, 0, Math.floor(nChunks / T)));
  }

  /** Post an op to the pool's first `T - 1` workers, run `own` meanwhile, wait for all of them. */
  private signal(op: number, nChunks: number, T: number, own?: () => void): void {
    const c = this.pool!.ctrl;
    Atomics.store(c, 2, 0);
    Atomics.store(c, 3, 0);
    Atomics.store(c, 1, op);
    Atomics.store(c, 5, nChunks);
    Atomics.add(c, 0, 1);
    Atomics.notify(c, 0);
    own?.();
    const expected = this.pool!.workers.length;
    let v: number;
    while ((v = Atomics.load(c, 2)) < expected) {
      if (Atomics.wait(c, 2, v, 600_000) === "timed-out") throw new Error("worker thread did not answer within 600 s");
    }
    if (Atomics.load(c, 3) !== 0) throw new Error("a worker thread failed while running a kernel op");
  }

  close(): void {
    if (this.closed) return;
    this.closed = true;
    if (this.pool) {
      try {
        this.signal(-3, 0, this.threads);
      } finally {
        this.pool.busy = false;
        // A temporary pool (the shared one was busy) is not kept.
        if (pools.get(this.source) !== this.pool) stopPool(this.pool);
        this.pool = null;
      }
    }
  }
}

function borrowPool(source: string, workers: number): Pool {
  let pool = pools.get(source);
  if (pool && (pool.busy || pool.workers.length !== workers)) {
    if (pool.busy) return startPool(source, workers, false);
    discardPool(source);
    pool = undefined;
  }
  if (!pool) {
    pool = startPool(source, workers, true);
  }
  pool.busy = true;
  return pool;
}

function startPool(source: string, workers: number, keep: boolean): Pool {
  const ctrl = new Int32Array(new SharedArrayBuffer(64));
  const pool: Pool = { ctrl, workers: [], busy: true };
  try {
    for (let t = 1; t <= workers; t++) {
      const { port1, port2 } = new MessageChannel();
      const worker = new Worker(`${source}\n${WORKER_PRELUDE}`, {
        eval: true,
        workerData: { ctrl: ctrl.buffer, port: port2, index: t },
        transferList: [port2],
      });
      worker.unref();
      port1.unref();
      pool.workers.push({ worker, port: port1 });
    }
    // Worker start-up is asynchronous but needs nothing from this thread's event loop.
    const deadline = performance.now() + 20_000;
    let v: number;
    while ((v = Atomics.load(ctrl, 4)) < workers) {
      const left = deadline - performance.now();
      if (left <= 0) throw new Error(`only ${v} of ${workers} worker threads started within 20 s`);
      Atomics.wait(ctrl, 4, v, left);
    }
  } catch (e) {
    stopPool(pool);
    throw e;
  }
  if (keep) pools.set(source, pool);
  return pool;
}

function discardPool(source: string): void {
  const pool = pools.get(source);
  if (!pool) return;
  pools.delete(source);
  stopPool(pool);
}

function stopPool(pool: Pool): void {
  Atomics.store(pool.ctrl, 1, -1);
  Atomics.add(pool.ctrl, 0, 1);
  Atomics.notify(pool.ctrl, 0);
  for (const w of pool.workers) {
    w.port.close();
    void w.worker.terminate();
  }
  pool.workers.length = 0;
}
