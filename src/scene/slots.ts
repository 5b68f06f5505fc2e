/**
 * The eight neighbour slots around an ego, in a fixed order used by every per-slot array
 * (slot-major arrays have index frame * SLOTS.length + slot).
 * "alongside" means the neighbour's extent overlaps the ego's along x.
 */
export const SLOTS = [
  "ahead",
  "behind",
  "left-ahead",
  "left-alongside",
  "left-behind",
  "right-ahead",
  "right-alongside",
  "right-behind",
] as const;
export type Slot = (typeof SLOTS)[number];

/** Events between an ego and its neighbours. */
export const SCENE_EVENTS = ["cut-in", "cut-out", "overtaken", "closing-in"] as const;
export type SceneEventKind = (typeof SCENE_EVENTS)[number];
