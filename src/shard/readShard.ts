import { readFile } from "node:fs/promises";
import { dirname, join } from "node:path";
import { InputError } from "../core/errors.js";
import { sha256File } from "../core/io.js";
import { VERSION } from "../core/version.js";
import type { TrackManeuvers } from "../maneuvers/types.js";
import { sqlString, withDuckDB } from "../recording/duckdb.js";
import type { Scenario } from "../scenario/types.js";
import { canonicalJson, decodeValue, encodeValue } from "./encodeValue.js";
import { SHARD_FORMAT_VERSION } from "./writeShard.js";
import type { ExtractedRecording, ShardManifest } from "./types.js";

export interface ReadShardOptions {
  /**
   * The extraction options the caller plans with (`extractionOptions(...)`). When given, a shard
   * extracted with other options is refused, naming both.
   */
  options?: Record<string, unknown>;
}

/** Read a shard's manifest, checking its format and tool version (no data files are read). */
export async function readShardManifest(path: string): Promise<ShardManifest> {
  let m: ShardManifest;
  try {
    m = decodeValue(await readFile(path, "utf8")) as ShardManifest;
  } catch (e) {
    throw new InputError(`cannot read the shard manifest: ${(e as Error).message}`, { file: path });
  }
  if (m === null || typeof m !== "object" || m.format !== "roadsieve-shard") throw new InputError(`not a roadsieve shard manifest (format ${JSON.stringify((m as { format?: unknown } | null)?.format)})`, { file: path });
  if (m.formatVersion !== SHARD_FORMAT_VERSION)
    throw new InputError(`shard format ${m.formatVersion} written by ${m.tool}; this is roadsieve ${VERSION} reading format ${SHARD_FORMAT_VERSION} — extract the recording again`, { file: path });
  const tool = `roadsieve ${VERSION}`;
  if (m.tool !== tool) throw new InputError(`the shard was extracted by ${m.tool}, this is ${tool}; extract ${m.source} again with this version`, { file: path });
  return m;
}

/**
 * The first difference between two option objects, as "path: a vs b" (for error messages), or
 * null when they are the same.
 */
export function optionDifference(a: unknown, b: unknown, path = "options"): string | null {
  const ca = canonicalJson(a);
  const cb = canonicalJson(b);
  if (ca === cb) return null;
  if (a !== null && b !== null && typeof a === "object" && typeof b === "object" && !Array.isArray(a) && !Array.isArray(b)) {
    const keys = [...new Set([...Object.keys(a), ...Object.keys(b)])].sort();
    for (const k of keys) {
      const d = optionDifference((a as Record<string, unknown>)[k], (b as Record<string, unknown>)[k], `${path}.${k}`);
      if (d) return d;
    }
  }
  return `${path}: ${ca ?? "unset"} vs ${cb ?? "unset"}`;
}

/**
 * Read a shard back into what extraction produced, exactly (same scenarios, same numbers, same
 * tensors; maneuvers without their per-sample arrays). Checks the tool version, the options (when
 * given) and the data files' checksums; any mismatch is an InputError naming the file and both sides.
 */
export async function readShard(manifestPath: string, options: ReadShardOptions = {}): Promise<ExtractedRecording> {
  const m = await readShardManifest(manifestPath);
  if (options.options) {
    const expected = JSON.parse(encodeValue(options.options)) as unknown;
    const stored = JSON.parse(encodeValue(m.options)) as unknown;
    const d = optionDifference(stored, expected);
    if (d) throw new InputError(`the shard was extracted with other options than this run (shard vs this run: ${d}); extract ${m.source} again with these options or plan with the shard's`, { file: manifestPath });
  }
  const dir = dirname(manifestPath);
  for (const f of [m.files.scenarios, m.files.maneuvers]) {
    const p = join(dir, f.name);
    let sha: string;
    try {
      sha = await sha256File(p);
    } catch (e) {
      throw new InputError(`the shard's data file is missing or unreadable: ${(e as Error).message}`, { file: p });
    }
    if (sha !== f.sha256) throw new InputError(`checksum ${sha.slice(0, 16)}… does not match the manifest's ${f.sha256.slice(0, 16)}… (${manifestPath}); the shard is damaged or mixed up — extract again`, { file: p });
  }
  const { shape } = m.set;
  const per = shape.steps * shape.actors * shape.channels;
  const n = m.files.scenarios.rows;
  const tensors = new Float32Array(n * per);
  const scenarios: Scenario[] = new Array(n);
  const maneuvers: TrackManeuvers[] = new Array(m.files.maneuvers.rows);
  await withDuckDB(async (c) => {
    let seen = 0;
    const res = await c.stream(`SELECT idx, scenario, tensor FROM read_parquet(${sqlString(join(dir, m.files.scenarios.name))}) ORDER BY idx`);
    for (;;) {
      const chunk = await res.fetchChunk();
      if (!chunk || chunk.rowCount === 0) break;
      const idx = chunk.getColumnVector(0);
      const sc = chunk.getColumnVector(1);
      const te = chunk.getColumnVector(2);
      for (let r = 0; r < chunk.rowCount; r++) {
        const i = idx.getItem(r) as number;
        scenarios[i] = decodeValue(sc.getItem(r) as string) as Scenario;
        const bytes = (te.getItem(r) as { bytes: Uint8Array }).bytes;
        if (bytes.byteLength !== per * 4) throw new InputError(`scenario ${i}: tensor of ${bytes.byteLength} bytes, expected ${per * 4}`, { file: m.files.scenarios.name });
        new Uint8Array(tensors.buffer, i * per * 4, per * 4).set(bytes);
        seen++;
      }
    }
    if (seen !== n) throw new InputError(`${seen} scenario rows, the manifest says ${n}`, { file: join(dir, m.files.scenarios.name) });
    const mres = await c.stream(`SELECT idx, maneuvers FROM read_parquet(${sqlString(join(dir, m.files.maneuvers.name))}) ORDER BY idx`);
    for (;;) {
      const chunk = await mres.fetchChunk();
      if (!chunk || chunk.rowCount === 0) break;
      const idx = chunk.getColumnVector(0);
      const mv = chunk.getColumnVector(1);
      for (let r = 0; r < chunk.rowCount; r++) maneuvers[idx.getItem(r) as number] = decodeValue(mv.getItem(r) as string) as TrackManeuvers;
    }
  });
  // Timings are not stored (they differ between runs); a shard read back reports none.
  return { set: { scenarios, tensors, ...m.set }, maneuvers, summary: m.summary, timings: {} };
}
