import { InputError } from "../core/errors.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { frequencyCounts } from "../coverage/abundance.js";
import { chao1 } from "../coverage/chao1.js";
import { unseenMass } from "../coverage/unseenMass.js";
import type { TypeKeyOptions } from "../coverage/typeKey.js";
import type { RecordingSummary } from "../pipeline/runPipeline.js";
import { CONDITION_FIELDS, NOT_GIVEN, type ConditionField } from "../recording/conditions.js";
import { scenarioCategories, type CategorisedScenario, type CategoryKind } from "./scenarioCategories.js";

/** What shares are broken down by: each recording, or a condition field. */
export type BreakdownBy = "recording" | ConditionField;

/** One group (a recording, or one value of a condition). */
export interface BreakdownGroup {
  group: string;
  recordings: string[];
  scenarios: number;
  km: number;
  hours: number;
  /** Sum of the weights of the group's scenarios. */
  weight: number;
  /** Coverage of the group's own catalogue of categories (src/coverage, counting scenarios). */
  coverage: {
    /** Distinct categories seen in the group. */
    categories: number;
    /** Categories seen exactly once (f1) and twice (f2). */
    singletons: number;
    doubletons: number;
    /** Good–Turing chance that the group's next scenario is of a category it has not shown yet, f1 / n. */
    unseenMass: number;
    /** Bias-corrected Chao1 estimate of the group's number of categories. */
    chao1: number;
  };
}

/** One cell: a category within a group. */
export interface BreakdownRow {
  group: string;
  category: string;
  scenarios: number;
  km: number;
  hours: number;
  /** Share of the group's weight (km or hours, as the weights given) in this category. */
  share: number;
  /** Share of the group's km and of its hours in this category. */
  kmShare: number;
  timeShare: number;
}

/** One category over all groups. */
export interface BreakdownCategory {
  category: string;
  scenarios: number;
  km: number;
  hours: number;
  /** Share of the total weight. */
  share: number;
  /** Recordings that have at least one scenario of this category, sorted. */
  recordings: string[];
  /** Groups that have at least one scenario of it. */
  groups: string[];
}

export interface Breakdown {
  groupBy: BreakdownBy;
  categoryKind: CategoryKind;
  groups: BreakdownGroup[];
  /** Every group × category with at least one scenario, groups in order, categories by share within the group (then name). */
  rows: BreakdownRow[];
  /** Categories by total share (descending, then name). */
  categories: BreakdownCategory[];
  /** Categories whose scenarios all come from one recording: whatever the data says about them rests on that one recording. */
  singleRecording: string[];
  warnings: string[];
}

/**
 * Break the catalogue's shares down by recording or by a condition of the recordings: per group and
 * category (the class when measured, else the type key) the share of the group's weight, km, hours
 * and counts. Recordings without the condition form the group "(not given)". Warns about categories
 * that rest on one recording only (one site, one day: no evidence that the share carries over).
 */
export function breakdown(
  scenarios: readonly CategorisedScenario[],
  summaries: readonly Pick<RecordingSummary, "id" | "conditions">[],
  groupBy: BreakdownBy,
  weights: ArrayLike<number>,
  options: { typeKeys?: readonly string[]; typeKey?: TypeKeyOptions } = {},
): Breakdown {
  if (groupBy !== "recording" && !(CONDITION_FIELDS as readonly string[]).includes(groupBy))
    throw new InputError(`cannot break down by "${String(groupBy)}"; use recording or a condition (${CONDITION_FIELDS.join(", ")})`, { column: "groupBy", value: groupBy });
  const n = scenarios.length;
  if (weights.length !== n) throw new InputError(`weights has ${weights.length} values but there are ${n} scenarios`, { column: "weights", value: weights.length });
  for (let i = 0; i < n; i++)
    if (!(Number.isFinite(weights[i]!) && weights[i]! >= 0)) throw new InputError(`weight of scenario ${i} should be a finite number >= 0`, { column: "weights", value: weights[i] });
  const groupOfRecording = new Map<string, string>();
  for (const s of summaries) groupOfRecording.set(s.id, groupBy === "recording" ? s.id : (s.conditions?.[groupBy] ?? NOT_GIVEN));
  const { kind, categories } = scenarioCategories(scenarios, options);

  type Acc = { scenarios: number; km: number[]; hours: number[]; w: number[] };
  const newAcc = (): Acc => ({ scenarios: 0, km: [], hours: [], w: [] });
  const groupAcc = new Map<string, Acc & { recordings: Set<string> }>();
  const cellAcc = new Map<string, Map<string, Acc>>();
  const catAcc = new Map<string, Acc & { recordings: Set<string>; groups: Set<string> }>();
  for (let i = 0; i < n; i++) {
    const s = scenarios[i]!;
    const g = groupOfRecording.get(s.recording);
    if (g === undefined) throw new InputError(`scenario ${s.id} comes from recording "${s.recording}", which is not among the summaries`, { column: "recording", value: s.recording });
    const c = categories[i]!;
    let ga = groupAcc.get(g);
    if (!ga) groupAcc.set(g, (ga = { ...newAcc(), recordings: new Set() }));
    let cells = cellAcc.get(g);
    if (!cells) cellAcc.set(g, (cells = new Map()));
    let ca = cells.get(c);
    if (!ca) cells.set(c, (ca = newAcc()));
    let ta = catAcc.get(c);
    if (!ta) catAcc.set(c, (ta = { ...newAcc(), recordings: new Set(), groups: new Set() }));
    for (const a of [ga, ca, ta]) {
      a.scenarios++;
      a.km.push(s.km);
      a.hours.push(s.seconds / 3600);
      a.w.push(weights[i]!);
    }
    ga.recordings.add(s.recording);
    ta.recordings.add(s.recording);
    ta.groups.add(g);
  }
  const byName = (a: string, b: string) => (a < b ? -1 : a > b ? 1 : 0);
  const groupNames = [...groupAcc.keys()].sort(byName);
  const groups: BreakdownGroup[] = groupNames.map((g) => {
    const a = groupAcc.get(g)!;
    const counts = [...cellAcc.get(g)!.values()].map((c) => c.scenarios);
    const fc = frequencyCounts(counts);
    const coverage = { categories: fc.sObs, singletons: fc.f1, doubletons: fc.f2, unseenMass: unseenMass(counts), chao1: chao1(counts).estimate };
    return { group: g, recordings: [...a.recordings].sort(byName), scenarios: a.scenarios, km: compensatedSum(a.km), hours: compensatedSum(a.hours), weight: compensatedSum(a.w), coverage };
  });
  const rows: BreakdownRow[] = [];
  for (const g of groups) {
    const part: BreakdownRow[] = [];
    for (const [c, a] of cellAcc.get(g.group)!) {
      const km = compensatedSum(a.km);
      const hours = compensatedSum(a.hours);
      const w = compensatedSum(a.w);
      part.push({
        group: g.group,
        category: c,
        scenarios: a.scenarios,
        km,
        hours,
        share: g.weight > 0 ? w / g.weight : 0,
        kmShare: g.km > 0 ? km / g.km : 0,
        timeShare: g.hours > 0 ? hours / g.hours : 0,
      });
    }
    part.sort((x, y) => y.share - x.share || byName(x.category, y.category));
    rows.push(...part);
  }
  const totalW = compensatedSum(groups.map((g) => g.weight));
  const cats: BreakdownCategory[] = [...catAcc.entries()].map(([c, a]) => ({
    category: c,
    scenarios: a.scenarios,
    km: compensatedSum(a.km),
    hours: compensatedSum(a.hours),
    share: totalW > 0 ? compensatedSum(a.w) / totalW : 0,
    recordings: [...a.recordings].sort(byName),
    groups: [...a.groups].sort(byName),
  }));
  cats.sort((x, y) => y.share - x.share || byName(x.category, y.category));
  const singleRecording = cats.filter((c) => c.recordings.length === 1).map((c) => c.category);
  const warnings: string[] = [];
  if (summaries.length > 1 && singleRecording.length > 0) {
    const list = cats
      .filter((c) => c.recordings.length === 1)
      .map((c) => `${c.category} (${c.scenarios} scenario${c.scenarios === 1 ? "" : "s"}, only in ${c.recordings[0]})`);
    warnings.push(`${singleRecording.length} of ${cats.length} ${kind === "class" ? "classes" : "type keys"} rest on one recording only: ${list.join("; ")}`);
  }
  if (summaries.length === 1) warnings.push(`every ${kind} rests on one recording (${summaries[0]!.id}): nothing shows that its shares carry over to other sites or conditions`);
  return { groupBy, categoryKind: kind, groups, rows, categories: cats, singleRecording, warnings };
}
