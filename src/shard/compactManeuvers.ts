import type { TrackManeuvers } from "../maneuvers/types.js";

/**
 * Drop the per-sample arrays (labels, lanes, smoothed motion) of each track once its scenarios
 * exist: they are the size of the track itself, and nothing after extraction reads them (the
 * catalogue and the report use the segments). Segments, warnings and any other field are kept.
 * The arrays stay in place with length 0 so the shape is still a TrackManeuvers.
 */
export function compactManeuvers(m: readonly TrackManeuvers[]): TrackManeuvers[] {
  return m.map((tm) => ({
    ...tm,
    longitudinal: new Int8Array(0),
    lateral: new Int8Array(0),
    lane: new Int32Array(0),
    motion: { x: new Float64Array(0), y: new Float64Array(0), vx: new Float64Array(0), vy: new Float64Array(0), ax: new Float64Array(0) },
  }));
}
