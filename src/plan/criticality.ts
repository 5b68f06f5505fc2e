import type { Scenario } from "../scenario/types.js";
import type { ResolvedTestPlanOptions } from "./options.js";

const fmt = (v: number): string => (Math.round(v * 100) / 100).toString();

/**
 * Why a scenario counts as critical under the plan thresholds (empty when it does not): minimum TTC
 * or time headway below the thresholds, a cut-in in a window whose minimum time headway is below
 * cutInThwBelow (the window minimum, which a cut-in usually sets), peak deceleration above the
 * threshold, or one of the listed flags.
 */
export function criticalReasons(
  s: Scenario,
  o: Pick<ResolvedTestPlanOptions, "ttcBelow" | "thwBelow" | "cutInThwBelow" | "decelAbove" | "criticalFlags">,
): string[] {
  const c = s.criticality;
  const out: string[] = [];
  if (c.minTtc < o.ttcBelow) out.push(`critical: min TTC ${fmt(c.minTtc)} s < ${o.ttcBelow} s`);
  if (c.minThw < o.thwBelow) out.push(`critical: min time headway ${fmt(c.minThw)} s < ${o.thwBelow} s`);
  if (c.minThw < o.cutInThwBelow && s.events.some((e) => e.kind === "cut-in"))
    out.push(`critical: cut-in with min time headway ${fmt(c.minThw)} s < ${o.cutInThwBelow} s`);
  if (c.maxDecel > o.decelAbove) out.push(`critical: peak deceleration ${fmt(c.maxDecel)} m/s² > ${o.decelAbove} m/s²`);
  for (const f of o.criticalFlags) if (c.flags.includes(f)) out.push(`critical: flag "${f}"`);
  return out;
}

/** Order of criticality: lower TTC, then lower THW, then higher deceleration, then lower catalogue position. */
export function moreCritical(a: Scenario, b: Scenario, ia: number, ib: number): number {
  const d = a.criticality.minTtc - b.criticality.minTtc;
  if (d !== 0 && !Number.isNaN(d)) return d;
  const e = a.criticality.minThw - b.criticality.minThw;
  if (e !== 0 && !Number.isNaN(e)) return e;
  const f = b.criticality.maxDecel - a.criticality.maxDecel;
  if (f !== 0 && !Number.isNaN(f)) return f;
  return ia - ib;
}
