import { renameDeprecated } from "../core/aliases.js";
import { InputError } from "../core/errors.js";

/**
 * Options of {@link buildScenes}; defaults documented in docs/scene.md. Thresholds are named after
 * the quantity and the comparison (ttcBelow, decelAbove), the same names as the plan's options.
 */
export interface SceneOptions {
  /** Frames with 0 <= TTC below this are flagged "ttc" (s). Default 1.5 (common practice). */
  ttcBelow?: number;
  /** Frames with time headway below this are flagged "thw" (s). Default 0.9 (common practice). */
  thwBelow?: number;
  /** Ego decelerating harder than this is flagged "harsh-braking" (m/s², positive). Default 3.0 (common practice). */
  decelAbove?: number;
  /** @deprecated use ttcBelow (accepted for one version). */
  ttcThreshold?: number;
  /** @deprecated use thwBelow (accepted for one version). */
  thwThreshold?: number;
  /** @deprecated use decelAbove (accepted for one version). */
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

export type ResolvedSceneOptions = Required<Omit<SceneOptions, "ttcThreshold" | "thwThreshold" | "harshDecel">>;

/** The old option names and their new ones. */
export const SCENE_RENAMED: Readonly<Record<string, string>> = Object.freeze({ ttcThreshold: "ttcBelow", thwThreshold: "thwBelow", harshDecel: "decelAbove" });

export const SCENE_DEFAULTS: Readonly<Omit<ResolvedSceneOptions, "frameRate">> = Object.freeze({
  ttcBelow: 1.5,
  thwBelow: 0.9,
  decelAbove: 3.0,
  cutInMaxGap: 50,
  cutOutMaxGap: 50,
  closingSpeed: 2.0,
  closingTtc: 8,
  closingMinS: 1.0,
  refractoryS: 5,
});

export function resolveSceneOptions(options: SceneOptions, recordingFrameRate: number): ResolvedSceneOptions {
  const o: ResolvedSceneOptions = { ...SCENE_DEFAULTS, frameRate: recordingFrameRate };
  for (const [k, v] of Object.entries(renameDeprecated(options, SCENE_RENAMED, "scene options"))) if (v !== undefined) (o as unknown as Record<string, unknown>)[k] = v;
  for (const [k, v] of Object.entries(o)) {
    if (typeof v !== "number" || !Number.isFinite(v) || !(v > 0))
      throw new InputError(`${k}=${String(v)} should be a finite number > 0`);
  }
  return o;
}
