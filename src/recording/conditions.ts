import { InputError } from "../core/errors.js";

/**
 * Conditions under which a recording was made: our own field names. Every field is optional. `site`
 * is free text; the others take a value from the vocabulary below (CONDITION_VOCABULARY), so that
 * two recordings of the same condition group together when shares are broken down by it.
 */
export interface RecordingConditions {
  /** Where the recording was made, free text (e.g. "Orrowind Motorway km 12"). */
  site?: string;
  roadType?: RoadType;
  trafficDensity?: TrafficDensity;
  timeOfDay?: TimeOfDay;
  weather?: Weather;
  lighting?: Lighting;
  recordingMethod?: RecordingMethod;
}

export type RoadType = "motorway" | "expressway" | "rural-road" | "urban-road" | "ramp" | "other";
export type TrafficDensity = "free-flow" | "light" | "moderate" | "dense" | "congested";
export type TimeOfDay = "night" | "morning" | "midday" | "afternoon" | "evening";
export type Weather = "clear" | "cloudy" | "rain" | "heavy-rain" | "fog" | "snow" | "other";
export type Lighting = "daylight" | "twilight" | "dark-lit" | "dark-unlit";
export type RecordingMethod = "aerial" | "roadside" | "vehicle" | "generated" | "other";

/** A condition field name. */
export type ConditionField = keyof RecordingConditions;

/** Field names in their fixed order (the order of catalogue columns and breakdown listings). */
export const CONDITION_FIELDS: readonly ConditionField[] = ["site", "roadType", "trafficDensity", "timeOfDay", "weather", "lighting", "recordingMethod"];

/**
 * Allowed values per field; null = free text. The vocabulary is ours, kept short on purpose: a
 * breakdown by a condition is only useful when recordings share its values.
 */
export const CONDITION_VOCABULARY: Readonly<Record<ConditionField, readonly string[] | null>> = {
  site: null,
  roadType: ["motorway", "expressway", "rural-road", "urban-road", "ramp", "other"],
  trafficDensity: ["free-flow", "light", "moderate", "dense", "congested"],
  timeOfDay: ["night", "morning", "midday", "afternoon", "evening"],
  weather: ["clear", "cloudy", "rain", "heavy-rain", "fog", "snow", "other"],
  lighting: ["daylight", "twilight", "dark-lit", "dark-unlit"],
  recordingMethod: ["aerial", "roadside", "vehicle", "generated", "other"],
};

/**
 * Validate a `conditions` object (from road.json or code). Errors name the file, the field
 * ("conditions.weather") and the value, and list the allowed values. Returns a clean copy with the
 * fields in CONDITION_FIELDS order; an unknown field is an error (a typo would otherwise make a
 * recording silently fall out of its group).
 */
export function validateConditions(value: unknown, file?: string): RecordingConditions {
  if (typeof value !== "object" || value === null || Array.isArray(value))
    throw new InputError(`field "conditions" should be an object with optional fields ${CONDITION_FIELDS.join(", ")}`, {
      file,
      column: "conditions",
      value: JSON.stringify(value),
    });
  const o = value as Record<string, unknown>;
  for (const k of Object.keys(o))
    if (!(CONDITION_FIELDS as readonly string[]).includes(k))
      throw new InputError(`unknown condition field "${k}" (known: ${CONDITION_FIELDS.join(", ")})`, { file, column: `conditions.${k}`, value: JSON.stringify(o[k]) });
  const out: Record<string, string> = {};
  for (const f of CONDITION_FIELDS) {
    const v = o[f];
    if (v === undefined) continue;
    const vocab = CONDITION_VOCABULARY[f];
    if (typeof v !== "string" || v.trim() === "")
      throw new InputError(`condition "${f}" should be a non-empty string${vocab ? ` (one of ${vocab.join(", ")})` : ""}`, { file, column: `conditions.${f}`, value: JSON.stringify(v) });
    if (vocab && !vocab.includes(v))
      throw new InputError(`condition "${f}" should be one of ${vocab.join(", ")}`, { file, column: `conditions.${f}`, value: v });
    out[f] = v;
  }
  return out as RecordingConditions;
}

/** The value of a condition for display and grouping: the value, or "(not given)". */
export function conditionValue(c: RecordingConditions | undefined, field: ConditionField): string {
  return c?.[field] ?? NOT_GIVEN;
}

/** Group name used for recordings that do not state a condition. */
export const NOT_GIVEN = "(not given)";
