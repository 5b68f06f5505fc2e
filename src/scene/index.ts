/** Neighbours in eight slots around every ego, criticality and events. */
export { SLOTS, SCENE_EVENTS } from "./slots.js";
export type { Slot, SceneEventKind } from "./slots.js";
export { buildScenes } from "./buildScenes.js";
export { timeToCollision, timeHeadway, drac } from "./criticality.js";
export { resolveSceneOptions, SCENE_DEFAULTS } from "./options.js";
export type { SceneOptions, ResolvedSceneOptions } from "./options.js";
export { FLAG_TTC, FLAG_THW, FLAG_HARSH_BRAKING } from "./types.js";
export type { EgoScene, SceneEvent } from "./types.js";
export { buildFrameIndex } from "./frameIndex.js";
export type { FrameIndex } from "./frameIndex.js";
