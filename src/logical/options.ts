import { InputError } from "../core/errors.js";

/** Options of {@link measureScenarioParameters} (classification and measurement). */
export interface MeasureOptions {
  /** A leader decelerating harder than this makes the window "leader-braking" (m/s², default 3, common practice for strong braking). */
  leaderBrakeDecel?: number;
  /** A leader counts for "following" within this time headway (s, default 3, common practice). */
  followHeadway?: number;
  /** …for at least this share of the window's samples (default 0.5). */
  followShare?: number;
  /** Mean ego speed below this makes the window "slow-traffic" (m/s, default 60 km/h). */
  slowSpeed?: number;
  /** Windows shorter than this cannot be judged: class "other" (s, default 1). */
  minWindowSeconds?: number;
  /** Egos observed for less than this in total cannot be judged: class "other" (s, default 2). */
  minTrackSeconds?: number;
  /**
   * Accelerations beyond this (either sign) are measurement artefacts, not driving: they neither
   * make a window "leader-braking" nor enter a parameter (m/s², default 12: about 1.2 g, beyond
   * what tyres on a dry road give; common practice, no source — the same bound as the critical events').
   */
  maxAccel?: number;
}

export type ResolvedMeasureOptions = Required<MeasureOptions>;

export const MEASURE_DEFAULTS: Readonly<ResolvedMeasureOptions> = Object.freeze({
  leaderBrakeDecel: 3,
  followHeadway: 3,
  followShare: 0.5,
  slowSpeed: 60 / 3.6,
  minWindowSeconds: 1,
  minTrackSeconds: 2,
  maxAccel: 12,
});

export function resolveMeasureOptions(options: MeasureOptions = {}): ResolvedMeasureOptions {
  const o = { ...MEASURE_DEFAULTS } as ResolvedMeasureOptions;
  for (const [k, v] of Object.entries(options)) {
    if (v === undefined) continue;
    if (!(k in MEASURE_DEFAULTS)) throw new InputError(`unknown measurement option "${k}"`, { column: k });
    if (typeof v !== "number" || !Number.isFinite(v) || v < 0) throw new InputError(`${k}=${JSON.stringify(v)} should be a finite number >= 0`, { column: k, value: String(v) });
    (o as Record<string, number>)[k] = v;
  }
  if (o.followShare > 1) throw new InputError(`followShare=${o.followShare} should be a share in [0, 1]`, { column: "followShare", value: o.followShare });
  return o;
}
