/**
 * Output folders: a run killed at any output step (SIGINT or SIGKILL) leaves --out holding either
 * the complete old result or the complete new one; two runs into one folder at once: exactly one
 * proceeds. "Complete" is checked against the folder's own manifest.json with the system's sha256sum
 * (an implementation outside the project).
 */
import { execFileSync, spawn } from "node:child_process";
import type { ChildProcess } from "node:child_process";
import { cpSync, existsSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, rmSync, statSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join, relative } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { openOutputFolder } from "../src/core/outputFolder.js";
import { Rng } from "../src/core/rng.js";
import { VERSION } from "../src/core/version.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const root = join(import.meta.dirname, "..");
let dir = "";
let tracks = "";
/** Options of the "old" and the "new" run: different seeds and k, so the plans differ. */
const OLD = ["--k", "2", "--seed", "1"];
const NEW = ["--k", "3", "--seed", "2"];
const BASE = () => ["plan", tracks, "--map", "pca", "--quiet"];

interface Proc {
  child: ChildProcess;
  done: Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>;
  /** Resolves when stderr contains the text. */
  waitFor(text: string): Promise<void>;
}

function start(args: string[], env: Record<string, string> = {}): Proc {
  const child = spawn(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, env: { ...process.env, ...env } });
  let stdout = "";
  let stderr = "";
  const waiters: Array<[string, () => void]> = [];
  child.stdout!.on("data", (d) => (stdout += d));
  child.stderr!.on("data", (d) => {
    stderr += d;
    for (const w of waiters.splice(0)) if (stderr.includes(w[0])) w[1]();
    else waiters.push(w);
  });
  const done = new Promise<{ code: number | null; signal: NodeJS.Signals | null; stdout: string; stderr: string }>((resolve) =>
    child.on("close", (code, signal) => resolve({ code, signal, stdout, stderr })),
  );
  return {
    child,
    done,
    waitFor: (text) =>
      new Promise<void>((resolve, reject) => {
        if (stderr.includes(text)) return resolve();
        waiters.push([text, resolve]);
        void done.then(() => (stderr.includes(text) ? resolve() : reject(new Error(`exited before "${text}": ${stderr}`))));
      }),
  };
}

interface ManifestFile {
  path: string;
  bytes: number;
  sha256: string;
}

/** Every file under d, relative, "/"-separated. */
function listFiles(d: string, base = d): string[] {
  const out: string[] = [];
  for (const e of readdirSync(d, { withFileTypes: true })) {
    const p = join(d, e.name);
    if (e.isDirectory()) out.push(...listFiles(p, base));
    else out.push(relative(base, p).split("\\").join("/"));
  }
  return out.sort();
}

/** The folder is one complete result: its manifest lists exactly its files, sizes and SHA-256. */
function completeResult(d: string): { files: ManifestFile[]; plan: string } {
  const m = JSON.parse(readFileSync(join(d, "manifest.json"), "utf8")) as { version: string; files: ManifestFile[]; inputs: Array<{ path: string }> };
  expect(m.version).toBe(VERSION);
  expect(m.inputs.map((i) => i.path)).toEqual([tracks]);
  expect(listFiles(d)).toEqual([...m.files.map((f) => f.path), "manifest.json"].sort());
  for (const f of m.files) {
    expect(statSync(join(d, f.path)).size).toBe(f.bytes);
    // sha256sum (GNU coreutils) as the independent checksum.
    expect(execFileSync("sha256sum", [join(d, f.path)]).toString().split(" ")[0]).toBe(f.sha256);
  }
  return { files: m.files, plan: readFileSync(join(d, "plan.json"), "utf8") };
}

let oldPlan = "";
let newPlan = "";
const oldDir = () => join(dir, "old");

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "roadsieve-outfolder-"));
  const traffic = generateTraffic({ vehicleKm: 4, recordingId: "of", hardBrakingRate: 0.2, tightCutInRate: 0.2 }, new Rng(9));
  await writeGeneratedTraffic(join(dir, "rec"), traffic, { format: "csv" });
  tracks = join(dir, "rec", "tracks.csv");
  const [a, b] = await Promise.all([start([...BASE(), ...OLD, "--out", oldDir()]).done, start([...BASE(), ...NEW, "--out", join(dir, "new")]).done]);
  expect(a.code, a.stderr).toBe(0);
  expect(b.code, b.stderr).toBe(0);
  oldPlan = completeResult(oldDir()).plan;
  newPlan = completeResult(join(dir, "new")).plan;
  expect(newPlan).not.toBe(oldPlan);
}, 240_000);

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("a killed plan run leaves the complete old or the complete new result", () => {
  // The output steps in order: the writers (plan files, model.json, report, catalogue), the manifest, the swap
  // (before, between and after its two renames).
  const steps = ["plan", "model", "report", "catalogue", "manifest", "swap", "swap-middle", "cleanup"] as const;
  const jobs: Array<{ step: (typeof steps)[number]; signal: "SIGINT" | "SIGKILL" }> = [];
  for (const step of steps) for (const signal of ["SIGINT", "SIGKILL"] as const) jobs.push({ step, signal });
  const outcomes = new Map<string, { out: string; code: number | null; signal: NodeJS.Signals | null; stderr: string }>();

  beforeAll(async () => {
    // Two at a time (2 cores), each into its own copy of the old result.
    let next = 0;
    const worker = async () => {
      while (next < jobs.length) {
        const j = jobs[next++]!;
        const out = join(dir, `k-${j.step}-${j.signal}`);
        cpSync(oldDir(), out, { recursive: true });
        const p = start([...BASE(), ...NEW, "--out", out], { ROADSIEVE_PAUSE_AT: j.step });
        await p.waitFor(`paused at ${j.step}`);
        p.child.kill(j.signal);
        const r = await p.done;
        outcomes.set(`${j.step}/${j.signal}`, { out, code: r.code, signal: r.signal, stderr: r.stderr });
      }
    };
    await Promise.all([worker(), worker()]);
  }, 400_000);

  for (const { step, signal } of jobs)
    it(`${signal} at "${step}"`, async () => {
      const o = outcomes.get(`${step}/${signal}`)!;
      if (signal === "SIGINT") {
        // The handler removed the staging folder and the lock and said so.
        expect(o.code).toBe(130);
        expect(o.stderr).toContain("stopped by SIGINT");
        const parent = readdirSync(dir).filter((f) => f.startsWith(`.k-${step}-${signal}.`));
        expect(parent).toEqual([]);
      } else {
        expect(o.signal).toBe("SIGKILL");
        // Killed between the two renames, the folder is missing until the next run restores it:
        // the next run's opening (openOutputFolder) is what a user would run.
        if (step === "swap-middle") {
          expect(existsSync(o.out)).toBe(false);
          const f = await openOutputFolder(o.out);
          expect(f.warnings.join("\n")).toMatch(/took over the stale lock .* of pid \d+, which is no longer running/);
          expect(f.warnings.join("\n")).toMatch(/restored .* from a run that was killed while replacing it/);
          await f.abort();
        }
      }
      const { plan } = completeResult(o.out);
      // After the swap's second rename the new result is in place; before it, the old one.
      expect(plan).toBe(step === "cleanup" ? newPlan : oldPlan);
    });

  it("a later run into a folder left by SIGKILL takes over the stale lock, clears the leftovers and commits", async () => {
    const out = join(dir, "k-catalogue-SIGKILL");
    expect(existsSync(join(dir, ".k-catalogue-SIGKILL.lock"))).toBe(true);
    const r = await start([...BASE(), ...NEW, "--out", out]).done;
    expect(r.code, r.stderr).toBe(0);
    expect(r.stderr).toMatch(/warning: took over the stale lock .*\.k-catalogue-SIGKILL\.lock of pid \d+, which is no longer running/);
    expect(completeResult(out).plan).toBe(newPlan);
    expect(readdirSync(dir).filter((f) => f.startsWith(".k-catalogue-SIGKILL."))).toEqual([]);
  }, 120_000);
});

describe("one folder, two runs", () => {
  it("a second run while one is writing is refused with exit 2 and the other run's pid", async () => {
    const out = join(dir, "busy");
    const a = start([...BASE(), ...NEW, "--out", out], { ROADSIEVE_PAUSE_AT: "plan" });
    await a.waitFor("paused at plan");
    const b = await start([...BASE(), ...OLD, "--out", out]).done;
    expect(b.code).toBe(2);
    expect(b.stderr.trim()).toBe(
      `roadsieve plan: ${out}: another roadsieve run (pid ${a.child.pid}) is writing into this folder; wait for it to finish or choose another --out (lock: ${join(dir, ".busy.lock")})`,
    );
    a.child.kill("SIGTERM");
    expect((await a.done).code).toBe(143);
    expect(existsSync(out)).toBe(false); // nothing was committed, nothing left beside it
    expect(readdirSync(dir).filter((f) => f.startsWith(".busy."))).toEqual([]);
  }, 120_000);

  it("started together, exactly one proceeds and the folder holds its complete result", async () => {
    const out = join(dir, "race");
    const [a, b] = await Promise.all([start([...BASE(), ...OLD, "--out", out]).done, start([...BASE(), ...NEW, "--out", out]).done]);
    expect([a.code, b.code].sort()).toEqual([0, 2]);
    const loser = a.code === 2 ? a : b;
    expect(loser.stderr).toMatch(/another roadsieve run \(pid \d+\) is writing into this folder/);
    expect(completeResult(out).plan).toBe(a.code === 0 ? oldPlan : newPlan);
  }, 120_000);

  it("a new plan replaces the folder as a whole: files the new run does not write are gone", async () => {
    const out = join(dir, "shrink");
    const a = await start([...BASE(), ...OLD, "--out", out, "--openscenario"]).done;
    expect(a.code, a.stderr).toBe(0);
    expect(readdirSync(join(out, "openscenario")).length).toBeGreaterThan(0);
    writeFileSync(join(out, ".catalogue.duckdb.999.tmp"), "orphan of an older version");
    const b = await start([...BASE(), ...NEW, "--out", out]).done;
    expect(b.code, b.stderr).toBe(0);
    expect(existsSync(join(out, "openscenario"))).toBe(false);
    expect(existsSync(join(out, ".catalogue.duckdb.999.tmp"))).toBe(false);
    expect(completeResult(out).plan).toBe(newPlan);
  }, 120_000);
});

describe("openOutputFolder (library)", () => {
  it("commits any files written into dir, with the manifest last and sorted", async () => {
    const out = join(dir, "lib");
    const f = await openOutputFolder(out);
    // A file of some other writer (e.g. a model or a road export): no special case needed.
    mkdirSync(join(f.dir, "road"));
    writeFileSync(join(f.dir, "road", "a.xodr"), "<OpenDRIVE/>");
    writeFileSync(join(f.dir, "model.json"), "{}");
    const m = await f.commit([{ path: "in.csv", sha256: "0".repeat(64) }]);
    expect(m.files.map((x) => x.path)).toEqual(["model.json", "road/a.xodr"]);
    // SHA-256 of "{}" (two bytes), computed by sha256sum.
    expect(m.files[0]!.sha256).toBe(execFileSync("sha256sum", [join(out, "model.json")]).toString().split(" ")[0]);
    expect(listFiles(out)).toEqual(["manifest.json", "model.json", "road/a.xodr"]);
    expect(readdirSync(dir).filter((x) => x.startsWith(".lib."))).toEqual([]);
  });
});
