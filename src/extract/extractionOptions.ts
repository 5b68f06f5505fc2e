import type { ResolvedPipelineOptions } from "../pipeline/options.js";
import type { ReadRecordingOptions } from "../recording/readRecording.js";

/** Read options that can travel to another thread or process and into a manifest (no callbacks). */
export type PortableReadOptions = Omit<ReadRecordingOptions, "progress">;

/**
 * Pipeline options that only shape what happens after the merge of all recordings. Every other
 * option (maneuvers, scene, scenario, and whatever later work adds) counts as an extraction option,
 * so a new option is on the safe side: shards made with another value are refused, not mixed.
 */
const PLANNING_KEYS = new Set(["seed", "k", "kRange", "nInit", "dbscan", "map", "weightBy", "plan", "embedding", "logical"]);

/**
 * The options that shape one recording's extraction: how it is read, and the resolved stage options
 * up to the scenario windows. Stored in every shard's manifest and compared when planning from shards.
 */
export function extractionOptions(read: ReadRecordingOptions, o: ResolvedPipelineOptions): Record<string, unknown> {
  const out: Record<string, unknown> = { read: portableReadOptions(read) };
  for (const [k, v] of Object.entries(o)) if (!PLANNING_KEYS.has(k)) out[k] = v;
  return out;
}

/** Read options without the progress callback. */
export function portableReadOptions(read: ReadRecordingOptions): PortableReadOptions {
  const { progress: _p, ...rest } = read;
  return rest;
}
