import type { ExtractedRecording, RecordingSummary } from "../pipeline/extractRecording.js";
import type { ScenarioSet } from "../scenario/types.js";

export type { ExtractedRecording };

/** One file of a shard, with its checksum so that a torn or mixed-up shard is caught on reading. */
export interface ShardFile {
  /** File name, relative to the manifest's folder. */
  name: string;
  sha256: string;
  rows: number;
}

/**
 * The manifest of a shard (`<id>.shard.json`). It is written last: a shard exists when its
 * manifest does, and its files match the checksums in it.
 */
export interface ShardManifest {
  format: "roadsieve-shard";
  formatVersion: number;
  /** "roadsieve <version>" of the tool that extracted it. */
  tool: string;
  recording: string;
  /** Tracks file as given to extract, and the SHA-256 of its bytes. */
  source: string;
  inputChecksum: string;
  /** Every option that shapes extraction (reading + maneuvers + neighbours + scenarios + …). */
  options: Record<string, unknown>;
  files: { scenarios: ShardFile; maneuvers: ShardFile };
  /** The scenario set without its rows and tensors (shape, names, options, warnings). */
  set: Omit<ScenarioSet, "scenarios" | "tensors">;
  summary: RecordingSummary;
}
