import { readFile } from "node:fs/promises";
import { InputError } from "../core/errors.js";
import { PLAUSIBILITY_CHECKS } from "../recording/plausibility.js";
import type { PlausibilityCheck } from "../recording/plausibility.js";
import type { ReadRecordingOptions } from "../recording/readRecording.js";
import { UsageError } from "./usageError.js";

/** Options shared by every command that reads recordings. */
export const RECORDING_OPTIONS = {
  road: { type: "string" },
  mapping: { type: "string" },
  "on-bad-track": { type: "string" },
  "sort-rows": { type: "boolean", default: false },
  id: { type: "string" },
  format: { type: "string" },
  accept: { type: "string" },
} as const;

export const RECORDING_HELP = `  --road FILE          road description JSON   (default: road.json beside each tracks file)
  --mapping FILE       JSON with "columns" (ours → yours), "units" and "plausibility" bounds
  --on-bad-track M     fail | reject: a track that fails validation stops the run, or is left
                       out and listed in the output                  (default: fail)
  --sort-rows          sort each track's rows by time instead of requiring them in time order
  --id NAME            recording id (one tracks file only)  (default: file name, or its folder for tracks.*)
  --format F           csv | parquet                        (default: from the extension)
  --accept LIST        accept implausible values on purpose, comma-separated checks:
                       ${PLAUSIBILITY_CHECKS.join(", ")} (bounds: docs/recording.md)`;

/** Turn the shared command-line options into readRecording options. */
export async function recordingOptions(
  values: { road?: string; mapping?: string; "on-bad-track"?: string; "sort-rows"?: boolean; id?: string; format?: string; accept?: string },
  files = 1,
): Promise<ReadRecordingOptions> {
  const o: ReadRecordingOptions = {};
  if (values["sort-rows"]) o.sortWithinTracks = true;
  if (values.id !== undefined) {
    if (files !== 1) throw new UsageError(`--id names one recording; give it with exactly one tracks file (got ${files})`);
    if (values.id.trim() === "") throw new UsageError(`--id should not be empty`);
    o.id = values.id;
  }
  if (values.format !== undefined) {
    if (values.format !== "csv" && values.format !== "parquet") throw new UsageError(`--format=${JSON.stringify(values.format)} should be csv or parquet`);
    o.format = values.format;
  }
  if (values.accept !== undefined) {
    const list = values.accept.split(",").map((s) => s.trim()).filter((s) => s !== "");
    for (const c of list)
      if (!(PLAUSIBILITY_CHECKS as readonly string[]).includes(c)) throw new UsageError(`--accept: ${JSON.stringify(c)} is not a check; expected some of ${PLAUSIBILITY_CHECKS.join(", ")}`);
    o.plausibility = { accept: list as PlausibilityCheck[] };
  }
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
      if (k !== "columns" && k !== "units" && k !== "plausibility")
        throw new InputError(`unknown key "${k}"; expected "columns", "units" and/or "plausibility"`, { file: values.mapping });
    if (m.columns !== undefined) o.mapping = m.columns as ReadRecordingOptions["mapping"];
    if (m.units !== undefined) o.units = m.units as ReadRecordingOptions["units"];
    if (m.plausibility !== undefined) o.plausibility = { ...(m.plausibility as object), ...(o.plausibility ?? {}) };
  }
  return o;
}
