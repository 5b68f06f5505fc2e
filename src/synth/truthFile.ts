import { readFile } from "node:fs/promises";
import { InputError } from "../core/errors.js";
import type { GroundTruth, PlantedEvent, TrackTruth, TruthCutIn, TruthLaneChange } from "./types.js";

/** Identifies our truth.json files. */
export const TRUTH_FORMAT = "roadsieve-truth";
export const TRUTH_FORMAT_VERSION = 1;

/** Run-length encoding of a per-frame code array: [code, count, code, count, …]. */
export function encodeRuns(codes: Int8Array): number[] {
  const out: number[] = [];
  let start = 0;
  for (let i = 1; i <= codes.length; i++) {
    if (i === codes.length || codes[i] !== codes[start]) {
      out.push(codes[start]!, i - start);
      start = i;
    }
  }
  return out;
}

/** Inverse of encodeRuns; `frames` checks the total length. */
export function decodeRuns(runs: number[], frames: number, what = "runs"): Int8Array {
  if (!Array.isArray(runs) || runs.length % 2 !== 0) throw new InputError(`${what} should be [code, count, …] pairs`);
  const out = new Int8Array(frames);
  let k = 0;
  for (let i = 0; i < runs.length; i += 2) {
    const code = runs[i]!;
    const count = runs[i + 1]!;
    if (!Number.isInteger(code) || code < 0 || code > 127 || !Number.isInteger(count) || count < 1)
      throw new InputError(`${what}: pair ${i / 2} = [${code}, ${count}] should be [code 0..127, count >= 1]`);
    if (k + count > frames) throw new InputError(`${what} cover more than frames=${frames}`);
    out.fill(code, k, k + count);
    k += count;
  }
  if (k !== frames) throw new InputError(`${what} cover ${k} frames, expected frames=${frames}`);
  return out;
}

/**
 * truth.json text: one line per track and per event, so that the file diffs well, with the per-frame
 * labels run-length encoded.
 */
export function truthToJson(truth: GroundTruth): string {
  const tracks = truth.tracks.map((t) =>
    JSON.stringify({
      trackId: t.trackId,
      frames: t.lateral.length,
      longitudinal: encodeRuns(t.longitudinal),
      lateral: encodeRuns(t.lateral),
    }),
  );
  const block = (items: unknown[]): string =>
    items.length === 0 ? "[]" : `[\n    ${items.map((i) => (typeof i === "string" ? i : JSON.stringify(i))).join(",\n    ")}\n  ]`;
  return (
    "{\n" +
    `  "format": ${JSON.stringify(TRUTH_FORMAT)},\n` +
    `  "formatVersion": ${TRUTH_FORMAT_VERSION},\n` +
    `  "definitions": ${JSON.stringify(truth.definitions)},\n` +
    `  "laneChanges": ${block(truth.laneChanges)},\n` +
    `  "cutIns": ${block(truth.cutIns)},\n` +
    `  "planted": ${block(truth.planted)},\n` +
    (truth.markingRiders ? `  "markingRiders": ${JSON.stringify(truth.markingRiders)},\n` : "") +
    `  "tracks": ${block(tracks)}\n` +
    "}\n"
  );
}

/** Parse truth.json text (see truthToJson); errors name the file and the field. */
export function truthFromJson(text: string, file?: string): GroundTruth {
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (e) {
    throw new InputError(`ground truth is not valid JSON: ${(e as Error).message}`, { file });
  }
  const o = parsed as Record<string, unknown>;
  if (typeof o !== "object" || o === null || o.format !== TRUTH_FORMAT)
    throw new InputError(`not a ground-truth file: field "format" should be "${TRUTH_FORMAT}"`, {
      file,
      column: "format",
      value: o && typeof o === "object" ? (o.format as string) : undefined,
    });
  if (o.formatVersion !== TRUTH_FORMAT_VERSION)
    throw new InputError(`unsupported ground-truth version; expected ${TRUTH_FORMAT_VERSION}`, {
      file,
      column: "formatVersion",
      value: o.formatVersion,
    });
  for (const key of ["laneChanges", "cutIns", "planted", "tracks"]) {
    if (!Array.isArray(o[key])) throw new InputError(`field "${key}" should be an array`, { file, column: key });
  }
  if (typeof o.definitions !== "object" || o.definitions === null)
    throw new InputError(`field "definitions" should be an object of numbers`, { file, column: "definitions" });
  const tracks: TrackTruth[] = (o.tracks as Record<string, unknown>[]).map((t, i) => {
    const frames = t.frames as number;
    if (!Number.isInteger(t.trackId) || !Number.isInteger(frames) || frames < 0)
      throw new InputError(`tracks[${i}] should have integer trackId and frames`, { file, column: `tracks[${i}]` });
    try {
      return {
        trackId: t.trackId as number,
        longitudinal: decodeRuns(t.longitudinal as number[], frames, `tracks[${i}].longitudinal`),
        lateral: decodeRuns(t.lateral as number[], frames, `tracks[${i}].lateral`),
      };
    } catch (e) {
      throw new InputError((e as Error).message, { file, column: `tracks[${i}]` });
    }
  });
  const truth: GroundTruth = {
    tracks,
    laneChanges: o.laneChanges as TruthLaneChange[],
    cutIns: o.cutIns as TruthCutIn[],
    planted: o.planted as PlantedEvent[],
    definitions: o.definitions as Record<string, number>,
  };
  if (o.markingRiders !== undefined) {
    if (!Array.isArray(o.markingRiders) || !o.markingRiders.every((v) => Number.isInteger(v)))
      throw new InputError(`field "markingRiders" should be an array of track ids`, { file, column: "markingRiders" });
    truth.markingRiders = o.markingRiders as number[];
  }
  return truth;
}

/** Load a truth.json written by writeGeneratedTraffic. */
export async function readGroundTruth(path: string): Promise<GroundTruth> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the ground truth: ${(e as Error).message}`, { file: path });
  }
  return truthFromJson(text, path);
}
