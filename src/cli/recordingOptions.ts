import { readFile } from "node:fs/promises";
import { InputError } from "../core/errors.js";
import type { ReadRecordingOptions } from "../recording/readRecording.js";

/** Options shared by every command that reads recordings. */
export const RECORDING_OPTIONS = {
  road: { type: "string" },
  mapping: { type: "string" },
  "on-bad-track": { type: "string" },
} as const;

export const RECORDING_HELP = `  --road FILE          road description JSON   (default: road.json beside each tracks file)
  --mapping FILE       JSON with "columns" (ours → yours) and "units" for files in other layouts
  --on-bad-track M     fail | reject: a track that fails validation stops the run, or is left
                       out and listed in the output                  (default: fail)`;

/** Turn the shared command-line options into readRecording options. */
export async function recordingOptions(values: { road?: string; mapping?: string; "on-bad-track"?: string }): Promise<ReadRecordingOptions> {
  const o: ReadRecordingOptions = {};
  if (values.road) o.road = values.road;
  if (values["on-bad-track"] !== undefined) {
    const v = values["on-bad-track"];
    if (v !== "fail" && v !== "reject") throw new InputError(`--on-bad-track=${JSON.stringify(v)} should be fail or reject`);
    o.onBadTrack = v;
  }
  if (values.mapping) {
    let parsed: unknown;
    try {
      parsed = JSON.parse(await readFile(values.mapping, "utf8"));
    } catch (e) {
      throw new InputError(`cannot read the mapping: ${(e as Error).message}`, { file: values.mapping });
    }
    if (typeof parsed !== "object" || parsed === null || Array.isArray(parsed))
      throw new InputError(`the mapping should be a JSON object with "columns" and/or "units"`, { file: values.mapping });
    const m = parsed as Record<string, unknown>;
    for (const k of Object.keys(m))
      if (k !== "columns" && k !== "units") throw new InputError(`unknown key "${k}"; expected "columns" and/or "units"`, { file: values.mapping });
    if (m.columns !== undefined) o.mapping = m.columns as ReadRecordingOptions["mapping"];
    if (m.units !== undefined) o.units = m.units as ReadRecordingOptions["units"];
  }
  return o;
}
