import { readdir, readFile, stat } from "node:fs/promises";
import { join } from "node:path";
import { InputError } from "../core/errors.js";
import { isManifestPath } from "./shardNames.js";
import { readShardManifest } from "./readShard.js";

/** Name of the list of recordings a shard folder should hold (written by `submit`, or by hand). */
export const EXPECTED_FILE = "expected.json";
/** Folder, inside a shard folder, of the reports of jobs that failed for good. */
export const FAILED_DIR = "failed";

/** One input of a plan: a tracks file to extract, or a shard already extracted. */
export type PlanSource = { kind: "tracks"; path: string } | { kind: "shard"; manifest: string };

/** `expected.json`: the recordings a shard folder should hold, in plan order. */
export interface ExpectedShards {
  recordings: { source: string }[];
}

/** A job that failed for good (`failed/<name>.json`). */
export interface FailedJob {
  source: string;
  attempts: number;
  reason: string;
}

/**
 * Turn plan arguments into inputs: a `*.shard.json` is a shard; a folder is a shard folder (its
 * shards in the order of its `expected.json`, else by file name); anything else is a tracks file.
 * A shard folder with an `expected.json` must hold a shard for every recording listed, unless
 * `allowIncomplete`: otherwise the InputError names each missing recording and, when its job
 * failed for good, the reason.
 */
export async function planInputs(args: readonly string[], opts: { allowIncomplete?: boolean } = {}): Promise<{ inputs: PlanSource[]; warnings: string[] }> {
  const inputs: PlanSource[] = [];
  const warnings: string[] = [];
  for (const a of args) {
    const st = await stat(a).catch(() => null);
    if (st?.isDirectory()) {
      const r = await shardFolder(a, opts.allowIncomplete ?? false);
      inputs.push(...r.inputs);
      warnings.push(...r.warnings);
    } else if (isManifestPath(a)) inputs.push({ kind: "shard", manifest: a });
    else inputs.push({ kind: "tracks", path: a });
  }
  return { inputs, warnings };
}

async function shardFolder(dir: string, allowIncomplete: boolean): Promise<{ inputs: PlanSource[]; warnings: string[] }> {
  const names = (await readdir(dir)).filter((n) => isManifestPath(n)).sort();
  const bySource = new Map<string, string>();
  for (const n of names) {
    const m = await readShardManifest(join(dir, n));
    bySource.set(m.source, join(dir, n));
  }
  const expectedPath = join(dir, EXPECTED_FILE);
  const expectedText = await readFile(expectedPath, "utf8").catch(() => null);
  const warnings: string[] = [];
  if (expectedText === null) {
    if (names.length === 0) throw new InputError(`no shards (*.shard.json) in this folder`, { file: dir });
    return { inputs: names.map((n) => ({ kind: "shard", manifest: join(dir, n) })), warnings };
  }
  let expected: ExpectedShards;
  try {
    expected = JSON.parse(expectedText) as ExpectedShards;
    if (!Array.isArray(expected.recordings)) throw new Error(`"recordings" should be a list`);
  } catch (e) {
    throw new InputError(`cannot read the list of expected recordings: ${(e as Error).message}`, { file: expectedPath });
  }
  const failed = await failedJobs(dir);
  const inputs: PlanSource[] = [];
  const missing: string[] = [];
  for (const r of expected.recordings) {
    const m = bySource.get(r.source);
    if (m) {
      inputs.push({ kind: "shard", manifest: m });
      bySource.delete(r.source);
    } else {
      const f = failed.get(r.source);
      missing.push(f ? `${r.source} (failed ${f.attempts} times: ${f.reason})` : `${r.source} (no shard yet)`);
    }
  }
  if (missing.length > 0) {
    const msg = `${missing.length} of ${expected.recordings.length} expected recordings have no shard: ${missing.join("; ")}`;
    if (!allowIncomplete) throw new InputError(`${msg} — extract them again, or plan without them with --allow-incomplete`, { file: dir });
    warnings.push(`incomplete set (--allow-incomplete): ${msg}`);
  }
  for (const [source, m] of [...bySource.entries()].sort((a, b) => (a[1] < b[1] ? -1 : 1))) {
    warnings.push(`shard of ${source} is not in ${EXPECTED_FILE}; planned after the listed ones`);
    inputs.push({ kind: "shard", manifest: m });
  }
  return { inputs, warnings };
}

/** The failure reports in `<dir>/failed/`, by source. */
export async function failedJobs(dir: string): Promise<Map<string, FailedJob>> {
  const out = new Map<string, FailedJob>();
  const names = await readdir(join(dir, FAILED_DIR)).catch(() => [] as string[]);
  for (const n of names.filter((x) => x.endsWith(".json") && !x.startsWith(".")).sort()) {
    try {
      const f = JSON.parse(await readFile(join(dir, FAILED_DIR, n), "utf8")) as FailedJob;
      out.set(f.source, f);
    } catch {
      // A damaged report only loses its reason; the recording is still listed as missing.
    }
  }
  return out;
}
