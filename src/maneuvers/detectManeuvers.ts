import type { Track } from "../recording/types.js";
import { InputError } from "../core/errors.js";
import { assignLanes } from "../kinematics/assignLanes.js";
import { deriveMotion, medianStep, windowSamples } from "../kinematics/deriveMotion.js";
import { splitAtGaps } from "../kinematics/splitAtGaps.js";
import { LAT_KEEP, LAT_LEFT, LAT_RIGHT, LATERAL, LON_DECELERATE, LON_KEEP, LONGITUDINAL } from "./labels.js";
import { labelLongitudinal } from "./labelLongitudinal.js";
import { findLaneChanges, debounceLanes, type FoundLaneChange } from "./findLaneChanges.js";
import { fitLaneChangeProfile } from "./fitLaneChangeProfile.js";
import { fitPolynomial } from "./fitPolynomial.js";
import { resolveManeuverOptions, type ManeuverOptions, type ResolvedManeuverOptions } from "./options.js";
import type { ManeuverSegment, SmoothedMotion, TrackManeuvers } from "./types.js";

/**
 * Basic maneuvers of one track.
 *
 * Positions are smoothed and differentiated with Savitzky–Golay filters (Savitzky & Golay 1964,
 * through kinematics/deriveMotion) on each contiguous run of samples, so that position noise does not
 * turn into false maneuvers; the track's own vx/vy/ax columns are not used.
 * - Longitudinal: the smoothed acceleration is labelled keep / accelerate / decelerate against
 *   ±keepAccel with a hysteresis band, then phases shorter than minLongitudinalS are merged away.
 * - Lateral: a lane change is a lasting change of the lane index (marking touches shorter than
 *   minLaneHoldS are removed first); it starts and ends where the lateral speed towards the new lane
 *   falls back below `lateralSpeed` on either side of the crossing. A drift towards a marking and
 *   back never changes the lane, so it is no lane change.
 * Runs shorter than minJudgeS are labelled keep / lane-keep and reported in `warnings`.
 */
export function detectManeuvers(track: Track, options: ManeuverOptions = {}): TrackManeuvers {
  return detectWithResolved(track, resolveManeuverOptions(options));
}

/** The worker behind {@link detectManeuvers}, for callers that resolved the options once. */
export function detectWithResolved(track: Track, o: ResolvedManeuverOptions): TrackManeuvers {
  const n = track.t.length;
  if (track.x.length !== n || track.y.length !== n)
    throw new InputError(`track ${track.id}: arrays differ in length (t=${n}, x=${track.x.length}, y=${track.y.length})`);
  const warnings: string[] = [];
  const full = deriveMotion(track, { windowS: o.windowS, accelWindowS: o.accelWindowS, order: o.order, maxGapFactor: o.maxGapFactor });
  const motion: SmoothedMotion = { x: full.x, y: full.y, vx: full.vx, vy: full.vy, ax: full.ax };
  const lane = o.laneMarkings ? assignLanes(motion.y, o.laneMarkings) : Int32Array.from(track.lane);
  const longitudinal = new Int8Array(n);
  const lateral = new Int8Array(n);
  const segments: ManeuverSegment[] = [];
  if (n === 0) return { trackId: track.id, longitudinal, lateral, lane, motion, segments, warnings: [`track ${track.id}: no samples`] };

  const dt = medianStep(track.t);
  const runs = dt > 0 ? splitAtGaps(track.t, o.maxGapFactor * dt) : [[0, n] as [number, number]];
  if (runs.length > 1) warnings.push(`track ${track.id}: ${runs.length - 1} time gap(s); each of the ${runs.length} runs is judged separately`);
  const perS = dt > 0 ? 1 / dt : 0;
  for (const [s, e] of runs) {
    const span = track.t[e - 1]! - track.t[s]!;
    if (e - s < 3 || span < o.minJudgeS) {
      warnings.push(`track ${track.id}: samples ${s}..${e - 1} span ${span.toFixed(2)} s < minJudgeS=${o.minJudgeS} s; too short to judge, labelled keep / lane-keep`);
      continue;
    }
    holdEdges(motion.ax, s, e, windowSamples(o.accelWindowS, dt, o.order));
    debounceLanes(lane, s, e, Math.max(1, Math.round(o.minLaneHoldS * perS)));
    labelLongitudinal(motion.ax, s, e, o.keepAccel, o.keepAccel - o.hysteresis, Math.round(o.minLongitudinalS * perS), longitudinal);
    const changes = findLaneChanges(lane, motion.vy, s, e, o.lateralSpeed, warnings, track.id);
    if (o.boundary === "profile") for (const lc of changes) refineByProfile(track, lc);
    for (const lc of changes) {
      const duration = track.t[lc.end]! - track.t[lc.start]!;
      const outside = duration < o.minLaneChangeS ? "too-short" : duration > o.maxLaneChangeS ? "too-long" : undefined;
      if (outside && o.outOfRange === "reject") {
        warnings.push(
          `track ${track.id}: lane change ${lc.from}→${lc.to} at t=${track.t[lc.cross]!.toFixed(2)} s rejected: duration ${duration.toFixed(2)} s outside [${o.minLaneChangeS}, ${o.maxLaneChangeS}] s`,
        );
        continue;
      }
      lateral.fill(lc.to > lc.from ? LAT_LEFT : LAT_RIGHT, lc.start, lc.end + 1);
      lc.flag = outside;
    }
    pushSegments(track, o, motion, longitudinal, "longitudinal", s, e, segments);
    pushSegments(track, o, motion, lateral, "lateral", s, e, segments);
    for (const lc of changes) {
      const seg = segments.find((g) => g.axis === "lateral" && g.startFrame === lc.start && g.maneuver !== "lane-keep");
      if (!seg) continue;
      if (lc.flag) seg.flags.push(lc.flag);
      const ts = track.t[lc.start]!;
      const dur = Math.max(track.t[lc.end]! - ts, 1e-9);
      const tau = new Float64Array(lc.end - lc.start + 1);
      const yy = new Float64Array(tau.length);
      let peak = 0;
      const dir = lc.to > lc.from ? 1 : -1;
      for (let i = lc.start; i <= lc.end; i++) {
        tau[i - lc.start] = (track.t[i]! - ts) / dur;
        yy[i - lc.start] = motion.y[i]! - motion.y[lc.start]!;
        peak = Math.max(peak, dir * motion.vy[i]!);
      }
      const fit = fitPolynomial(tau, yy, o.polyDegree);
      seg.laneChange = {
        fromLane: lc.from,
        toLane: lc.to,
        crossFrame: lc.cross,
        tCross: crossingTime(track.t, motion.y, lc.cross, o.laneMarkings, lc.from, lc.to),
        displacement: motion.y[lc.end]! - motion.y[lc.start]!,
        peakLateralSpeed: peak,
        poly: fit.coefficients,
        polyResidual: fit.rms,
      };
    }
  }
  segments.sort((a, b) => a.startFrame - b.startFrame || (a.axis < b.axis ? -1 : a.axis > b.axis ? 1 : 0));
  return { trackId: track.id, longitudinal, lateral, lane, motion, segments, warnings };
}

/**
 * Replace threshold boundaries by those of a fitted minimum-jerk profile (see fitLaneChangeProfile)
 * when the fit is plausible: the crossing lies inside it, it moves the vehicle by at least 1 m
 * towards the new lane, and it explains the positions to within 0.5 m RMS.
 */
function refineByProfile(track: Track, lc: FoundLaneChange): void {
  const t = track.t;
  const pad = 3.5; // s: the threshold boundaries lag by up to about 2 s on a 14 s lane change
  const tS = t[lc.start]!;
  const tE = t[lc.end]!;
  let lo = lc.start;
  while (lo > lc.lo && t[lo - 1]! >= tS - pad) lo--;
  let hi = lc.end;
  while (hi < lc.hi && t[hi + 1]! <= tE + pad) hi++;
  const tc = t[lc.cross]!;
  const fit = fitLaneChangeProfile(
    t,
    track.y,
    lo,
    hi,
    [Math.max(t[lo]!, tS - 3), Math.min(tc, tS + 0.3)],
    [Math.max(tc, tE - 0.3), Math.min(t[hi]!, tE + 3)],
    0.5,
  );
  const dir = lc.to > lc.from ? 1 : -1;
  if (!fit || !(fit.t0 < tc && fit.t1 >= tc) || !(dir * fit.displacement >= 1) || !(fit.rms <= 0.5)) return;
  let start = lc.start;
  while (start > lo && t[start - 1]! >= fit.t0) start--;
  while (start < lc.cross && t[start]! < fit.t0) start++;
  let end = lc.end;
  while (end < hi && t[end + 1]! <= fit.t1) end++;
  while (end > lc.cross && t[end]! > fit.t1) end--;
  lc.start = Math.min(start, lc.cross);
  lc.end = Math.max(end, lc.cross);
}

/**
 * Hold the acceleration over the first and last half window of a run at the value of the first and
 * last full-window fit. At the ends the Savitzky–Golay polynomial is evaluated off-centre, where the
 * variance of its second derivative grows (for a cubic fit: 10× a quarter window from the end, 35× at
 * the very end, from the filter coefficients), and
 * position noise there would otherwise show as false accelerations.
 */
function holdEdges(ax: Float64Array, s: number, e: number, window: number): void {
  const m = (window - 1) >> 1;
  if (e - s <= 2 * m + 1) return;
  ax.fill(ax[s + m]!, s, s + m);
  ax.fill(ax[e - 1 - m]!, e - m, e);
}

/** Crossing time interpolated where the smoothed y passes the marking between the two lanes. */
function crossingTime(t: Float64Array, y: Float64Array, c: number, markings: number[] | undefined, from: number, to: number): number {
  if (!markings || c === 0) return t[c]!;
  const m = markings[Math.max(from, to)];
  if (m === undefined) return t[c]!;
  const y0 = y[c - 1]!;
  const y1 = y[c]!;
  if (y1 === y0) return t[c]!;
  const f = Math.min(1, Math.max(0, (m - y0) / (y1 - y0)));
  return t[c - 1]! + f * (t[c]! - t[c - 1]!);
}

/** Segments of one axis over the run [s, e): one per run of equal labels. */
function pushSegments(
  track: Track,
  o: ResolvedManeuverOptions,
  motion: SmoothedMotion,
  labels: Int8Array,
  axis: "longitudinal" | "lateral",
  s: number,
  e: number,
  out: ManeuverSegment[],
): void {
  let a = s;
  while (a < e) {
    let b = a;
    while (b + 1 < e && labels[b + 1] === labels[a]) b++;
    const code = labels[a]!;
    let sum = 0;
    let peak = 0;
    for (let i = a; i <= b; i++) {
      const v = motion.ax[i]!;
      sum += v;
      if (Math.abs(v) > Math.abs(peak)) peak = v;
    }
    const flags: string[] = [];
    const keep = axis === "longitudinal" ? LON_KEEP : LAT_KEEP;
    // A maneuver cut by the end of the observed run has an unknown true extent.
    if (a === s && code !== keep) flags.push("at-track-start");
    if (b === e - 1 && code !== keep) flags.push("at-track-end");
    if (axis === "longitudinal" && code === LON_DECELERATE && -peak > o.decelAbove) flags.push("harsh-braking");
    out.push({
      axis,
      maneuver: axis === "longitudinal" ? LONGITUDINAL[code]! : LATERAL[code]!,
      startFrame: a,
      endFrame: b,
      tStart: track.t[a]!,
      tEnd: track.t[b]!,
      duration: track.t[b]! - track.t[a]!,
      startSpeed: motion.vx[a]!,
      endSpeed: motion.vx[b]!,
      meanAccel: sum / (b - a + 1),
      peakAccel: peak,
      flags,
    });
    a = b + 1;
  }
}
