import { availableParallelism } from "node:os";
import { Worker } from "node:worker_threads";

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

const WORKER_PRELUDE = String.raw`
const { workerData } = require("node:worker_threads");
const ctrl = new Int32Array(workerData.ctrl);
const S = makeState(workerData.bufs, workerData.meta);
const t = workerData.index, T = workerData.threads;
Atomics.add(ctrl, 4, 1); Atomics.notify(ctrl, 4);
let gen = 0;
for (;;) {
  Atomics.wait(ctrl, 0, gen);
  gen = Atomics.load(ctrl, 0);
  const op = Atomics.load(ctrl, 1);
  if (op < 0) break;
  const nc = Atomics.load(ctrl, 5);
  try { OPS[op](S, Math.floor((nc * t) / T), Math.floor((nc * (t + 1)) / T)); }
  catch (e) { Atomics.store(ctrl, 3, 1); }
  Atomics.add(ctrl, 2, 1); Atomics.notify(ctrl, 2);
}
`;

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
  private readonly workers: Worker[] = [];
  private readonly ctrl: Int32Array;
  private closed = false;

  /**
   * @param threads wanted thread count (>= 1); every buffer in `bufs` must be a SharedArrayBuffer
   *   region when threads > 1.
   */
  constructor(source: string, bufs: Record<string, BufRef | null>, meta: Record<string, number>, threads: number) {
    this.kernel = compile(source);
    this.state = this.kernel.makeState(bufs, meta);
    this.ctrl = new Int32Array(new SharedArrayBuffer(64));
    let problem: string | undefined;
    if (threads > 1) {
      try {
        for (let t = 1; t < threads; t++) {
          const w = new Worker(`${source}\n${WORKER_PRELUDE}`, {
            eval: true,
            workerData: { ctrl: this.ctrl.buffer, bufs, meta, index: t, threads },
          });
          w.unref();
          this.workers.push(w);
        }
        // Worker start-up is asynchronous but needs nothing from this thread's event loop.
        const deadline = performance.now() + 20_000;
        let v: number;
        while ((v = Atomics.load(this.ctrl, 4)) < threads - 1) {
          const left = deadline - performance.now();
          if (left <= 0) throw new Error(`only ${v} of ${threads - 1} worker threads started within 20 s`);
          Atomics.wait(this.ctrl, 4, v, left);
        }
      } catch (e) {
        problem = `worker threads unavailable (${(e as Error).message}); ran on one thread`;
        this.stopWorkers();
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
    const c = this.ctrl;
    Atomics.store(c, 2, 0);
    Atomics.store(c, 3, 0);
    Atomics.store(c, 1, op);
    Atomics.store(c, 5, nChunks);
    Atomics.add(c, 0, 1);
    Atomics.notify(c, 0);
    this.kernel.OPS[op]!(this.state, 0, Math.floor(nChunks / T));
    let v: number;
    while ((v = Atomics.load(c, 2)) < T - 1) {
      if (Atomics.wait(c, 2, v, 600_000) === "timed-out") throw new Error("worker thread did not answer within 600 s");
    }
    if (Atomics.load(c, 3) !== 0) throw new Error("a worker thread failed while running a kernel op");
  }

  close(): void {
    if (this.closed) return;
    this.closed = true;
    this.stopWorkers();
  }

  private stopWorkers(): void {
    if (this.workers.length === 0) return;
    Atomics.store(this.ctrl, 1, -1);
    Atomics.add(this.ctrl, 0, 1);
    Atomics.notify(this.ctrl, 0);
    for (const w of this.workers) void w.terminate();
    this.workers.length = 0;
  }
}
