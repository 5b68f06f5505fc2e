import { basename } from "node:path";

/** Suffix of a shard's manifest; the manifest names the shard's data files. */
export const MANIFEST_SUFFIX = ".shard.json";

/** Manifest file name of a recording's shard. Recording ids become file names, so they are kept to a safe alphabet. */
export function manifestName(recordingId: string): string {
  return `${safeName(recordingId)}${MANIFEST_SUFFIX}`;
}

/** A recording id as a file-name stem: characters outside [A-Za-z0-9._-] become "_" (so "a/b" → "a_b"). */
export function safeName(id: string): string {
  const s = id.replace(/[^A-Za-z0-9._-]/g, "_");
  return s.startsWith(".") ? `_${s.slice(1)}` : s;
}

/** True for a shard manifest path (by name). */
export function isManifestPath(p: string): boolean {
  return basename(p).endsWith(MANIFEST_SUFFIX) && !basename(p).startsWith(".");
}
