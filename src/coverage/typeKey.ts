import { InputError } from "../core/errors.js";
import { LATERAL, LONGITUDINAL, type LateralManeuver, type LongitudinalManeuver } from "../maneuvers/labels.js";
import { SCENE_EVENTS, SLOTS } from "../scene/slots.js";
import type { Scenario } from "../scenario/types.js";

/**
 * A scenario's type key: a short, readable, deterministic signature of what happens in the window,
 * used beside the clusters to count kinds of situation. Four parts joined by "|":
 *
 *   <lateral>|<longitudinal>|occ:<occupancy>|ev:<events>       e.g. "LCL|A|occ:ahead,left|ev:cut-in"
 *
 * - lateral ("lane-changes", default): the ego's lane changes in order, LCL left and LCR right,
 *   joined by ">"; "LK" when it kept its lane. "sequence": every lateral maneuver in order
 *   (LK lane keep, LCL, LCR) as extraction collapsed them. A sequence longer than `maxManeuvers`
 *   keeps its first `maxManeuvers` codes and ends in "…" ("+" only ever means "and", as in "A+D").
 * - longitudinal ("set", default): which of accelerate (A) and decelerate (D) occur, "A", "D" or
 *   "A+D", and "K" when the ego only kept its speed; "sequence": every longitudinal maneuver in
 *   order (K, A, D) joined by ">"; "none" leaves the part out (the key then has three parts).
 * - occ ("sides", default): which of ahead, behind, left (any left-lane slot), right (any right-lane
 *   slot) is occupied; "slots": the SLOTS names. A slot counts as occupied when its occupancy share
 *   is above `occupiedAbove`. "-" when none.
 * - ev: the scene event kinds seen in the window (SCENE_EVENTS order), then the criticality flags
 *   (alphabetical) when `includeFlags`; each listed once; "-" if none.
 *
 * The defaults are deliberately coarse: a key that tells every detail apart makes most windows a
 * kind of their own, and then "seen once" no longer means "rare".
 */
export interface TypeKeyOptions {
  /** Lateral part (default "lane-changes"). */
  lateral?: "lane-changes" | "sequence";
  /** Longitudinal part (default "set"). */
  longitudinal?: "set" | "sequence" | "none";
  /** Occupancy part (default "sides"). */
  occupancy?: "sides" | "slots";
  /** A slot counts as occupied when its occupancy share is strictly above this (default 0.5). */
  occupiedAbove?: number;
  /** Longest sequence kept before it is cut and marked "…" (default 3). */
  maxManeuvers?: number;
  /** Append the scenario's criticality flags (e.g. "harsh-braking") to the events (default true). */
  includeFlags?: boolean;
}

interface TypeKeyDefaults {
  lateral: "lane-changes" | "sequence";
  longitudinal: "set" | "sequence" | "none";
  occupancy: "sides" | "slots";
  occupiedAbove: number;
  maxManeuvers: number;
  includeFlags: boolean;
}
export type ResolvedTypeKeyOptions = Required<TypeKeyDefaults>;

export const TYPE_KEY_DEFAULTS: Readonly<TypeKeyDefaults> = {
  lateral: "lane-changes",
  longitudinal: "set",
  occupancy: "sides",
  occupiedAbove: 0.5,
  maxManeuvers: 3,
  includeFlags: true,
};

export const LATERAL_CODES: Readonly<Record<LateralManeuver, string>> = {
  "lane-keep": "LK",
  "lane-change-left": "LCL",
  "lane-change-right": "LCR",
};
export const LONGITUDINAL_CODES: Readonly<Record<LongitudinalManeuver, string>> = {
  keep: "K",
  accelerate: "A",
  decelerate: "D",
};

export function resolveTypeKeyOptions(options: TypeKeyOptions = {}): ResolvedTypeKeyOptions {
  const o = { ...TYPE_KEY_DEFAULTS };
  for (const k of Object.keys(options) as (keyof TypeKeyOptions)[]) if (options[k] !== undefined) (o as Record<string, unknown>)[k] = options[k];
  if (!(o.occupiedAbove >= 0 && o.occupiedAbove < 1))
    throw new InputError(`occupiedAbove=${o.occupiedAbove} should be a share in [0, 1)`, { column: "occupiedAbove", value: o.occupiedAbove });
  if (!(Number.isInteger(o.maxManeuvers) && o.maxManeuvers >= 1))
    throw new InputError(`maxManeuvers=${o.maxManeuvers} should be an integer >= 1`, { column: "maxManeuvers", value: o.maxManeuvers });
  if (o.lateral !== "lane-changes" && o.lateral !== "sequence")
    throw new InputError(`lateral="${String(o.lateral)}" should be "lane-changes" or "sequence"`, { column: "lateral", value: o.lateral });
  if (o.longitudinal !== "set" && o.longitudinal !== "sequence" && o.longitudinal !== "none")
    throw new InputError(`longitudinal="${String(o.longitudinal)}" should be "set", "sequence" or "none"`, { column: "longitudinal", value: o.longitudinal });
  if (o.occupancy !== "sides" && o.occupancy !== "slots")
    throw new InputError(`occupancy="${String(o.occupancy)}" should be "sides" or "slots"`, { column: "occupancy", value: o.occupancy });
  return o;
}

function sequence(codes: string[], max: number): string {
  if (codes.length === 0) return "-";
  return codes.length > max ? `${codes.slice(0, max).join(">")}…` : codes.join(">");
}

const SIDES = ["ahead", "behind", "left", "right"] as const;
/** Side of each slot in SLOTS order. */
const SLOT_SIDE = SLOTS.map((slot) => (slot.startsWith("left") ? "left" : slot.startsWith("right") ? "right" : slot));

/** The type key of one scenario (see the module comment for the grammar). */
export function scenarioTypeKey(s: Scenario, options: TypeKeyOptions | ResolvedTypeKeyOptions = {}): string {
  const o = resolveTypeKeyOptions(options);
  const lat = s.lateral.map((m) => {
    const c = LATERAL_CODES[m];
    if (c === undefined) throw new InputError(`scenario "${s.id}" has lateral maneuver "${m}"; expected one of ${LATERAL.join(", ")}`, { column: "lateral", value: m });
    return c;
  });
  const parts: string[] = [];
  if (o.lateral === "sequence") parts.push(sequence(lat, o.maxManeuvers));
  else {
    const changes = lat.filter((c) => c !== "LK");
    parts.push(changes.length === 0 ? "LK" : sequence(changes, o.maxManeuvers));
  }
  if (o.longitudinal !== "none") {
    const lon = s.longitudinal.map((m) => {
      const c = LONGITUDINAL_CODES[m];
      if (c === undefined)
        throw new InputError(`scenario "${s.id}" has longitudinal maneuver "${m}"; expected one of ${LONGITUDINAL.join(", ")}`, { column: "longitudinal", value: m });
      return c;
    });
    if (o.longitudinal === "sequence") parts.push(sequence(lon, o.maxManeuvers));
    else {
      const present = ["A", "D"].filter((c) => lon.includes(c));
      parts.push(present.length === 0 ? "K" : present.join("+"));
    }
  }
  if (s.slotOccupancy.length !== SLOTS.length)
    throw new InputError(`scenario "${s.id}" has ${s.slotOccupancy.length} slot occupancy values; expected ${SLOTS.length} (SLOTS order)`, {
      column: "slotOccupancy",
      value: s.slotOccupancy.length,
    });
  const occupiedSlots = SLOTS.map((_, k) => s.slotOccupancy[k]! > o.occupiedAbove);
  const occ: string[] =
    o.occupancy === "slots" ? SLOTS.filter((_, k) => occupiedSlots[k]) : SIDES.filter((side) => SLOT_SIDE.some((sd, k) => sd === side && occupiedSlots[k]));
  parts.push(`occ:${occ.length > 0 ? occ.join(",") : "-"}`);
  const kinds = new Set(s.events.map((e) => e.kind as string));
  const ev: string[] = SCENE_EVENTS.filter((k) => kinds.has(k));
  const extra = [...kinds].filter((k) => !(SCENE_EVENTS as readonly string[]).includes(k)).sort();
  ev.push(...extra);
  if (o.includeFlags) for (const f of [...new Set(s.criticality.flags)].sort()) if (!ev.includes(f)) ev.push(f);
  parts.push(`ev:${ev.length > 0 ? ev.join(",") : "-"}`);
  return parts.join("|");
}

/** Type keys of a whole catalogue, options resolved once. */
export function scenarioTypeKeys(scenarios: readonly Scenario[], options: TypeKeyOptions = {}): string[] {
  const o = resolveTypeKeyOptions(options);
  return scenarios.map((s) => scenarioTypeKey(s, o));
}

/** The parts of a type key, for display and filtering. */
export interface TypeKeyParts {
  lateral: string[];
  longitudinal: string[] | null;
  /** True when a sequence was cut at maxManeuvers. */
  lateralCut: boolean;
  longitudinalCut: boolean;
  occupied: string[];
  events: string[];
}

/** Split a type key made by scenarioTypeKey back into its parts. */
export function parseTypeKey(key: string): TypeKeyParts {
  const parts = key.split("|");
  if (parts.length !== 3 && parts.length !== 4) throw new InputError(`type key "${key}" should have 3 or 4 parts separated by "|"`, { value: key });
  const seq = (p: string): { items: string[]; cut: boolean } => {
    const cut = p.endsWith("…");
    const body = cut ? p.slice(0, -1) : p;
    // "A+D" (a set) splits on "+", sequences on ">".
    return { items: body === "-" ? [] : body.split(/[>+]/), cut };
  };
  const list = (p: string, prefix: string): string[] => {
    if (!p.startsWith(prefix)) throw new InputError(`type key "${key}": part "${p}" should start with "${prefix}"`, { value: key });
    const body = p.slice(prefix.length);
    return body === "-" ? [] : body.split(",");
  };
  const lat = seq(parts[0]!);
  const lon = parts.length === 4 ? seq(parts[1]!) : null;
  return {
    lateral: lat.items,
    lateralCut: lat.cut,
    longitudinal: lon ? lon.items : null,
    longitudinalCut: lon ? lon.cut : false,
    occupied: list(parts[parts.length - 2]!, "occ:"),
    events: list(parts[parts.length - 1]!, "ev:"),
  };
}
