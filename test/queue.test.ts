/**
 * The extraction queue for real: a Redis server of our own (127.0.0.1, a free port, its own temp
 * folder, stopped at the end), two worker processes, six generated recordings, one worker killed
 * in the middle of a job. Skipped, saying why, only when redis-server is not installed; CI installs
 * Debian's redis-server, and under CI=true a missing server fails instead of skipping.
 */
import { spawn, spawnSync, type ChildProcess } from "node:child_process";
import { existsSync, mkdtempSync, readdirSync, readFileSync, rmSync } from "node:fs";
import { createServer } from "node:net";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const root = join(import.meta.dirname, "..");
const REDIS = ["/usr/bin/redis-server", "/usr/local/bin/redis-server"].find((p) => existsSync(p)) ?? null;
const skipReason = REDIS ? null : "redis-server is not installed (Debian package redis-server)";
if (skipReason) {
  if (process.env.CI) throw new Error(`queue test cannot run in CI: ${skipReason}`);
  console.warn(`skipping the queue test: ${skipReason}`);
}

function cli(args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

/** A CLI process whose stdout lines are collected as they come. */
interface Proc {
  child: ChildProcess;
  lines: string[];
  exited: Promise<number | null>;
  waitFor(re: RegExp, timeoutMs?: number): Promise<string>;
}
function start(args: string[]): Proc {
  const child = spawn(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, stdio: ["ignore", "pipe", "pipe"] });
  const lines: string[] = [];
  const waiters: { re: RegExp; resolve: (l: string) => void }[] = [];
  let buf = "";
  child.stdout!.setEncoding("utf8").on("data", (chunk: string) => {
    buf += chunk;
    let i: number;
    while ((i = buf.indexOf("\n")) >= 0) {
      const line = buf.slice(0, i);
      buf = buf.slice(i + 1);
      lines.push(line);
      for (const w of waiters.splice(0)) (w.re.test(line) ? w.resolve(line) : waiters.push(w));
    }
  });
  child.stderr!.setEncoding("utf8").on("data", (chunk: string) => lines.push(...chunk.split("\n").filter(Boolean).map((l) => `stderr: ${l}`)));
  const exited = new Promise<number | null>((r) => child.on("exit", (code) => r(code)));
  return {
    child,
    lines,
    exited,
    waitFor: (re, timeoutMs = 120_000) =>
      new Promise((resolve, reject) => {
        const hit = lines.find((l) => re.test(l));
        if (hit) return resolve(hit);
        const t = setTimeout(() => reject(new Error(`no line matching ${re} within ${timeoutMs} ms; got:\n${lines.join("\n")}`)), timeoutMs);
        waiters.push({ re, resolve: (l) => (clearTimeout(t), resolve(l)) });
      }),
  };
}

function freePort(): Promise<number> {
  return new Promise((resolve, reject) => {
    const s = createServer();
    s.on("error", reject);
    s.listen(0, "127.0.0.1", () => {
      const port = (s.address() as { port: number }).port;
      s.close(() => resolve(port));
    });
  });
}

let dir = "";
let redis: ChildProcess | null = null;
let url = "";
const tracks: string[] = [];
const procs: Proc[] = [];

beforeAll(async () => {
  if (!REDIS) return;
  dir = mkdtempSync(join(tmpdir(), "roadsieve-queue-"));
  const port = await freePort();
  url = `redis://127.0.0.1:${port}`;
  redis = spawn(REDIS, ["--port", String(port), "--bind", "127.0.0.1", "--dir", dir, "--save", "", "--appendonly", "no"], { stdio: ["ignore", "pipe", "pipe"] });
  await new Promise<void>((resolve, reject) => {
    const t = setTimeout(() => reject(new Error("redis-server did not start within 20 s")), 20_000);
    redis!.stdout!.setEncoding("utf8").on("data", (s: string) => {
      if (s.includes("Ready to accept connections")) (clearTimeout(t), resolve());
    });
    redis!.on("exit", (code) => reject(new Error(`redis-server exited with ${code}`)));
  });
  for (let i = 0; i < 6; i++) {
    const id = `queue-${i + 1}`;
    const traffic = generateTraffic({ vehicleKm: 12, recordingId: id, hardBrakingRate: 0.1, tightCutInRate: 0.1 }, new Rng(70 + i));
    await writeGeneratedTraffic(join(dir, id), traffic, { format: "parquet" });
    tracks.push(join(dir, id, "tracks.parquet"));
  }
});

afterAll(async () => {
  for (const p of procs) if (p.child.exitCode === null && p.child.signalCode === null) p.child.kill("SIGKILL");
  if (redis && redis.exitCode === null) {
    const gone = new Promise((r) => redis!.on("exit", r));
    redis.kill("SIGTERM");
    await gone;
  }
  if (dir) rmSync(dir, { recursive: true, force: true });
});

describe.skipIf(skipReason !== null)("extraction queue (BullMQ on a real Redis server)", () => {
  it("two workers, one killed mid-job: every shard written exactly once, and the plan equals the single-process plan", async () => {
    const reference = cli(["plan", ...tracks, "--out", join(dir, "ref"), "--no-catalogue", "--quiet"]);
    expect(reference.code, reference.stderr).toBe(0);

    const shards = join(dir, "shards");
    const workerArgs = ["worker", "--queue", url, "--name", "t1", "--lock-seconds", "2"];
    const a = start(workerArgs);
    const b = start(workerArgs);
    procs.push(a, b);
    await Promise.all([a.waitFor(/^waiting for jobs/), b.waitFor(/^waiting for jobs/)]);
    const submit = start(["submit", ...tracks, "--queue", url, "--name", "t1", "--shards", shards, "--wait", "--quiet"]);
    procs.push(submit);

    // Kill worker A while it is inside a job: after it started one and before it finished it.
    const startedLine = await a.waitFor(/^start /);
    const killedSource = startedLine.replace(/^start /, "").replace(/ \(attempt.*$/, "");
    await new Promise((r) => setTimeout(r, 300));
    const finishedBeforeKill = a.lines.some((l) => l.startsWith("wrote ") || l.startsWith("already there "));
    a.child.kill("SIGKILL");
    await a.exited;
    expect(finishedBeforeKill, "worker A should still be inside its first job when killed").toBe(false);

    expect(await submit.exited, submit.lines.join("\n")).toBe(0);
    expect(submit.lines.join("\n")).toContain(`all 6 shards are in ${shards}`);
    b.child.kill("SIGTERM");
    expect(await b.exited).toBe(0);

    // The killed job was taken over by worker B.
    expect(b.lines.some((l) => l.startsWith(`start ${killedSource} `))).toBe(true);
    // Exactly once: six manifests, each committed by one "wrote" line in all workers' logs together, and two data files each.
    const files = readdirSync(shards).filter((f) => !f.startsWith("."));
    const manifests = files.filter((f) => f.endsWith(".shard.json")).sort();
    expect(manifests).toEqual(tracks.map((_, i) => `queue-${i + 1}.shard.json`));
    expect(files.filter((f) => f.endsWith(".parquet"))).toHaveLength(12);
    const wrote = [...a.lines, ...b.lines].filter((l) => l.startsWith("wrote "));
    expect(wrote).toHaveLength(6);
    for (const m of manifests) expect(wrote.filter((l) => l.endsWith(`/${m}`))).toHaveLength(1);

    const fromQueue = cli(["plan", shards, "--out", join(dir, "q"), "--no-catalogue", "--quiet"]);
    expect(fromQueue.code, fromQueue.stderr).toBe(0);
    expect(readFileSync(join(dir, "q", "plan.json"), "utf8")).toBe(readFileSync(join(dir, "ref", "plan.json"), "utf8"));
  });

  it("a job that fails three times is reported with its recording and reason; plan refuses the incomplete set, naming it", async () => {
    const shards = join(dir, "shards-bad");
    const w = start(["worker", "--queue", url, "--name", "t2", "--lock-seconds", "2"]);
    procs.push(w);
    await w.waitFor(/^waiting for jobs/);
    const missing = join(dir, "nowhere", "tracks.parquet");
    const r = cli(["submit", tracks[0]!, missing, "--queue", url, "--name", "t2", "--shards", shards, "--wait", "--quiet"]);
    w.child.kill("SIGTERM");
    await w.exited;
    expect(r.code).toBe(2);
    expect(r.stdout).toContain(`failed for good after 3 attempts: ${missing}: `);
    expect(r.stdout).toContain("the tracks file does not exist");
    expect(w.lines.filter((l) => l.startsWith(`start ${missing} `))).toHaveLength(3);
    const p = cli(["plan", shards, "--out", join(dir, "q-bad"), "--quiet", "--no-catalogue"]);
    expect(p.code).toBe(2);
    expect(p.stderr).toContain(`1 of 2 expected recordings have no shard: ${missing} (failed 3 times: `);
  });

  it("a worker that cannot reach the queue exits 2 naming the address", async () => {
    const port = await freePort(); // free, so nothing listens there
    const r = cli(["worker", "--queue", `redis://127.0.0.1:${port}`]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n").pop()).toContain(`cannot reach the queue at redis://127.0.0.1:${port}`);
  });
});
