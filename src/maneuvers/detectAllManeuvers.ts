import type { Recording } from "../recording/types.js";
import type { Progress } from "../core/progress.js";
import { throttleProgress } from "../core/progress.js";
import { detectWithResolved } from "./detectManeuvers.js";
import { resolveManeuverOptions, type ManeuverOptions } from "./options.js";
import type { TrackManeuvers } from "./types.js";

/**
 * {@link detectManeuvers} for every track of a recording, in track order. Lanes are assigned from the
 * smoothed y with the road's lane markings unless `options.laneMarkings` overrides them.
 */
export function detectAllManeuvers(recording: Recording, options: ManeuverOptions = {}, progress?: Progress): TrackManeuvers[] {
  const o = resolveManeuverOptions({ laneMarkings: recording.road.laneMarkings, ...stripUndefined(options) });
  const report = progress ? throttleProgress(progress) : undefined;
  const out: TrackManeuvers[] = [];
  const total = recording.tracks.length;
  for (let k = 0; k < total; k++) {
    report?.({ stage: "maneuvers", done: k, total });
    out.push(detectWithResolved(recording.tracks[k]!, o));
  }
  report?.({ stage: "maneuvers", done: total, total });
  return out;
}

function stripUndefined<T extends object>(o: T): Partial<T> {
  const r: Partial<T> = {};
  for (const k of Object.keys(o) as Array<keyof T>) if (o[k] !== undefined) r[k] = o[k];
  return r;
}
