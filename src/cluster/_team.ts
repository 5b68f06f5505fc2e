import { availableParallelism } from "node:os";
import { MessageChannel, Worker, type MessagePort } from "node:worker_threads";

/**
 * A small synchronous thread team over shared memory. The kernel source (a self-contained script
 * defining `makeState(bufs, meta)` and `OPS`, an array of `(state, chunk0, chunk1) => void`) runs on
 * the main thread and in `threads - 1` eval workers. `run(op)` hands the chunks out one at a time to
 * whichever thread is free (the main thread included), then blocks in Atomics.wait until every chunk
 * is finished — Node allows that on the main thread, which keeps the public API synchronous. On a
 * loaded machine a worker the scheduler runs late simply takes fewer chunks (a static split made the
 * main thread wait for the worker's whole half).
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

// Control word layout (Int32 view of the pool's shared block):
//   [0] command = (generation << 3) | op code, read by a worker in one atomic load, so the op and its
//       generation can never be seen mixed; op codes 0..4 = OPS[code], 5 = take a new job (buffers and
//       metadata from the message port), 6 = drop the job's buffers, 7 = exit.
//   [2] acknowledgements of the last control command (5, 6), [3] error flag, [4] workers started,
//   [7] chunks finished in the current compute op.
// BigInt64 view, word 4 (bytes 32..39): the claim word = (generation << 36) | (nChunks << 18) | next
//   chunk. Every thread (the main one too) takes chunks one at a time by compare-and-swap on it; a
//   worker that wakes late sees another generation there and takes nothing, so nobody waits for a
//   thread the scheduler has not run yet, and a slow thread simply takes fewer chunks. Each chunk
//   writes only its own outputs, so who ran it never changes the result.
const WORKER_PRELUDE = String.raw`
const { workerData, receiveMessageOnPort } = require("node:worker_threads");
const ctrl = new Int32Array(workerData.ctrl);
const claim = new BigInt64Array(workerData.ctrl);
const port = workerData.port;
let S = null;
Atomics.add(ctrl, 4, 1); Atomics.notify(ctrl, 4);
let last = 0; // the block starts zeroed; the first command has generation 1
function claimChunks(gen, OP) {
  for (;;) {
    const v = Atomics.load(claim, 4);
    if (Number(v >> 36n) !== gen) return;
    const nc = Number((v >> 18n) & 0x3ffffn), c = Number(v & 0x3ffffn);
    if (c >= nc) return;
    if (Atomics.compareExchange(claim, 4, v, v + 1n) !== v) continue;
    try { OP(S, c, c + 1); } catch (e) { Atomics.store(ctrl, 3, 1); }
    Atomics.add(ctrl, 7, 1); Atomics.notify(ctrl, 7);
  }
}
for (;;) {
  Atomics.wait(ctrl, 0, last);
  const cmd = Atomics.load(ctrl, 0);
  last = cmd;
  const op = cmd & 7, gen = cmd >>> 3;
  if (op === 7) break;
  if (op < 5) { if (S !== null) claimChunks(gen, OPS[op]); continue; }
  try {
    if (op === 5) {
      const m = receiveMessageOnPort(port).message;
      S = makeState(m.bufs, m.meta);
    } else S = null;
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
  claim: BigInt64Array;
  /** Generation of the last command (27 bits, wraps). */
  gen: number;
  workers: PoolWorker[];
  busy: boolean;
}

// 27 bits: the generation sits in bits 36..62 of the (signed) claim word and in bits 3..29 of the command.
const GEN_MASK = (1 << 27) - 1;
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
        for (let t = 0; t < threads - 1; t++) pool.workers[t]!.port.postMessage({ bufs, meta });
        this.control(5);
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

  /**
   * Run one kernel op over chunks [0, nChunks). Chunks are taken one at a time by whichever thread
   * is free (see the claim word above); the main thread takes part and returns when every chunk is
   * finished.
   */
  run(op: number, nChunks: number): void {
    if (this.closed) throw new Error("Team.run after close(): create a new Team");
    const fn = this.kernel.OPS[op]!;
    if (this.threads === 1) {
      fn(this.state, 0, nChunks);
      return;
    }
    if (nChunks >= 1 << 18) throw new Error(`Team.run: ${nChunks} chunks, at most ${(1 << 18) - 1}`);
    const pool = this.pool!;
    const c = pool.ctrl;
    const gen = (pool.gen = (pool.gen + 1) & GEN_MASK);
    Atomics.store(c, 3, 0);
    Atomics.store(c, 7, 0);
    // The claim word first, then the command: a worker that reads the new command finds its chunks.
    Atomics.store(pool.claim, 4, (BigInt(gen) << 36n) | (BigInt(nChunks) << 18n));
    Atomics.store(c, 0, (gen << 3) | op);
    Atomics.notify(c, 0);
    const claim = pool.claim;
    for (;;) {
      const v = Atomics.load(claim, 4);
      const next = Number(v & 0x3ffffn);
      if (next >= nChunks) break;
      if (Atomics.compareExchange(claim, 4, v, v + 1n) !== v) continue;
      fn(this.state, next, next + 1);
      Atomics.add(c, 7, 1);
    }
    let v: number;
    while ((v = Atomics.load(c, 7)) < nChunks) {
      if (Atomics.wait(c, 7, v, 600_000) === "timed-out") throw new Error("worker thread did not answer within 600 s");
    }
    if (Atomics.load(c, 3) !== 0) throw new Error("a worker thread failed while running a kernel op");
  }

  /** A control command (5 = new job, 6 = drop job) that every worker acknowledges. */
  private control(op: 5 | 6): void {
    const pool = this.pool!;
    const c = pool.ctrl;
    const gen = (pool.gen = (pool.gen + 1) & GEN_MASK);
    Atomics.store(c, 2, 0);
    Atomics.store(c, 3, 0);
    Atomics.store(c, 0, (gen << 3) | op);
    Atomics.notify(c, 0);
    const expected = pool.workers.length;
    let v: number;
    while ((v = Atomics.load(c, 2)) < expected) {
      if (Atomics.wait(c, 2, v, 600_000) === "timed-out") throw new Error("worker thread did not answer within 600 s");
    }
    if (Atomics.load(c, 3) !== 0) throw new Error("a worker thread failed to take its job");
  }

  close(): void {
    if (this.closed) return;
    this.closed = true;
    if (this.pool) {
      try {
        this.control(6);
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
  const block = new SharedArrayBuffer(64);
  const ctrl = new Int32Array(block);
  const pool: Pool = { ctrl, claim: new BigInt64Array(block), gen: 0, workers: [], busy: true };
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
  pool.gen = (pool.gen + 1) & GEN_MASK;
  Atomics.store(pool.ctrl, 0, (pool.gen << 3) | 7);
  Atomics.notify(pool.ctrl, 0);
  for (const w of pool.workers) {
    w.port.close();
    void w.worker.terminate();
  }
  pool.workers.length = 0;
}
