import { InputError } from "../core/errors.js";

/** Options of {@link buildScenes}; defaults documented in docs/scene.md. */
export interface SceneOptions {
  /** Frames with 0 <= TTC below this are flagged "ttc" (s). Default 1.5 (common practice). */
  ttcThreshold?: number;
  /** Frames with time headway below this are flagged "thw" (s). Default 0.9 (common practice). */
  thwThreshold?: number;
  /** Ego decelerating harder than this is flagged "harsh-braking" (m/s², positive). Default 3.0 (common practice). */
  harshDecel?: number;
  /**
   * A vehicle whose centre crosses into the ego lane ahead of the ego's centre counts as a cut-in
   * when the gap from its rear to the ego front is at most this (m). Default 50.
   */
  cutInMaxGap?: number;
  /** The leader leaving the ego lane counts as a cut-out when its gap is at most this (m). Default 50. */
  cutOutMaxGap?: number;
  /** Closing in on a slower leader: at least this closing speed (m/s). Default 2.0. */
  closingSpeed?: number;
  /** …and a time-to-collision at most this (s). Default 8. */
  closingTtc?: number;
  /** …held for at least this long (s). Default 1.0. */
  closingMinS?: number;
  /** The same event with the same other vehicle is not repeated within this time (s). Default 5. */
  refractoryS?: number;
  /** Frame rate used to put samples on a common frame clock (Hz). Default: the recording's. */
  frameRate?: number;
}

export type ResolvedSceneOptions = Required<SceneOptions>;

export const SCENE_DEFAULTS: Readonly<Omit<ResolvedSceneOptions, "frameRate">> = Object.freeze({
  ttcThreshold: 1.5,
  thwThreshold: 0.9,
  harshDecel: 3.0,
  cutInMaxGap: 50,
  cutOutMaxGap: 50,
  closingSpeed: 2.0,
  closingTtc: 8,
  closingMinS: 1.0,
  refractoryS: 5,
});

export function resolveSceneOptions(options: SceneOptions, recordingFrameRate: number): ResolvedSceneOptions {
  const o: ResolvedSceneOptions = { ...SCENE_DEFAULTS, frameRate: recordingFrameRate };
  for (const [k, v] of Object.entries(options)) if (v !== undefined) (o as unknown as Record<string, unknown>)[k] = v;
  for (const [k, v] of Object.entries(o)) {
    if (typeof v !== "number" || !Number.isFinite(v) || !(v > 0))
      throw new InputError(`${k}=${String(v)} should be a finite number > 0`);
  }
  return o;
}
