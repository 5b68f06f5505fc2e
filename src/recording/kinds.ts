import type { ObjectKind } from "./types.js";

/** Kind codes used between the SQL scan and the track builder. */
export const KIND_CODES: readonly ObjectKind[] = ["car", "truck", "motorcycle", "other"];
/** Code for a kind name we do not recognise (kept as "other", listed in a warning). */
export const KIND_UNRECOGNISED = 4;
/** Code for an empty kind cell. */
export const KIND_EMPTY = 5;

/**
 * Accepted kind names (compared trimmed and lower-case). A few common synonyms map onto our four
 * classes; anything else becomes "other" with a warning.
 */
export const KIND_NAMES: Readonly<Record<string, ObjectKind>> = {
  car: "car",
  van: "car",
  "passenger car": "car",
  truck: "truck",
  lorry: "truck",
  bus: "truck",
  motorcycle: "motorcycle",
  motorbike: "motorcycle",
  other: "other",
};

/**
 * Vehicle dimensions (length, width in m) used when the file has none for a track. Typical values,
 * common practice (from memory): a mid-size car about 4.5 × 1.8 m, a European articulated truck up
 * to 16.5 × 2.55 m with rigid trucks shorter (12 m is a middle value), a motorcycle about 2.2 × 0.8 m.
 */
export const DEFAULT_SIZES: Readonly<Record<ObjectKind, { length: number; width: number }>> = {
  car: { length: 4.5, width: 1.8 },
  truck: { length: 12.0, width: 2.5 },
  motorcycle: { length: 2.2, width: 0.8 },
  other: { length: 4.5, width: 1.8 },
};
