/**
 * Turn a scanned table into validated tracks in the road frame: group rows by track, check each track,
 * convert units and direction, derive missing motion, assign lanes. Pure (no I/O).
 */
import { totalmem } from "node:os";
import { InputError } from "../core/errors.js";
import type { Progress } from "../core/progress.js";
import { throttleProgress } from "../core/progress.js";
import { assignLanes } from "../kinematics/assignLanes.js";
import { DERIVE_MOTION_DEFAULTS, deriveMotion, medianStep, windowSamples } from "../kinematics/deriveMotion.js";
import { splitAtGaps } from "../kinematics/splitAtGaps.js";
import type { DeriveMotionOptions, Motion } from "../kinematics/deriveMotion.js";
import type { TrackColumn } from "./columns.js";
import { DEFAULT_SIZES, KIND_CODES, KIND_EMPTY } from "./kinds.js";
import { PlausibilityChecker } from "./plausibility.js";
import type { ResolvedPlausibility } from "./plausibility.js";
import type { RawTable } from "./scanTable.js";
import { toSI } from "./units.js";
import type { Ratio, UnitFactors } from "./units.js";
import type { ObjectKind, RejectedTrack, Road, Track } from "./types.js";

export type OnBadTrack = "reject" | "fail";
export type LaneSource = "markings" | "file";

export interface BuildOptions {
  recording: string;
  /** The road as described in the file's coordinates (direction applies). */
  road: Road;
  /** The same road in the road frame. */
  roadFrame: Road;
  units: UnitFactors;
  onBadTrack: OnBadTrack;
  lanes: LaneSource;
  sortWithinTracks: boolean;
  motion: DeriveMotionOptions;
  plausibility: ResolvedPlausibility;
  progress?: Progress;
}

export interface BuildResult {
  tracks: Track[];
  rejected: RejectedTrack[];
  warnings: string[];
}

interface Problem {
  trackId: number;
  reason: string;
  row: number;
  column?: string;
  value?: unknown;
  rows: number;
}

const KINEMATIC: readonly ("vx" | "vy" | "ax" | "ay")[] = ["vx", "vy", "ax", "ay"];

export function buildTracks(raw: RawTable, o: BuildOptions): BuildResult {
  const { file, rows: n, row, columns: col, empty, names } = raw;
  const warnings: string[] = [];
  if (n === 0) throw new InputError(`the file has no data rows`, { file });
  const ids = col.track_id!;

  // Track ids must be present integers: a row without a track cannot be placed anywhere.
  for (let i = 0; i < n; i++) {
    const v = ids[i]!;
    if (!Number.isInteger(v))
      throw new InputError(empty.track_id?.[i] ? `track id is empty` : `track id should be an integer`, {
        file,
        row: row[i],
        column: names.track_id,
        value: empty.track_id?.[i] ? "" : v,
      });
  }

  // Rows in file order (the scan preserves it; re-sort by row position if it ever did not).
  let order: Int32Array | undefined;
  for (let i = 0; i < n; i++)
    if (row[i] !== i + 1) {
      order = Int32Array.from({ length: n }, (_, k) => k).sort((a, b) => row[a]! - row[b]!);
      break;
    }
  const at = (k: number) => (order ? order[k]! : k);

  // Stable grouping by track id (counting sort), tracks in ascending id order.
  const dense = new Map<number, number>();
  const counts: number[] = [];
  const denseOf = new Int32Array(n); // by file-order position k
  for (let k = 0; k < n; k++) {
    const id = ids[at(k)]!;
    let d = dense.get(id);
    if (d === undefined) {
      d = counts.length;
      dense.set(id, d);
      counts.push(0);
    }
    counts[d]!++;
    denseOf[k] = d;
  }
  const trackIds = [...dense.keys()].sort((a, b) => a - b);
  const byDense = new Int32Array(counts.length); // dense index → position in trackIds
  trackIds.forEach((id, p) => (byDense[dense.get(id)!] = p));
  const starts = new Int32Array(trackIds.length + 1);
  for (let p = 0; p < trackIds.length; p++) starts[p + 1] = starts[p]! + counts[dense.get(trackIds[p]!)!]!;
  const fill = starts.slice(0, -1);
  const members = new Int32Array(n);
  for (let k = 0; k < n; k++) members[fill[byDense[denseOf[k]!]!]!++] = at(k);

  const u = o.units;
  const mirror = o.road.direction === "-x" ? -1 : 1;
  const frameRate = u.frameRate ?? o.road.frameRate;
  const useFrame = col.t === undefined;
  const timeCol: TrackColumn = useFrame ? "frame" : "t";
  const tRaw = useFrame ? col.frame! : col.t!;
  const tRatio: Ratio = useFrame ? [1, frameRate] : u.time;
  const plaus = new PlausibilityChecker(o.plausibility, {
    file,
    columns: { x: names.x, y: names.y, vx: names.vx, ax: names.ax, time: names[timeCol] },
    laneMarkings: o.roadFrame.laneMarkings,
    xRange: o.roadFrame.xRange,
  });
  plaus.frameRate(o.road.frameRate, "the road's frameRate", "frameRate");
  if (useFrame && u.frameRate !== undefined) plaus.frameRate(u.frameRate, "units.frameRate");
  guardFrameClock(tRaw, tRatio, o.road.frameRate, file);

  const tracks: Track[] = [];
  const problems: Problem[] = [];
  const derivedCounts: Record<string, number> = {};
  let sizeDefaulted = 0;
  let laneDisagree = 0;
  let shortDerived = 0;
  const kindDefaulted = { empty: 0, unrecognised: 0 };
  const progress = o.progress ? throttleProgress(o.progress) : undefined;

  for (let p = 0; p < trackIds.length; p++) {
    progress?.({ stage: "tracks", done: p, total: trackIds.length });
    const id = trackIds[p]!;
    let idx = members.subarray(starts[p]!, starts[p + 1]!);
    const m = idx.length;
    const fail = (reason: string, i: number, column?: TrackColumn, value?: unknown) =>
      problems.push({ trackId: id, reason, row: row[i]!, column: column ? names[column] : undefined, value, rows: m });

    // Required values present and finite (first offending row in file order).
    let badK = m;
    let badC: TrackColumn = timeCol;
    for (const c of [timeCol, "x", "y"] as const) {
      const a = col[c]!;
      for (let k = 0; k < badK; k++)
        if (!Number.isFinite(a[idx[k]!]!)) {
          badK = k;
          badC = c;
          break;
        }
    }
    if (badK < m) {
      const i = idx[badK]!;
      const isEmpty = empty[badC]?.[i] === 1;
      fail(isEmpty ? `${badC} is empty` : `${badC} is not a finite number`, i, badC, isEmpty ? "" : col[badC]![i]);
      continue;
    }
    let bad = false;

    // Time order: strictly increasing in file order, or (sortWithinTracks) sorted here and unique.
    if (o.sortWithinTracks) {
      idx = Int32Array.from(idx).sort((a, b) => tRaw[a]! - tRaw[b]! || row[a]! - row[b]!);
      for (let k = 1; k < m; k++)
        if (tRaw[idx[k]!] === tRaw[idx[k - 1]!]) {
          fail(`duplicate time: ${timeCol}=${tRaw[idx[k]!]} also at row ${row[idx[k - 1]!]}`, idx[k]!, timeCol, tRaw[idx[k]!]);
          bad = true;
          break;
        }
    } else {
      for (let k = 1; k < m; k++) {
        const a = tRaw[idx[k - 1]!]!;
        const b = tRaw[idx[k]!]!;
        if (b <= a) {
          fail(
            b === a
              ? `duplicate time: ${timeCol}=${b} also at row ${row[idx[k - 1]!]}`
              : `time goes backwards: ${timeCol}=${b} after ${timeCol}=${a} at row ${row[idx[k - 1]!]}`,
            idx[k]!,
            timeCol,
            b,
          );
          bad = true;
          break;
        }
      }
    }
    if (bad) continue;

    const t = new Float64Array(m);
    const x = new Float64Array(m);
    const y = new Float64Array(m);
    const px = col.x!;
    const py = col.y!;
    for (let k = 0; k < m; k++) {
      const i = idx[k]!;
      t[k] = toSI(tRaw[i]!, tRatio);
      x[k] = mirror * toSI(px[i]!, u.position);
      y[k] = mirror * toSI(py[i]!, u.position);
    }

    // Motion: the file's columns where present and finite for the whole track, derived otherwise.
    let derived: Motion | undefined;
    // Derived acceleration over a stretch shorter than its window is noise-dominated (warned about
    // below): not evidence of an implausible acceleration.
    let noisyAccel = false;
    const motion: Partial<Record<"vx" | "vy" | "ax" | "ay", Float64Array>> = {};
    for (const c of KINEMATIC) {
      const src = col[c];
      const f = c[0] === "v" ? u.speed : u.acceleration;
      if (src !== undefined) {
        const out = new Float64Array(m);
        let ok = true;
        for (let k = 0; k < m; k++) {
          const v = src[idx[k]!]!;
          if (!Number.isFinite(v)) {
            ok = false;
            break;
          }
          out[k] = mirror * toSI(v, f);
        }
        if (ok) {
          motion[c] = out;
          continue;
        }
        derivedCounts[c] = (derivedCounts[c] ?? 0) + 1;
      }
      derived ??= deriveMotion({ t, x, y }, { ...o.motion, smoothPositions: false });
      motion[c] = derived[c];
    }
    if (derived) {
      // A lone sample (track of one row, or one cut off by gaps on both sides) has no derivative.
      const used = KINEMATIC.filter((c) => motion[c] === derived![c]);
      const lone = used.length > 0 ? firstNonFinite(derived[used[0]!]) : -1;
      if (lone >= 0) {
        fail(
          m === 1
            ? `only one sample: speed and acceleration cannot be derived`
            : `sample isolated by time gaps on both sides: speed and acceleration cannot be derived`,
          idx[lone]!,
          timeCol,
          tRaw[idx[lone]!],
        );
        continue;
      }
      if (motion.ax === derived.ax && hasShortRun(t, o.motion)) {
        shortDerived++;
        noisyAccel = true;
      }
    }

    // Lanes.
    let lane: Int32Array;
    if (o.lanes === "file") {
      const src = col.lane!;
      lane = new Int32Array(m);
      for (let k = 0; k < m; k++) {
        const i = idx[k]!;
        const v = src[i]!;
        if (!Number.isInteger(v) || v < -1)
          throw new InputError(`lane should be an integer >= -1 (0 = rightmost lane, -1 = outside) with lanes: "file"`, {
            file,
            row: row[i],
            column: names.lane,
            value: empty.lane?.[i] ? "" : v,
          });
        lane[k] = v;
      }
    } else {
      lane = assignLanes(y, o.roadFrame.laneMarkings);
      const src = col.lane;
      if (src) for (let k = 0; k < m; k++) if (src[idx[k]!] !== lane[k]) laneDisagree++;
    }

    // Kind and size (per track: the first row's kind, the median of the given sizes).
    let kind: ObjectKind = "other";
    if (col.kind) {
      const code = col.kind[idx[0]!]!;
      if (code < KIND_CODES.length) kind = KIND_CODES[code]!;
      else if (code === KIND_EMPTY) kindDefaulted.empty++;
      else kindDefaulted.unrecognised++;
    }
    let length = toSI(medianPositive(col.length, idx), u.size);
    let width = toSI(medianPositive(col.width, idx), u.size);
    if (!(length > 0) || !(width > 0)) {
      sizeDefaulted++;
      if (!(length > 0)) length = DEFAULT_SIZES[kind].length;
      if (!(width > 0)) width = DEFAULT_SIZES[kind].width;
    }

    plaus.track(id, t, x, y, motion as Required<typeof motion>, (k) => row[idx[k]!]!, noisyAccel);
    tracks.push({
      id,
      recording: o.recording,
      kind,
      length,
      width,
      t,
      x,
      y,
      vx: motion.vx!,
      vy: motion.vy!,
      ax: motion.ax!,
      ay: motion.ay!,
      lane,
    });
  }
  progress?.({ stage: "tracks", done: trackIds.length, total: trackIds.length });

  // Problems: fail on the earliest one, or reject the tracks and say so loudly.
  problems.sort((a, b) => a.row - b.row);
  if (problems.length > 0 && o.onBadTrack === "fail") {
    const p = problems[0]!;
    const more = problems.length > 1 ? `; ${problems.length} tracks have problems in all` : "";
    throw new InputError(
      `track ${p.trackId}: ${p.reason}${more}. ${/time goes backwards/.test(p.reason) ? `Sort each track's rows by time (CLI --sort-rows, API sortWithinTracks: true), fix the file, ` : "Fix the file, "}or leave such tracks out (CLI --on-bad-track reject, API onBadTrack: "reject"; they are then listed as rejected)`,
      { file, row: p.row, column: p.column, value: p.value },
    );
  }
  warnings.push(...plaus.finish());
  const rejected: RejectedTrack[] = problems
    .sort((a, b) => a.trackId - b.trackId)
    .map((p) => ({ trackId: p.trackId, reason: p.reason, row: p.row, rows: p.rows }));
  if (rejected.length > 0) {
    const rowsLost = rejected.reduce((s, r) => s + r.rows, 0);
    const first = problems.slice().sort((a, b) => a.row - b.row)[0]!;
    warnings.push(
      `REJECTED ${rejected.length} of ${trackIds.length} tracks (${rowsLost} rows) that failed validation; first: track ${first.trackId}, row ${first.row}: ${first.reason}. See Recording.rejected`,
    );
  }
  if (shortDerived > 0)
    warnings.push(
      `${shortDerived} tracks have a stretch shorter than the acceleration smoothing window (${o.motion.accelWindowS ?? DERIVE_MOTION_DEFAULTS.accelWindowS} s); their derived acceleration there comes from a shorter window and is noisier`,
    );
  if (laneDisagree > 0) {
    const kept = tracks.reduce((s, t) => s + t.t.length, 0);
    warnings.push(
      `column "${names.lane}" ignored: lanes are assigned from road.laneMarkings, and the file's lane ids differ from them in ${laneDisagree} of ${kept} rows (option lanes: "file" uses the file's ids)`,
    );
  }
  for (const c of KINEMATIC)
    if (derivedCounts[c])
      warnings.push(`${names[c]}: empty or non-finite values in ${derivedCounts[c]} tracks; ${c} derived from positions for those tracks`);
  if (sizeDefaulted > 0) {
    const which = col.length === undefined && col.width === undefined ? "the file has no length/width columns" : "length/width missing or not positive";
    warnings.push(
      `${which}: default sizes per kind used for ${sizeDefaulted} of ${tracks.length} tracks (${Object.entries(DEFAULT_SIZES)
        .map(([k, s]) => `${k} ${s.length} × ${s.width} m`)
        .join(", ")})`,
    );
  }
  if (!col.kind) warnings.push(`the file has no kind column: all ${tracks.length} tracks are kind "other"`);
  if (kindDefaulted.empty > 0) warnings.push(`${names.kind}: empty for ${kindDefaulted.empty} tracks, taken as "other"`);
  if (kindDefaulted.unrecognised > 0)
    warnings.push(
      `${names.kind}: unrecognised kind for ${kindDefaulted.unrecognised} tracks, taken as "other" (values: ${raw.unrecognisedKinds
        .map((k) => JSON.stringify(k))
        .join(", ")})`,
    );
  return { tracks, rejected, warnings };
}

/**
 * Memory bounded before allocation: the scene stage puts every sample on one frame clock (frame =
 * round(t · frameRate), Int32 frame numbers, about 16 bytes per frame of the recording's span). A
 * span and frame rate that need more than a quarter of this machine's memory, or frame numbers past
 * 2^31, are an error here, even when the frame rate was accepted on purpose.
 */
function guardFrameClock(tRaw: Float64Array, ratio: Ratio, frameRate: number, file: string): void {
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = 0; i < tRaw.length; i++) {
    const v = tRaw[i]!;
    if (v < lo) lo = v;
    if (v > hi) hi = v;
  }
  if (!(hi >= lo)) return;
  const a = toSI(lo, ratio);
  const b = toSI(hi, ratio);
  const frames = (b - a) * frameRate;
  const edge = Math.max(Math.abs(a), Math.abs(b)) * frameRate;
  const bytes = 16 * frames;
  const limit = totalmem() / 4;
  if (!(edge < 2 ** 31 - 1) || !(bytes < limit))
    throw new InputError(
      `times from ${a} s to ${b} s at ${frameRate} Hz make ${frames.toExponential(2)} frames (about ${(bytes / 2 ** 30).toFixed(1)} GiB for the frame clock, frame numbers up to ${edge.toExponential(2)}), more than this machine can hold (limit ${(limit / 2 ** 30).toFixed(1)} GiB, 2^31 frames); check the time unit and the frame rate`,
      { file },
    );
}

/** Whether some contiguous run of t is shorter than the acceleration window deriveMotion would use. */
function hasShortRun(t: Float64Array, motion: DeriveMotionOptions): boolean {
  const dt = medianStep(t);
  if (!(dt > 0)) return true;
  const d = DERIVE_MOTION_DEFAULTS;
  const w = windowSamples(motion.accelWindowS ?? d.accelWindowS, dt, motion.order ?? d.order);
  for (const [a, b] of splitAtGaps(t, (motion.maxGapFactor ?? d.maxGapFactor) * dt)) if (b - a < w) return true;
  return false;
}

function firstNonFinite(a: Float64Array): number {
  for (let i = 0; i < a.length; i++) if (!Number.isFinite(a[i]!)) return i;
  return -1;
}

function medianPositive(src: Float64Array | undefined, idx: Int32Array): number {
  if (!src) return NaN;
  // Usually one value repeated on every row: skip the sort then.
  const first = src[idx[0]!]!;
  let same = first > 0 && Number.isFinite(first);
  for (let k = 1; k < idx.length && same; k++) same = src[idx[k]!] === first;
  if (same) return first;
  const buf = new Float64Array(idx.length);
  let c = 0;
  for (let k = 0; k < idx.length; k++) {
    const v = src[idx[k]!]!;
    if (v > 0 && Number.isFinite(v)) buf[c++] = v;
  }
  if (c === 0) return NaN;
  const vals = buf.subarray(0, c).sort();
  const h = c >> 1;
  return c % 2 === 1 ? vals[h]! : 0.5 * (vals[h - 1]! + vals[h]!);
}
