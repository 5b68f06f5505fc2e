/**
 * An output folder that always holds one complete result: a run writes into a fresh staging folder
 * beside it, and `commit` replaces the folder as a whole, with a manifest written last. A lock beside
 * the folder refuses a second run into it; SIGINT/SIGTERM remove the staging folder. Writers need no
 * special case: whatever a run writes into `dir` (plan files, report, catalogue, any new file) is
 * what the committed folder holds, and nothing else.
 */
import { closeSync, existsSync, openSync, readdirSync, readFileSync, renameSync, rmSync, writeSync } from "node:fs";
import { mkdir, readdir, rename, rm, stat } from "node:fs/promises";
import { basename, dirname, join, relative, resolve, sep } from "node:path";
import { InputError } from "./errors.js";
import { sha256File, writeFileAtomic } from "./io.js";
import { VERSION } from "./version.js";

/** One input of a run, as listed in the manifest. */
export interface ManifestInput {
  path: string;
  sha256: string;
}

/** manifest.json: what a committed folder holds. Same run, same bytes (no time stamps). */
export interface Manifest {
  tool: "roadsieve";
  version: string;
  inputs: ManifestInput[];
  /** Every file of the folder except the manifest itself, sorted by path (relative, "/"-separated). */
  files: Array<{ path: string; bytes: number; sha256: string }>;
}

export interface OutputFolder {
  /** The folder the final result will be. */
  readonly out: string;
  /** The staging folder to write into. */
  readonly dir: string;
  /** Warnings of opening (a stale lock taken over, an interrupted run's result restored). */
  readonly warnings: string[];
  /** Write the manifest and replace `out` with the staging folder as a whole; releases the lock. */
  commit(inputs: readonly ManifestInput[]): Promise<Manifest>;
  /** Remove the staging folder and release the lock, leaving `out` as it was. */
  abort(): Promise<void>;
}

/** Names a roadsieve result folder may hold; a folder with anything else is not replaced. */
const OURS = /^(manifest\.json|plan\.json|plan\.csv|logical-scenarios\.csv|model\.json|report\.html|catalogue\.duckdb(\.wal)?|catalogue|openscenario|\..*\.tmp)$/;

/**
 * Test hook (internal): with ROADSIEVE_PAUSE_AT=<step> in the environment, a run stops at that step
 * and waits to be killed, printing "paused at <step>" on stderr. Used by the interruption tests.
 */
export async function outputStep(step: string): Promise<void> {
  if (process.env.ROADSIEVE_PAUSE_AT !== step) return;
  process.stderr.write(`paused at ${step}\n`);
  await new Promise<never>(() => setInterval(() => {}, 1 << 30));
}

function pidAlive(pid: number): boolean {
  if (!Number.isInteger(pid) || pid <= 0) return false;
  try {
    process.kill(pid, 0);
    return true;
  } catch (e) {
    return (e as NodeJS.ErrnoException).code === "EPERM";
  }
}

function readLockPid(lock: string): number {
  try {
    return Number(JSON.parse(readFileSync(lock, "utf8")).pid);
  } catch {
    return NaN;
  }
}

/** Take the lock (exclusive create); a lock of a dead process is taken over with a warning. */
function acquireLock(lock: string, out: string, warnings: string[]): void {
  for (let attempt = 0; attempt < 3; attempt++) {
    try {
      const fd = openSync(lock, "wx");
      writeSync(fd, `${JSON.stringify({ pid: process.pid, out })}\n`);
      closeSync(fd);
      return;
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      if (code !== "EEXIST") throw new InputError(`--out: cannot create the lock ${lock}: ${(e as Error).message}`, { file: out });
    }
    const pid = readLockPid(lock);
    if (pidAlive(pid))
      throw new InputError(`another roadsieve run (pid ${pid}) is writing into this folder; wait for it to finish or choose another --out (lock: ${lock})`, {
        file: out,
      });
    // Not a live process (or a lock half written by one that died): take it over. Removing and
    // re-creating exclusively means that of two runs doing this at once, only one gets it.
    warnings.push(`took over the stale lock ${lock} of pid ${Number.isFinite(pid) ? pid : "(unreadable)"}, which is no longer running`);
    rmSync(lock, { force: true });
  }
  throw new InputError(`could not take the lock ${lock}; another run keeps taking it`, { file: out });
}

/**
 * Open `out` for one run: check that it can be written (before any work starts), take the lock,
 * restore a result left mid-swap by a killed run, remove stale staging folders, and create a fresh
 * staging folder beside `out`.
 */
export async function openOutputFolder(outPath: string): Promise<OutputFolder> {
  const out = resolve(outPath);
  const parent = dirname(out);
  const name = basename(out);
  const warnings: string[] = [];
  const st = await stat(out).catch((e: NodeJS.ErrnoException) => (e.code === "ENOENT" ? undefined : Promise.reject(e))).catch((e: Error) => {
    throw new InputError(`--out cannot be used: ${e.message}`, { file: out });
  });
  if (st && !st.isDirectory()) throw new InputError(`--out is a file, not a folder; give a folder (it is created when missing)`, { file: out });
  try {
    await mkdir(parent, { recursive: true });
  } catch (e) {
    throw new InputError(`--out: cannot create the folder holding it: ${(e as Error).message}`, { file: out });
  }
  if (st) {
    const foreign = (await readdir(out)).filter((f) => !OURS.test(f));
    if (foreign.length > 0 && !existsSync(join(out, "manifest.json")))
      throw new InputError(
        `--out already holds files that are not a roadsieve result (${foreign.slice(0, 3).map((f) => JSON.stringify(f)).join(", ")}${foreign.length > 3 ? ", …" : ""}); the folder is replaced as a whole, so give a new or empty folder`,
        { file: out },
      );
  }
  const lock = join(parent, `.${name}.lock`);
  acquireLock(lock, out, warnings);
  const staging = join(parent, `.${name}.staging-${process.pid}`);
  const previous = join(parent, `.${name}.previous`);
  let state: "open" | "swapping" | "done" = "open";
  const cleanupSync = (): void => {
    if (state === "done") return;
    // A swap cut short: put the old result back if the new one is not in place.
    if (!existsSync(out) && existsSync(previous)) renameSync(previous, out);
    else rmSync(previous, { recursive: true, force: true }); // the swap was done: the old result goes
    rmSync(staging, { recursive: true, force: true });
    rmSync(lock, { force: true });
    state = "done";
  };
  const onSignal = (signal: NodeJS.Signals): void => {
    cleanupSync();
    process.stderr.write(`\nroadsieve: stopped by ${signal}; ${out} left as it was\n`);
    process.exit(signal === "SIGINT" ? 130 : 143);
  };
  try {
    // We hold the lock: whatever staging or previous folder is there belongs to a run that died.
    if (!existsSync(out) && existsSync(previous)) {
      renameSync(previous, out);
      warnings.push(`restored ${out} from a run that was killed while replacing it`);
    }
    rmSync(previous, { recursive: true, force: true });
    for (const f of readdirSync(parent)) if (f.startsWith(`.${name}.staging-`)) rmSync(join(parent, f), { recursive: true, force: true });
    await mkdir(staging);
  } catch (e) {
    cleanupSync();
    throw new InputError(`--out: cannot write beside the folder: ${(e as Error).message}`, { file: out });
  }
  process.on("SIGINT", onSignal);
  process.on("SIGTERM", onSignal);
  const release = (): void => {
    process.off("SIGINT", onSignal);
    process.off("SIGTERM", onSignal);
  };
  return {
    out,
    dir: staging,
    warnings,
    async commit(inputs) {
      if (state !== "open") throw new Error("internal: output folder already committed or aborted");
      const files: Manifest["files"] = [];
      for (const path of await listFiles(staging)) {
        const rel = relative(staging, path).split(sep).join("/");
        if (rel === "manifest.json") continue;
        files.push({ path: rel, bytes: (await stat(path)).size, sha256: await sha256File(path) });
      }
      files.sort((a, b) => (a.path < b.path ? -1 : a.path > b.path ? 1 : 0));
      const manifest: Manifest = { tool: "roadsieve", version: VERSION, inputs: inputs.map((i) => ({ path: i.path, sha256: i.sha256 })), files };
      await outputStep("manifest");
      await writeFileAtomic(join(staging, "manifest.json"), `${JSON.stringify(manifest, null, 2)}\n`);
      await outputStep("swap");
      state = "swapping";
      if (existsSync(out)) await rename(out, previous);
      await outputStep("swap-middle");
      await rename(staging, out);
      await outputStep("cleanup");
      await rm(previous, { recursive: true, force: true });
      rmSync(lock, { force: true });
      state = "done";
      release();
      return manifest;
    },
    async abort() {
      cleanupSync();
      release();
    },
  };
}

async function listFiles(dir: string): Promise<string[]> {
  const out: string[] = [];
  for (const e of await readdir(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...(await listFiles(p)));
    else if (e.isFile()) out.push(p);
  }
  return out;
}
