import { link, mkdir, readFile, rename, rm, writeFile } from "node:fs/promises";
import { hostname } from "node:os";
import { join } from "node:path";
import { threadId } from "node:worker_threads";
import type { DuckDBConnection } from "@duckdb/node-api";
import { InputError } from "../core/errors.js";
import { sha256File } from "../core/io.js";
import { VERSION } from "../core/version.js";
import { sqlString, withDuckDB } from "../recording/duckdb.js";
import { canonicalJson, encodeValue } from "./encodeValue.js";
import { compactManeuvers } from "./compactManeuvers.js";
import { manifestName, safeName } from "./shardNames.js";
import type { ExtractedRecording, ShardFile, ShardManifest } from "./types.js";

/** Version of the shard layout (files, columns, encoding). Bump on any change readers must know. */
export const SHARD_FORMAT_VERSION = 1;

let tmpCounter = 0;

export interface WriteShardResult {
  manifest: string;
  /** "written": this call created the shard; "existing": an identical shard was already there (another worker or an earlier run). */
  status: "written" | "existing";
}

/**
 * Write one recording's extraction as a shard in `dir`:
 *   <id>.<hash>.scenarios.parquet   one row per scenario: queryable columns, the whole Scenario
 *                                   object encoded generically (encodeValue) and its tensor as bytes
 *   <id>.<hash>.maneuvers.parquet   one row per track: its maneuvers (segments; per-sample arrays
 *                                   dropped, see compactManeuvers)
 *   <id>.shard.json                 the manifest, written last (see ShardManifest)
 * Data files are named by the first 16 hex digits of their SHA-256, so two writers never replace
 * each other's files; the manifest is created with link(), which fails when it exists, so exactly
 * one writer commits a shard. A writer that loses (or finds a shard already there) checks that the
 * existing one is the same extraction and otherwise throws.
 */
export async function writeShard(dir: string, ex: ExtractedRecording, options: Record<string, unknown>): Promise<WriteShardResult> {
  await mkdir(dir, { recursive: true });
  const id = ex.summary.id;
  const finalManifest = join(dir, manifestName(id));
  const existing = await readExisting(finalManifest);
  if (existing) return { manifest: finalManifest, status: sameExtraction(existing, ex, options, finalManifest) };

  const stem = safeName(id);
  const tmpTag = `${safeName(hostname())}.${process.pid}.${threadId}.${++tmpCounter}`; // unique per writer on shared storage; never in any output
  const { scenarios, maneuvers } = await withDuckDB(async (c) => {
    await c.run("SET threads = 1"); // one writer thread: row groups in insertion order, same bytes every run
    return {
      scenarios: await writeScenarios(c, ex, dir, stem, tmpTag),
      maneuvers: await writeManeuvers(c, ex, dir, stem, tmpTag),
    };
  });
  const { scenarios: _s, tensors: _t, ...setMeta } = ex.set;
  const manifest: ShardManifest = {
    format: "roadsieve-shard",
    formatVersion: SHARD_FORMAT_VERSION,
    tool: `roadsieve ${VERSION}`,
    recording: id,
    source: ex.summary.source,
    inputChecksum: ex.summary.checksum,
    options,
    files: { scenarios, maneuvers },
    set: setMeta,
    summary: ex.summary,
  };
  // encodeValue keeps the few non-JSON numbers exact; key order is the order set above and, inside
  // the set and summary, the order extraction gave (kept, because plan provenance repeats them).
  const text = `${JSON.stringify(JSON.parse(encodeValue(manifest)), null, 2)}\n`;
  const tmp = join(dir, `.${manifestName(id)}.${tmpTag}.tmp`);
  await writeFile(tmp, text);
  try {
    await link(tmp, finalManifest);
    return { manifest: finalManifest, status: "written" };
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code !== "EEXIST") throw e;
    const other = (await readExisting(finalManifest))!;
    const status = sameExtraction(other, ex, options, finalManifest);
    // Our data files are unused unless they are the very same files the winner named.
    for (const f of [scenarios, maneuvers]) if (f.name !== other.files.scenarios.name && f.name !== other.files.maneuvers.name) await rm(join(dir, f.name), { force: true });
    return { manifest: finalManifest, status };
  } finally {
    await rm(tmp, { force: true });
  }
}

async function readExisting(path: string): Promise<ShardManifest | null> {
  try {
    return JSON.parse(await readFile(path, "utf8")) as ShardManifest;
  } catch (e) {
    if ((e as NodeJS.ErrnoException).code === "ENOENT") return null;
    throw e;
  }
}

function sameExtraction(m: ShardManifest, ex: ExtractedRecording, options: Record<string, unknown>, path: string): "existing" {
  const tool = `roadsieve ${VERSION}`;
  if (m.tool !== tool || m.inputChecksum !== ex.summary.checksum || canonicalJson(m.options) !== canonicalJson(JSON.parse(encodeValue(options))))
    throw new InputError(
      `a different shard of recording "${ex.summary.id}" is already there (${m.tool}, input ${m.inputChecksum.slice(0, 12)}…); this extraction is ${tool}, input ${ex.summary.checksum.slice(0, 12)}…, maybe other options — remove it or write elsewhere`,
      { file: path },
    );
  return "existing";
}

/** COPY a table to Parquet under a temporary name, then rename it to <stem>.<hash>.<kind>.parquet. */
async function copyOut(c: DuckDBConnection, table: string, dir: string, stem: string, kind: string, tmpTag: string, rows: number): Promise<ShardFile> {
  const tmp = join(dir, `.${stem}.${kind}.${tmpTag}.tmp`);
  try {
    await c.run(`COPY ${table} TO ${sqlString(tmp)} (FORMAT parquet, COMPRESSION zstd)`);
    const sha256 = await sha256File(tmp);
    const name = `${stem}.${sha256.slice(0, 16)}.${kind}.parquet`;
    await rename(tmp, join(dir, name));
    return { name, sha256, rows };
  } finally {
    await rm(tmp, { force: true });
  }
}

async function writeScenarios(c: DuckDBConnection, ex: ExtractedRecording, dir: string, stem: string, tmpTag: string): Promise<ShardFile> {
  await c.run(
    "CREATE TABLE scenarios (idx INTEGER, id VARCHAR, recording VARCHAR, ego_track BIGINT, \"window\" INTEGER, t_start DOUBLE, t_end DOUBLE, km DOUBLE, seconds DOUBLE, scenario VARCHAR, tensor BLOB)",
  );
  const { shape } = ex.set;
  const per = shape.steps * shape.actors * shape.channels;
  const app = await c.createAppender("scenarios");
  ex.set.scenarios.forEach((s, i) => {
    app.appendInteger(i);
    app.appendVarchar(s.id);
    app.appendVarchar(s.recording);
    app.appendBigInt(BigInt(s.egoTrack));
    app.appendInteger(s.window);
    app.appendDouble(s.tStart);
    app.appendDouble(s.tEnd);
    app.appendDouble(s.km);
    app.appendDouble(s.seconds);
    app.appendVarchar(encodeValue(s));
    const t = ex.set.tensors.subarray(i * per, (i + 1) * per);
    app.appendBlob(new Uint8Array(t.buffer, t.byteOffset, t.byteLength));
    app.endRow();
  });
  app.closeSync();
  return copyOut(c, "scenarios", dir, stem, "scenarios", tmpTag, ex.set.scenarios.length);
}

async function writeManeuvers(c: DuckDBConnection, ex: ExtractedRecording, dir: string, stem: string, tmpTag: string): Promise<ShardFile> {
  await c.run("CREATE TABLE maneuvers (idx INTEGER, track BIGINT, maneuvers VARCHAR)");
  const app = await c.createAppender("maneuvers");
  compactManeuvers(ex.maneuvers).forEach((tm, i) => {
    app.appendInteger(i);
    app.appendBigInt(BigInt(tm.trackId));
    app.appendVarchar(encodeValue(tm));
    app.endRow();
  });
  app.closeSync();
  return copyOut(c, "maneuvers", dir, stem, "maneuvers", tmpTag, ex.maneuvers.length);
}
