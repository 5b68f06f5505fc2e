import { InputError } from "../core/errors.js";
import type { Recording } from "../recording/types.js";

const SERIES = ["t", "x", "y", "vx", "vy", "ax", "ay"] as const;

/**
 * The shape of what runPipeline is given, checked at its boundary: a list of recordings as
 * readRecording returns them. Anything else (null, a path string, a track without its series) is an
 * InputError naming the recording and field, not a TypeError from deep inside a stage.
 */
export function checkRecordings(recordings: unknown): asserts recordings is Recording[] {
  if (!Array.isArray(recordings)) throw new InputError(`recordings should be a list of recordings (from readRecording or generateTraffic); got ${describe(recordings)}`);
  recordings.forEach((r: unknown, i) => {
    const at = `recordings[${i}]`;
    if (typeof r !== "object" || r === null || Array.isArray(r))
      throw new InputError(`${at} should be a recording object (from readRecording or generateTraffic); got ${describe(r)}`);
    const rec = r as Partial<Recording>;
    if (typeof rec.id !== "string" || rec.id === "") throw new InputError(`${at}.id should be a non-empty string; got ${describe(rec.id)}`);
    const road = rec.road as Partial<Recording["road"]> | undefined;
    if (typeof road !== "object" || road === null || !Array.isArray(road.laneMarkings) || typeof road.frameRate !== "number")
      throw new InputError(`${at} ("${rec.id}").road should be a road with laneMarkings and frameRate; got ${describe(road)}`);
    if (!Array.isArray(rec.tracks)) throw new InputError(`${at} ("${rec.id}").tracks should be a list of tracks; got ${describe(rec.tracks)}`);
    rec.tracks.forEach((t: unknown, j) => {
      const tat = `${at} ("${rec.id}").tracks[${j}]`;
      if (typeof t !== "object" || t === null) throw new InputError(`${tat} should be a track object; got ${describe(t)}`);
      const tr = t as Record<string, unknown>;
      const n = (tr.t as Float64Array | undefined)?.length;
      for (const s of SERIES)
        if (!(tr[s] instanceof Float64Array) || (tr[s] as Float64Array).length !== n)
          throw new InputError(`${tat}.${s} should be a Float64Array as long as t; got ${describe(tr[s])}`);
      if (!(tr.lane instanceof Int32Array) || tr.lane.length !== n) throw new InputError(`${tat}.lane should be an Int32Array as long as t; got ${describe(tr.lane)}`);
    });
  });
}

function describe(v: unknown): string {
  if (v === null) return "null";
  if (Array.isArray(v)) return `an array of ${v.length}`;
  if (ArrayBuffer.isView(v)) return `a ${v.constructor.name} of ${(v as unknown as { length: number }).length}`;
  if (typeof v === "object") return "an object";
  return typeof v === "string" ? JSON.stringify(v.length > 40 ? `${v.slice(0, 40)}…` : v) : String(v);
}
