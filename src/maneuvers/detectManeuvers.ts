import type { Track } from "../recording/types.js";
import { InputError } from "../core/errors.js";
import { assignLanes } from "../kinematics/assignLanes.js";
import { deriveMotion, medianStep, windowSamples } from "../kinematics/deriveMotion.js";
import { splitAtGaps } from "../kinematics/splitAtGaps.js";
import { LAT_KEEP, LAT_LEFT, LAT_RIGHT, LATERAL, LON_DECELERATE, LON_KEEP, LONGITUDINAL } from "./labels.js";
import { labelLongitudinal } from "./labelLongitudinal.js";
import { findLaneChanges, debounceLanes, type FoundLaneChange } from "./findLaneChanges.js";
import { fitLaneChangeProfile } from "./fitLaneChangeProfile.js";
import { enforceLastingCrossings } from "./enforceLastingCrossings.js";
import { LANE_CHANGE_PROFILES, profileShape, type LaneChangeProfile } from "./laneChangeShapes.js";
import { fitPolynomial } from "./fitPolynomial.js";
import { resolveManeuverOptions, type ManeuverOptions, type ResolvedManeuverOptions } from "./options.js";
import type { LaneChangeBoundaryMethod, ManeuverSegment, SmoothedMotion, TrackManeuvers } from "./types.js";

/**
 * Basic maneuvers of one track.
 *
 * Positions are smoothed and differentiated with Savitzky–Golay filters (Savitzky & Golay 1964,
 * through kinematics/deriveMotion) on each contiguous run of samples, so that position noise does not
 * turn into false maneuvers; the track's own vx/vy/ax columns are not used.
 * - Longitudinal: the smoothed acceleration is labelled keep / accelerate / decelerate against
 *   ±keepAccel with a hysteresis band, then phases shorter than minLongitudinalS are merged away.
 * - Lateral: a lane change is a lasting crossing of a lane marking (marking touches shorter than
 *   minLaneHoldS are removed first, then, with crossingRule "lasting", episodes that get less than
 *   minExcursion past the marking or stay less than minDwellS before coming back); every crossing
 *   is its own lane change, also when two follow without a pause. Its movement spans the samples
 *   where the lateral speed towards the new lane exceeds `lateralSpeed`; with boundary "auto" the
 *   start and end then come from whichever of three profile shapes fits the positions best. A lane
 *   change cut by the start or end of the run is flagged "partial".
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
    if (o.crossingRule === "lasting" && o.laneMarkings)
      enforceLastingCrossings(lane, track.t, motion.y, motion.vy, s, e, {
        markings: o.laneMarkings,
        minExcursion: o.minExcursion,
        minDwellSamples: Math.max(1, Math.round(o.minDwellS * perS)),
        minCrossingSpeed: o.minCrossingSpeed,
      });
    labelLongitudinal(motion.ax, s, e, o.keepAccel, o.keepAccel - o.hysteresis, Math.round(o.minLongitudinalS * perS), longitudinal);
    const changes = findLaneChanges(lane, motion.vy, s, e, o.lateralSpeed, warnings, track.id);
    const accepted: Array<{ lc: FoundLaneChange; method: LaneChangeBoundaryMethod; partial: boolean }> = [];
    for (const lc of changes) {
      // Cut by the run's start or end (the movement still under way there): its true extent is
      // unknown, that side stays at the run's edge and the duration is not judged.
      const cutStart = lc.start <= s;
      const cutEnd = lc.end >= e - 1;
      // A profile fitted to half a movement is ill-posed: partial lane changes keep the threshold.
      const method = o.boundary === "threshold" || cutStart || cutEnd ? "threshold" : refineByProfile(track, lc, o.boundary === "profile" ? ["minimum-jerk"] : LANE_CHANGE_PROFILES, o.boundary === "profile" ? 0.3 : 1.5);
      if (cutStart) lc.start = s;
      if (cutEnd) lc.end = e - 1;
      const partial = cutStart || cutEnd;
      const duration = track.t[lc.end]! - track.t[lc.start]!;
      const outside = partial ? undefined : duration < o.minLaneChangeS ? "too-short" : duration > o.maxLaneChangeS ? "too-long" : undefined;
      if (outside && o.outOfRange === "reject") {
        warnings.push(
          `track ${track.id}: lane change ${lc.from}→${lc.to} at t=${track.t[lc.cross]!.toFixed(2)} s rejected: duration ${duration.toFixed(2)} s outside [${o.minLaneChangeS}, ${o.maxLaneChangeS}] s`,
        );
        continue;
      }
      lateral.fill(lc.to > lc.from ? LAT_LEFT : LAT_RIGHT, lc.start, lc.end + 1);
      lc.flag = outside;
      accepted.push({ lc, method, partial });
    }
    pushSegments(track, o, motion, longitudinal, "longitudinal", s, e, segments);
    // Lateral segments: one per accepted lane change (two changes without a pause between them stay
    // two segments), lane-keep segments fill the rest of the run.
    let next = s;
    for (const { lc, method, partial } of accepted) {
      if (lc.start > next) pushSegments(track, o, motion, lateral, "lateral", next, lc.start, segments, s, e);
      pushSegments(track, o, motion, lateral, "lateral", lc.start, lc.end + 1, segments, s, e);
      next = lc.end + 1;
      const seg = segments[segments.length - 1]!;
      if (lc.flag) seg.flags.push(lc.flag);
      if (partial) seg.flags.push("partial");
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
        boundaryMethod: method,
        partial,
      };
    }
    if (next < e) pushSegments(track, o, motion, lateral, "lateral", next, e, segments, s, e);
  }
  segments.sort((a, b) => a.startFrame - b.startFrame || (a.axis < b.axis ? -1 : a.axis > b.axis ? 1 : 0));
  return { trackId: track.id, longitudinal, lateral, lane, motion, segments, warnings };
}

/**
 * Replace threshold boundaries by those of the lateral profiles that fit (see
 * fitLaneChangeProfile): each shape in `shapes` is fitted, implausible fits are dropped (the crossing
 * outside it, less than 1 m towards the new lane, or more than 0.5 m RMS), and start and end are the
 * likelihood-weighted mean of the remaining fits' onsets and settling times; the method reported is
 * the shape with the smallest residual. All shapes have the same free parameters (t0, t1, offset,
 * drift, displacement), so their residuals compare directly. `slack` (s) is how far inside the
 * threshold boundaries the onset and settling may lie: a speed threshold on a smoothed ramp with
 * sharp corners marks the start early and the end late (by up to half the smoothing window), on a
 * smooth profile late and early. Returns the method used ("threshold" when no fit is plausible).
 */
function refineByProfile(track: Track, lc: FoundLaneChange, shapes: readonly LaneChangeProfile[], slack: number): LaneChangeBoundaryMethod {
  const t = track.t;
  const pad = 3.5; // s: the threshold boundaries lag by up to about 2 s on a 14 s lane change
  const tS = t[lc.start]!;
  const tE = t[lc.end]!;
  let lo = lc.start;
  while (lo > lc.lo && t[lo - 1]! >= tS - pad) lo--;
  let hi = lc.end;
  while (hi < lc.hi && t[hi + 1]! <= tE + pad) hi++;
  const tc = t[lc.cross]!;
  const dir = lc.to > lc.from ? 1 : -1;
  const fits: Array<{ t0: number; t1: number; sse: number; shape: LaneChangeProfile }> = [];
  const n = hi - lo + 1;
  for (const shape of shapes) {
    const fit = fitLaneChangeProfile(
      t,
      track.y,
      lo,
      hi,
      [Math.max(t[lo]!, tS - 3), Math.min(tc, tS + slack)],
      [Math.max(tc, tE - slack), Math.min(t[hi]!, tE + 3)],
      0.5,
      profileShape(shape),
    );
    if (!fit || !(fit.t0 < tc && fit.t1 >= tc) || !(dir * fit.displacement >= 1) || !(fit.rms <= 0.5)) continue;
    fits.push({ t0: fit.t0, t1: fit.t1, sse: fit.rms * fit.rms * n, shape });
  }
  if (fits.length === 0) return "threshold";
  // Shapes the data cannot tell apart share the boundaries: each fit is weighted by its likelihood
  // under Gaussian residuals, exp(−(SSE − SSE_min) / 2σ̂²), σ̂² = SSE_min / (n − 5) (Bayesian model
  // averaging with equal priors; Hoeting et al., Statistical Science 14, 1999). At 0.1 m noise the
  // minimum-jerk and sinusoidal shapes differ by only 1–3 σ² in SSE while their onsets differ by
  // about 0.08·T, so neither is trusted alone; a ramp differs by 30+ σ² and wins outright.
  let minSse = Infinity;
  let best = fits[0]!;
  for (const f of fits)
    if (f.sse < minSse) {
      minSse = f.sse;
      best = f;
    }
  const sigma2 = Math.max(minSse / Math.max(1, n - 5), 1e-12);
  let w = 0, t0 = 0, t1 = 0;
  for (const f of fits) {
    const wk = Math.exp(-(f.sse - minSse) / (2 * sigma2));
    w += wk;
    t0 += wk * f.t0;
    t1 += wk * f.t1;
  }
  const fit = { t0: t0 / w, t1: t1 / w };
  let start = lc.start;
  while (start > lo && t[start - 1]! >= fit.t0) start--;
  while (start < lc.cross && t[start]! < fit.t0) start++;
  let end = lc.end;
  while (end < hi && t[end + 1]! <= fit.t1) end++;
  while (end > lc.cross && t[end]! > fit.t1) end--;
  lc.start = Math.min(start, lc.cross);
  lc.end = Math.max(end, lc.cross);
  return best.shape;
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

/** Segments of one axis over [s, e) of the run [runStart, runEnd): one per stretch of equal labels. */
function pushSegments(
  track: Track,
  o: ResolvedManeuverOptions,
  motion: SmoothedMotion,
  labels: Int8Array,
  axis: "longitudinal" | "lateral",
  s: number,
  e: number,
  out: ManeuverSegment[],
  runStart = s,
  runEnd = e,
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
    if (a === runStart && code !== keep) flags.push("at-track-start");
    if (b === runEnd - 1 && code !== keep) flags.push("at-track-end");
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
