import { renameDeprecated } from "../core/aliases.js";
import { DEFAULTS } from "../core/defaults.js";
import { InputError } from "../core/errors.js";
import type { Scenario } from "../scenario/types.js";
import { compensatedSum } from "./compensatedSum.js";
import {
  EXPOSURE_AID_NOTE,
  exposureClassByFrequency,
  exposureClassByTimeShare,
  type DurationClass,
  type FrequencyReading,
} from "./exposureClass.js";
import { checkLevel, poissonRate } from "./poissonInterval.js";

/** Options shared by every exposure figure. */
export interface ExposureOptions {
  /** Confidence level of the rate intervals (default DEFAULTS.confidence = 0.95). */
  confidence?: number;
  /** @deprecated use confidence (accepted for one version). */
  level?: number;
  /** Drives per year of an average driver; enables the E1–E3 frequency readings (default: unknown). */
  drivesPerYear?: number;
  /**
   * Length of a typical drive (km). When given, the per-drive probability is 1 − exp(−rate · km);
   * otherwise it is the observed share of ego drives (recording + ego track) containing the situation.
   * Give it for short stationary-sensor recordings, where one "drive" is a single pass of the section.
   */
  typicalDriveKm?: number;
  /** Per-drive probability read as "almost every drive" (default 0.9). */
  almostEveryDrive?: number;
}

interface ExposureDefaults {
  confidence: number;
  almostEveryDrive: number;
}
export type ResolvedExposureOptions = ExposureDefaults & Omit<ExposureOptions, keyof ExposureDefaults | "level">;

export const EXPOSURE_DEFAULTS: Readonly<ExposureDefaults> = { confidence: DEFAULTS.confidence, almostEveryDrive: 0.9 };

/** Resolve and validate exposure options once. */
export function resolveExposureOptions(options: ExposureOptions = {}): ResolvedExposureOptions {
  const o: ResolvedExposureOptions = { ...EXPOSURE_DEFAULTS, ...stripUndefined(renameDeprecated(options, { level: "confidence" }, "exposure options")) };
  checkLevel(o.confidence);
  if (!(o.almostEveryDrive > 0 && o.almostEveryDrive <= 1))
    throw new InputError(`almostEveryDrive=${o.almostEveryDrive} should be in (0, 1]`, { column: "almostEveryDrive", value: o.almostEveryDrive });
  if (o.drivesPerYear !== undefined && !(o.drivesPerYear > 0 && Number.isFinite(o.drivesPerYear)))
    throw new InputError(`drivesPerYear=${o.drivesPerYear} should be a finite number > 0`, { column: "drivesPerYear", value: o.drivesPerYear });
  if (o.typicalDriveKm !== undefined && !(o.typicalDriveKm > 0 && Number.isFinite(o.typicalDriveKm)))
    throw new InputError(`typicalDriveKm=${o.typicalDriveKm} should be a finite number > 0`, { column: "typicalDriveKm", value: o.typicalDriveKm });
  return o;
}

export function stripUndefined<T extends object>(o: T): Partial<T> {
  const out: Partial<T> = {};
  for (const k of Object.keys(o) as (keyof T)[]) if (o[k] !== undefined) out[k] = o[k];
  return out;
}

/** Catalogue totals and per-scenario arrays, computed once and shared by every exposure figure. */
export interface ExposureContext {
  n: number;
  km: Float64Array;
  seconds: Float64Array;
  totalKm: number;
  totalSeconds: number;
  /** Drive index (distinct recording + ego track) of each scenario. */
  driveOf: Int32Array;
  drives: number;
  options: ResolvedExposureOptions;
}

/**
 * Build the shared context. Throws InputError for an empty catalogue, a scenario with negative or
 * non-finite km/seconds, or a catalogue whose km or seconds add up to 0.
 */
export function exposureContext(scenarios: readonly Scenario[], options: ExposureOptions = {}): ExposureContext {
  const o = resolveExposureOptions(options);
  const n = scenarios.length;
  if (n === 0) throw new InputError("the scenario catalogue is empty; exposure needs at least one scenario");
  const km = new Float64Array(n);
  const seconds = new Float64Array(n);
  const driveOf = new Int32Array(n);
  const driveIds = new Map<string, number>();
  for (let i = 0; i < n; i++) {
    const s = scenarios[i]!;
    if (!(s.km >= 0) || !Number.isFinite(s.km))
      throw new InputError(`scenario ${i} ("${s.id}") has km=${s.km}; expected a finite number >= 0`, { column: "km", value: s.km });
    if (!(s.seconds >= 0) || !Number.isFinite(s.seconds))
      throw new InputError(`scenario ${i} ("${s.id}") has seconds=${s.seconds}; expected a finite number >= 0`, { column: "seconds", value: s.seconds });
    km[i] = s.km;
    seconds[i] = s.seconds;
    const key = `${s.recording}\u0000${s.egoTrack}`;
    let d = driveIds.get(key);
    if (d === undefined) {
      d = driveIds.size;
      driveIds.set(key, d);
    }
    driveOf[i] = d;
  }
  const totalKm = compensatedSum(km);
  const totalSeconds = compensatedSum(seconds);
  if (!(totalKm > 0)) throw new InputError(`the scenarios add up to ${totalKm} km; shares of vehicle-kilometres need a total > 0`);
  if (!(totalSeconds > 0)) throw new InputError(`the scenarios add up to ${totalSeconds} s; shares of time need a total > 0`);
  return { n, km, seconds, totalKm, totalSeconds, driveOf, drives: driveIds.size, options: o };
}

/** Rate per 1000 km with its exact interval. */
export interface RatePer1000km {
  rate: number;
  lower: number;
  upper: number;
  level: number;
}

/** What a set of scenarios (a cluster, a test case) stands for. */
export interface ExposureFigures {
  /** Number of scenarios (occurrences) in the set. */
  scenarios: number;
  km: number;
  hours: number;
  /** Share of the recorded vehicle-kilometres (fraction). */
  share: number;
  /** Share of the recorded time (fraction). */
  timeShare: number;
  /** Distinct ego drives containing at least one scenario of the set, and their share of all drives. */
  drives: number;
  driveShare: number;
  /** Occurrences per 1000 km with the exact Poisson (Garwood) interval. */
  ratePer1000km: RatePer1000km;
  /** ISO 26262-3 class by share of operating time (an aid, see exposureNote). */
  exposureClass: DurationClass;
  /** Frequency reading in Table B.3 wording, where the basis is known. */
  frequency: FrequencyReading;
}

export const exposureNote = EXPOSURE_AID_NOTE;

/** Exposure figures of the scenarios at `indices` (each index counted once; duplicates are an error). */
export function describeExposure(ctx: ExposureContext, indices: ArrayLike<number>): ExposureFigures {
  const m = indices.length;
  const seenDrive = new Set<number>();
  for (let k = 0; k < m; k++) {
    const i = indices[k]!;
    if (!(Number.isInteger(i) && i >= 0 && i < ctx.n)) throw new InputError(`scenario index ${i} is outside [0, ${ctx.n})`);
    seenDrive.add(ctx.driveOf[i]!);
  }
  const km = compensatedSum(ctx.km, indices);
  const seconds = compensatedSum(ctx.seconds, indices);
  const share = km / ctx.totalKm;
  const timeShare = seconds / ctx.totalSeconds;
  const rate = poissonRate(m, ctx.totalKm, 1000, ctx.options.confidence);
  const o = ctx.options;
  const perDrive =
    o.typicalDriveKm !== undefined
      ? { occurrencesPerDrive: (m / ctx.totalKm) * o.typicalDriveKm, probabilityPerDrive: -Math.expm1(-(m / ctx.totalKm) * o.typicalDriveKm) }
      : { occurrencesPerDrive: m / ctx.drives, probabilityPerDrive: seenDrive.size / ctx.drives };
  return {
    scenarios: m,
    km,
    hours: seconds / 3600,
    share,
    timeShare,
    drives: seenDrive.size,
    driveShare: seenDrive.size / ctx.drives,
    ratePer1000km: { rate: rate.rate, lower: rate.lower, upper: rate.upper, level: rate.level },
    exposureClass: exposureClassByTimeShare(Math.min(1, timeShare)),
    frequency: exposureClassByFrequency({ ...perDrive, drivesPerYear: o.drivesPerYear, almostEveryDrive: o.almostEveryDrive }),
  };
}
