import { InputError } from "../core/errors.js";
import { takeRows, type Matrix } from "../core/matrix.js";
import type { PipelineResult } from "../pipeline/runPipeline.js";
import { CONDITION_FIELDS, NOT_GIVEN, type ConditionField, type RecordingConditions } from "../recording/conditions.js";
import { scenarioCategories, type CategoryKind } from "../catalogue/scenarioCategories.js";

/** What a catalogue must have been made with for two of them to be compared. */
export interface CatalogueMaking {
  /** "roadsieve 0.1.0". */
  tool: string;
  /** Scenario windows (resolved scenario options). */
  scenario: unknown;
  /** Embedding options (feature groups and weights). */
  embedding: unknown;
  /** Type-key options (what a category is when classes are not measured). */
  typeKey: unknown;
  /** Maneuver detection and scene (neighbour, criticality) options: they shape every category. */
  maneuvers?: unknown;
  scene?: unknown;
}

/**
 * The scenarios of one side of a comparison: a whole catalogue, or the recordings of one condition
 * group. Per scenario arrays are aligned.
 */
export interface CatalogueSample {
  name: string;
  categoryKind: CategoryKind;
  categories: string[];
  km: number[];
  hours: number[];
  /** Drive of each scenario: "<recording>/<egoTrack>" (windows of one drive are correlated). */
  drives: string[];
  recordings: string[];
  /** Raw (unstandardized) features, one row per scenario, or null when not available. */
  features: Matrix | null;
  featureNames: string[];
  featureGroups: string[];
  /** How the catalogue was made, or null when unknown (then nothing is checked). */
  making: CatalogueMaking | null;
}

/** How a pipeline result was made, from its plan provenance. */
export function makingOfResult(r: PipelineResult): CatalogueMaking {
  return makingOfProvenance(r.plan.provenance);
}

/** How a plan's catalogue was made, from its provenance (plan.json). */
export function makingOfProvenance(p: { tool: string; version: string; options: Record<string, unknown>; upstream: Record<string, unknown> }): CatalogueMaking {
  return {
    tool: `${p.tool} ${p.version}`,
    scenario: p.upstream.scenario ?? null,
    embedding: p.upstream.embedding ?? null,
    typeKey: p.options.typeKey ?? null,
    maneuvers: p.upstream.maneuvers ?? null,
    scene: p.upstream.scene ?? null,
  };
}

/**
 * One side from a pipeline result: all its scenarios, or those of the recordings `keep` accepts.
 */
export function sampleFromResult(r: PipelineResult, name: string, keep?: (recordingId: string) => boolean): CatalogueSample {
  const sc = r.scenarios.scenarios;
  const rows: number[] = [];
  for (let i = 0; i < sc.length; i++) if (!keep || keep(sc[i]!.recording)) rows.push(i);
  const { kind, categories } = scenarioCategories(sc, { typeKeys: r.typeKeys });
  return {
    name,
    categoryKind: kind,
    categories: rows.map((i) => categories[i]!),
    km: rows.map((i) => sc[i]!.km),
    hours: rows.map((i) => sc[i]!.seconds / 3600),
    drives: rows.map((i) => `${sc[i]!.recording}/${sc[i]!.egoTrack}`),
    recordings: rows.map((i) => sc[i]!.recording),
    features: takeRows(r.embedding.raw, rows),
    featureNames: r.embedding.features.map((f) => f.name),
    featureGroups: r.embedding.features.map((f) => f.group),
    making: makingOfResult(r),
  };
}

/** The rows `keep` accepts, as a new side called `name`. */
export function subsetSample(s: CatalogueSample, name: string, keep: (row: number) => boolean): CatalogueSample {
  const rows: number[] = [];
  for (let i = 0; i < s.categories.length; i++) if (keep(i)) rows.push(i);
  return {
    ...s,
    name,
    categories: rows.map((i) => s.categories[i]!),
    km: rows.map((i) => s.km[i]!),
    hours: rows.map((i) => s.hours[i]!),
    drives: rows.map((i) => s.drives[i]!),
    recordings: rows.map((i) => s.recordings[i]!),
    features: s.features ? takeRows(s.features, rows) : null,
  };
}

/**
 * Two condition groups of one catalogue: the scenarios of recordings whose condition `field` is `a`,
 * and those where it is `b` ("(not given)" selects recordings that do not state it; field
 * "recording" compares two recordings).
 */
export function splitByCondition(
  s: CatalogueSample,
  recordings: readonly { id: string; conditions?: RecordingConditions }[],
  field: ConditionField | "recording",
  a: string,
  b: string,
): [CatalogueSample, CatalogueSample] {
  if (field !== "recording" && !(CONDITION_FIELDS as readonly string[]).includes(field))
    throw new InputError(`cannot split by "${String(field)}"; use recording or a condition (${CONDITION_FIELDS.join(", ")})`, { column: "by", value: field });
  const valueOf = new Map(recordings.map((r) => [r.id, field === "recording" ? r.id : (r.conditions?.[field] ?? NOT_GIVEN)]));
  const present = [...new Set(valueOf.values())].sort();
  for (const v of [a, b])
    if (!present.includes(v)) throw new InputError(`no recording has ${field} = "${v}" (values present: ${present.join(", ")})`, { column: field, value: v });
  if (a === b) throw new InputError(`compare two different groups, not "${a}" with itself`, { column: field, value: a });
  return [subsetSample(s, `${field}=${a}`, (i) => valueOf.get(s.recordings[i]!) === a), subsetSample(s, `${field}=${b}`, (i) => valueOf.get(s.recordings[i]!) === b)];
}
