import { spawnSync } from "node:child_process";
import { cpSync, mkdirSync, mkdtempSync, readdirSync, readFileSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { beforeAll, describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { extractionOptions } from "../src/extract/extractionOptions.js";
import { extractFiles } from "../src/extract/extractFiles.js";
import { extractRecording } from "../src/pipeline/extractRecording.js";
import { resolvePipelineOptions } from "../src/pipeline/options.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { planToJson } from "../src/plan/writePlan.js";
import { readRecording } from "../src/recording/readRecording.js";
import { sqlString, withDuckDB } from "../src/recording/duckdb.js";
import { compactManeuvers } from "../src/shard/compactManeuvers.js";
import { decodeValue, encodeValue } from "../src/shard/encodeValue.js";
import { readShard } from "../src/shard/readShard.js";
import { writeShard } from "../src/shard/writeShard.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const root = join(import.meta.dirname, "..");
function cli(args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

let dir = "";
const tracks: string[] = [];
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "roadsieve-shard-"));
  for (const [i, id] of ["shard-a", "shard-b", "shard-c"].entries()) {
    const traffic = generateTraffic({ vehicleKm: 10 + 3 * i, recordingId: id, hardBrakingRate: 0.1, tightCutInRate: 0.1 }, new Rng(40 + i));
    await writeGeneratedTraffic(join(dir, id), traffic, { format: "parquet" });
    tracks.push(join(dir, id, "tracks.parquet"));
  }
});

/** Deep equality where numbers compare by SameValue (ECMAScript §7.2.10: NaN equals NaN, 0 differs from −0). */
function sameValueDeep(a: unknown, b: unknown, path = "$"): void {
  if (typeof a === "number" || typeof b === "number") {
    if (!Object.is(a, b)) throw new Error(`${path}: ${String(a)} vs ${String(b)}`);
    return;
  }
  if (ArrayBuffer.isView(a) || ArrayBuffer.isView(b)) {
    expect((a as object).constructor.name, path).toBe((b as object).constructor.name);
    const x = a as unknown as ArrayLike<number>;
    const y = b as unknown as ArrayLike<number>;
    expect(x.length, path).toBe(y.length);
    for (let i = 0; i < x.length; i++) if (!Object.is(x[i], y[i])) throw new Error(`${path}[${i}]: ${x[i]} vs ${y[i]}`);
    return;
  }
  if (a === null || b === null || typeof a !== "object" || typeof b !== "object") {
    expect(a, path).toBe(b);
    return;
  }
  expect(Object.keys(a as object), path).toEqual(Object.keys(b as object)); // same keys in the same order
  for (const k of Object.keys(a as object)) sameValueDeep((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
}

describe("generic encoding", () => {
  it("keeps what JSON alone loses: NaN, ±Infinity, −0, typed arrays, key order, fields nobody declared", () => {
    const v = { z: 1, a: [NaN, Infinity, -Infinity, -0, 0, 1e-310, 0.1 + 0.2], t: new Float32Array([1.5, -0, NaN]), i: new Int8Array([-3, 4]), extra: { parameters: { thw: null, gap: 12.5 }, scenarioClass: "cut-in" } };
    const back = decodeValue(encodeValue(v));
    sameValueDeep(back, v);
    // JSON.stringify itself maps NaN and Infinity to null and −0 to 0 (ECMAScript §25.5.2.2), which is why the tags exist.
    expect(JSON.stringify([NaN, -0])).toBe("[null,0]");
  });

  it("refuses what it cannot keep exactly, naming where", () => {
    expect(() => encodeValue({ a: { b: new Map() } })).toThrow(/Map at \$\.a\.b/);
    expect(() => encodeValue({ a: [1, undefined] })).toThrow(/\$\.a\[1\]/);
    expect(() => encodeValue({ n: 10n })).toThrow(/bigint/);
  });
});

describe("shards", () => {
  it("a shard reads back exactly what extraction produced, with fields added after the shard code was written", async () => {
    const rec = await readRecording(tracks[0]!);
    const o = resolvePipelineOptions({});
    const ex = extractRecording(rec, o);
    // A field later work adds to every scenario (CONTRACT §1) survives without shard code changes.
    for (const s of ex.set.scenarios) Object.assign(s, { scenarioClass: "following", parameters: { egoSpeed: s.meanSpeed, gap: null } });
    const out = join(dir, "roundtrip");
    const w = await writeShard(out, ex, extractionOptions({}, o));
    expect(w.status).toBe("written");
    const back = await readShard(w.manifest, { options: extractionOptions({}, o) });
    sameValueDeep(back.set.scenarios, ex.set.scenarios);
    expect(Buffer.from(back.set.tensors.buffer).equals(Buffer.from(ex.set.tensors.buffer, ex.set.tensors.byteOffset, ex.set.tensors.byteLength))).toBe(true);
    sameValueDeep(back.maneuvers, compactManeuvers(ex.maneuvers));
    sameValueDeep(back.summary, ex.summary);
    expect(back.set.shape).toEqual(ex.set.shape);
    // The catalogue of many shards is readable by DuckDB straight from the files, without loading them.
    const n = await withDuckDB(async (c) => {
      const r = await c.runAndReadAll(`SELECT count(*)::INTEGER, sum(km) FROM read_parquet(${sqlString(join(out, "*.scenarios.parquet"))})`);
      return r.getRows()[0]!;
    });
    expect(n[0]).toBe(ex.set.scenarios.length);
    expect(n[1]).toBeCloseTo(ex.summary.km, 9);
  });

  it("two writers of the same shard: exactly one writes it, the other finds it, no file is left over", async () => {
    const rec = await readRecording(tracks[1]!);
    const o = resolvePipelineOptions({});
    const ex = extractRecording(rec, o);
    const out = join(dir, "race");
    const [a, b] = await Promise.all([writeShard(out, ex, extractionOptions({}, o)), writeShard(out, ex, extractionOptions({}, o))]);
    expect([a.status, b.status].sort()).toEqual(["existing", "written"]);
    const files = readdirSync(out).sort();
    expect(files.filter((f) => f.endsWith(".shard.json"))).toEqual(["shard-b.shard.json"]);
    expect(files.filter((f) => f.endsWith(".parquet"))).toHaveLength(2);
    expect(files.filter((f) => f.startsWith("."))).toEqual([]);
  });

  it("1 and 2 extraction threads give the same results, which equal extraction on this thread", async () => {
    const o = resolvePipelineOptions({});
    const one = await extractFiles(tracks, {}, o, { workers: 1 });
    const two = await extractFiles(tracks, {}, o, { workers: 2 });
    for (let i = 0; i < tracks.length; i++) {
      sameValueDeep(two[i]!.set.scenarios, one[i]!.set.scenarios);
      sameValueDeep(two[i]!.set.tensors, one[i]!.set.tensors);
      sameValueDeep(two[i]!.summary, one[i]!.summary);
    }
    const here = extractRecording(await readRecording(tracks[2]!), o);
    sameValueDeep(one[2]!.set.scenarios, here.set.scenarios);
    sameValueDeep(one[2]!.set.tensors, here.set.tensors);
  });
});

describe("plan from recordings, from shards, on 1 or 2 workers", () => {
  it("gives byte-identical plan.json, equal to runPipeline in one process", async () => {
    const recs = [];
    for (const t of tracks) recs.push(await readRecording(t));
    const reference = planToJson(runPipeline(recs, {}).plan);
    const w1 = cli(["plan", ...tracks, "--workers", "1", "--out", join(dir, "p1"), "--no-catalogue", "--quiet"]);
    expect(w1.code, w1.stderr).toBe(0);
    const w2 = cli(["plan", ...tracks, "--workers", "2", "--out", join(dir, "p2"), "--no-catalogue", "--quiet"]);
    expect(w2.code, w2.stderr).toBe(0);
    const ex = cli(["extract", ...tracks, "--out", join(dir, "shards"), "--quiet"]);
    expect(ex.code, ex.stderr).toBe(0);
    expect(ex.stdout.match(/^wrote /gm)).toHaveLength(3);
    // Extracting again leaves the shards as they are.
    expect(cli(["extract", tracks[0]!, "--out", join(dir, "shards"), "--quiet"]).stdout).toMatch(/^already there /);
    const fromShards = cli(["plan", join(dir, "shards"), "--out", join(dir, "p3"), "--no-catalogue", "--quiet"]);
    expect(fromShards.code, fromShards.stderr).toBe(0);
    // Mixed: one shard and two tracks files, in the same order.
    const mixed = cli(["plan", tracks[0]!, join(dir, "shards", "shard-b.shard.json"), tracks[2]!, "--out", join(dir, "p4"), "--no-catalogue", "--quiet"]);
    expect(mixed.code, mixed.stderr).toBe(0);
    const p1 = readFileSync(join(dir, "p1", "plan.json"), "utf8");
    expect(p1).toBe(reference);
    expect(readFileSync(join(dir, "p2", "plan.json"), "utf8")).toBe(p1);
    expect(readFileSync(join(dir, "p3", "plan.json"), "utf8")).toBe(p1);
    expect(readFileSync(join(dir, "p4", "plan.json"), "utf8")).toBe(p1);
    expect(readFileSync(join(dir, "p3", "report.html"), "utf8")).toBe(readFileSync(join(dir, "p1", "report.html"), "utf8"));
  });

  it("refuses a shard extracted with other options or by another version, naming both", () => {
    const other = cli(["plan", join(dir, "shards"), "--window", "8", "--out", join(dir, "p-bad"), "--quiet"]);
    expect(other.code).toBe(2);
    const msg = other.stderr.trim().split("\n").pop()!;
    expect(msg).toMatch(/shard-a\.shard\.json/);
    expect(msg).toMatch(/options\.scenario.*vs/);
    expect(msg).toContain('"lengthS":8');
    const old = join(dir, "old-shards");
    cpSync(join(dir, "shards"), old, { recursive: true });
    const mp = join(old, "shard-a.shard.json");
    writeFileSync(mp, readFileSync(mp, "utf8").replace(/"tool": "roadsieve [^"]+"/, '"tool": "roadsieve 0.0.1"'));
    const r = cli(["plan", mp, "--out", join(dir, "p-old"), "--quiet"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/extracted by roadsieve 0\.0\.1, this is roadsieve \d/);
  });

  it("a folder with expected.json: plan refuses missing recordings, naming them and why, unless --allow-incomplete", () => {
    const part = join(dir, "partial");
    mkdirSync(join(part, "failed"), { recursive: true });
    for (const f of readdirSync(join(dir, "shards"))) if (!f.startsWith("shard-c")) cpSync(join(dir, "shards", f), join(part, f));
    writeFileSync(join(part, "expected.json"), JSON.stringify({ recordings: tracks.map((source) => ({ source })) }));
    writeFileSync(join(part, "failed", "shard-c.json"), JSON.stringify({ source: tracks[2], attempts: 3, reason: "disk full" }));
    const r = cli(["plan", part, "--out", join(dir, "p-part"), "--quiet", "--no-catalogue"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toContain(`1 of 3 expected recordings have no shard: ${tracks[2]} (failed 3 times: disk full)`);
    const ok = cli(["plan", part, "--allow-incomplete", "--out", join(dir, "p-part"), "--quiet", "--no-catalogue"]);
    expect(ok.code, ok.stderr).toBe(0);
    expect(ok.stderr).toContain("incomplete set");
  });
});
