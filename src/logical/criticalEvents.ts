import { createHash } from "node:crypto";
import { InputError } from "../core/errors.js";
import { criticalReasons, moreCritical } from "../plan/criticality.js";
import type { ResolvedTestPlanOptions } from "../plan/options.js";
import type { Scenario } from "../scenario/types.js";

/** Options of {@link findCriticalEvents}. */
export interface CriticalEventOptions {
  /** Windows shorter than this are artefacts, never critical (s, default 1). */
  minWindowSeconds?: number;
  /** Egos observed for less than this are artefacts, never critical (s, default 2). */
  minTrackSeconds?: number;
  /**
   * Accelerations (ego or leader, either sign) beyond this are measurement artefacts (m/s², default
   * 12: about 1.2 g, beyond what tyres on a dry road can give; common practice, no source).
   */
  maxAccel?: number;
  /** Observations of one vehicle pair whose time spans come within this of each other are one event (s, default 2). */
  mergeSlack?: number;
}

export type ResolvedCriticalEventOptions = Required<CriticalEventOptions>;

export const CRITICAL_EVENT_DEFAULTS: Readonly<ResolvedCriticalEventOptions> = Object.freeze({
  minWindowSeconds: 1,
  minTrackSeconds: 2,
  maxAccel: 12,
  mergeSlack: 2,
});

export function resolveCriticalEventOptions(options: CriticalEventOptions = {}): ResolvedCriticalEventOptions {
  const o = { ...CRITICAL_EVENT_DEFAULTS } as ResolvedCriticalEventOptions;
  for (const [k, v] of Object.entries(options)) {
    if (v === undefined) continue;
    if (!(k in CRITICAL_EVENT_DEFAULTS)) throw new InputError(`unknown critical-event option "${k}"`, { column: k });
    if (typeof v !== "number" || !(v >= 0) || Number.isNaN(v)) throw new InputError(`${k}=${JSON.stringify(v)} should be a number >= 0`, { column: k, value: String(v) });
    (o as Record<string, number>)[k] = v;
  }
  return o;
}

/** One physical critical event: one vehicle pair, one stretch of time, however many windows saw it. */
export interface CriticalEvent {
  /** Derived from content: recording, the pair and the start time. */
  id: string;
  recording: string;
  /** The two track ids, ascending (one when the other vehicle is unknown). */
  tracks: number[];
  /** The vehicle behind in the pair (the one the situation threatens), when known. */
  follower: number | null;
  tFrom: number;
  tTo: number;
  /** Every plan rule that flagged one of its windows, in words with the numbers, deduplicated. */
  rules: string[];
  /** Worst figures over the windows that saw it (null = not defined). */
  minTtc: number | null;
  minThw: number | null;
  maxDrac: number | null;
  maxDecel: number | null;
  /** Scenario indices of the windows whose criticality it explains (ascending). */
  observedIn: number[];
  /** The window it is filed under: the follower's view, preferring the cut-in / leader-braking class, then the most critical. */
  anchor: number;
}

/** A window the thresholds flagged but that is a measurement artefact, with the reason. */
export interface RejectedCritical {
  scenarioIndex: number;
  scenarioId: string;
  reason: string;
  rules: string[];
}

export interface CriticalEventsResult {
  events: CriticalEvent[];
  rejected: RejectedCritical[];
  /** Scenario index → event index for every window that observed an event (-1 otherwise). */
  eventOf: Int32Array;
}

const f2 = (v: number): string => (Math.round(v * 100) / 100).toString();
const finiteOrNull = (x: number): number | null => (Number.isFinite(x) ? x : null);

interface Observation {
  i: number;
  recording: string;
  a: number;
  b: number;
  follower: number | null;
  tFrom: number;
  tTo: number;
  rules: string[];
}

/**
 * Count critical events once. A window is critical under the plan thresholds (criticalReasons);
 * artefacts are rejected first, with the reason (window or track shorter than the minimum, an
 * acceleration beyond the physical bound). Each remaining window contributes an observation per
 * rule: the TTC / headway / cut-in rules name the ego and its leader at the minimum, the
 * deceleration rule the ego and its leader when it was following within 3 s, else the ego and its
 * follower (it started the braking). Observations of the same pair of vehicles whose time spans
 * overlap (within mergeSlack) are one event, whichever viewpoint or window saw it.
 */
export function findCriticalEvents(
  scenarios: readonly Scenario[],
  thresholds: Pick<ResolvedTestPlanOptions, "ttcBelow" | "thwBelow" | "cutInThwBelow" | "decelAbove" | "criticalFlags">,
  options: CriticalEventOptions = {},
): CriticalEventsResult {
  const o = resolveCriticalEventOptions(options);
  const rejected: RejectedCritical[] = [];
  const obs: Observation[] = [];
  for (let i = 0; i < scenarios.length; i++) {
    const s = scenarios[i]!;
    const rules = criticalReasons(s, thresholds);
    if (rules.length === 0) continue;
    const c = s.criticalContext;
    const accel = Math.max(s.criticality.maxDecel, s.stats?.maxAccel ?? 0, c?.maxAbsAccel ?? 0, c?.leaderMaxAbsAccel ?? 0);
    let reason: string | null = null;
    if (s.seconds < o.minWindowSeconds) reason = `artefact: window of ${f2(s.seconds)} s is shorter than the minimum ${o.minWindowSeconds} s`;
    else if (c && c.trackSeconds < o.minTrackSeconds) reason = `artefact: ego track observed for ${f2(c.trackSeconds)} s, shorter than the minimum ${o.minTrackSeconds} s`;
    else if (accel > o.maxAccel) reason = `artefact: acceleration of ${f2(accel)} m/s² beyond the physical bound ${o.maxAccel} m/s²`;
    if (reason !== null) {
      rejected.push({ scenarioIndex: i, scenarioId: s.id, reason, rules });
      continue;
    }
    const braking = rules.filter((r) => r.includes("deceleration"));
    const cutIn = c?.cutIn ? rules.filter((r) => r.includes("cut-in")) : [];
    const leader = rules.filter((r) => !r.includes("deceleration") && !cutIn.includes(r));
    const add = (ep: { other: number; tFrom: number; tTo: number } | null | undefined, rs: string[], egoFollows: boolean): void => {
      if (rs.length === 0) return;
      const other = ep ? ep.other : -1;
      const a = other >= 0 ? Math.min(s.egoTrack, other) : s.egoTrack;
      const b = other >= 0 ? Math.max(s.egoTrack, other) : -1;
      obs.push({
        i,
        recording: s.recording,
        a,
        b,
        follower: egoFollows ? s.egoTrack : other >= 0 ? other : null,
        tFrom: ep ? ep.tFrom : s.tStart,
        tTo: ep ? ep.tTo : s.tEnd,
        rules: rs,
      });
    };
    add(c?.leader, leader, true);
    // A cut-in window's headway rules name the cutting vehicle when the minimum lies after the cut-in.
    if (cutIn.length > 0) {
      const ci = c!.cutIn!;
      const l = c!.leader;
      const span = l && l.other === ci.other ? { other: ci.other, tFrom: Math.min(ci.tFrom, l.tFrom), tTo: Math.max(ci.tTo, l.tTo) } : ci;
      add(span, cutIn, true);
    }
    const be = c?.braking;
    // The braking episode's partner is the leader when the ego was following it (then the ego follows).
    const egoFollows = be?.egoFollows === true;
    add(be, braking, egoFollows);
  }
  // Merge by recording and pair, in time order.
  obs.sort((x, y) => (x.recording < y.recording ? -1 : x.recording > y.recording ? 1 : 0) || x.a - y.a || x.b - y.b || x.tFrom - y.tFrom || x.i - y.i);
  const groups: Observation[][] = [];
  for (const ob of obs) {
    const g = groups[groups.length - 1];
    const last = g?.[0];
    if (g && last!.recording === ob.recording && last!.a === ob.a && last!.b === ob.b && ob.tFrom <= Math.max(...g.map((x) => x.tTo)) + o.mergeSlack) g.push(ob);
    else groups.push([ob]);
  }
  // Windows per ego track, for the follower's view.
  const byTrack = new Map<string, number[]>();
  scenarios.forEach((s, i) => {
    const key = `${s.recording}\u0000${s.egoTrack}`;
    const l = byTrack.get(key);
    if (l) l.push(i);
    else byTrack.set(key, [i]);
  });
  const eventOf = new Int32Array(scenarios.length).fill(-1);
  const events: CriticalEvent[] = groups.map((g, e) => {
    const observedIn = [...new Set(g.map((x) => x.i))].sort((x, y) => x - y);
    const tFrom = Math.min(...g.map((x) => x.tFrom));
    const tTo = Math.max(...g.map((x) => x.tTo));
    const follower = g.find((x) => x.follower !== null)?.follower ?? null;
    const rules = [...new Set(g.flatMap((x) => x.rules))];
    let minTtc = Infinity;
    let minThw = Infinity;
    let maxDrac = 0;
    let maxDecel = 0;
    for (const i of observedIn) {
      const c = scenarios[i]!.criticality;
      minTtc = Math.min(minTtc, c.minTtc);
      minThw = Math.min(minThw, c.minThw);
      maxDrac = Math.max(maxDrac, c.maxDrac);
      maxDecel = Math.max(maxDecel, c.maxDecel);
      eventOf[i] = e;
    }
    // Candidates: the windows that saw it plus the follower's windows overlapping it.
    const cand = new Set(observedIn);
    if (follower !== null)
      for (const i of byTrack.get(`${g[0]!.recording}\u0000${follower}`) ?? []) {
        const s = scenarios[i]!;
        if (s.tEnd >= tFrom && s.tStart <= tTo && s.seconds >= o.minWindowSeconds) cand.add(i);
      }
    const rank = (i: number): number => {
      const s = scenarios[i]!;
      return (follower !== null && s.egoTrack === follower ? 0 : 2) + (s.scenarioClass === "cut-in" || s.scenarioClass === "leader-braking" ? 0 : 1);
    };
    const anchor = [...cand].sort((x, y) => rank(x) - rank(y) || moreCritical(scenarios[x]!, scenarios[y]!, x, y))[0]!;
    const tracks = g[0]!.b >= 0 ? [g[0]!.a, g[0]!.b] : [g[0]!.a];
    const id = `CE-${createHash("sha256").update(`${g[0]!.recording}|${tracks.join(",")}|${tFrom.toFixed(3)}`).digest("hex").slice(0, 10)}`;
    return {
      id,
      recording: g[0]!.recording,
      tracks,
      follower,
      tFrom,
      tTo,
      rules,
      minTtc: finiteOrNull(minTtc),
      minThw: finiteOrNull(minThw),
      maxDrac: finiteOrNull(maxDrac),
      maxDecel: finiteOrNull(maxDecel),
      observedIn,
      anchor,
    };
  });
  return { events, rejected, eventOf };
}
