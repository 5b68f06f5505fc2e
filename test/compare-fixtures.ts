/**
 * One generated recording as one side of a comparison, without clustering: generator →
 * extractRecording (maneuvers → neighbours → scenario windows → classes and parameters, the same
 * stage and default options as runPipeline) → categories and raw features. Categories are the
 * scenario classes (as in the pipeline) or, with "type key", the type keys. Shared by
 * test/compare*.test.ts and bench/compare.ts.
 */
import { Rng } from "../src/core/rng.js";
import type { CatalogueSample } from "../src/compare/catalogueSample.js";
import { scenarioTypeKeys } from "../src/coverage/typeKey.js";
import { embedScenarios } from "../src/embed/features.js";
import { extractRecording } from "../src/pipeline/extractRecording.js";
import { resolvePipelineOptions } from "../src/pipeline/options.js";
import { scenarioCategories } from "../src/catalogue/scenarioCategories.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import type { TrafficOptions } from "../src/synth/options.js";

const O = resolvePipelineOptions({});

export function generatedSample(traffic: Partial<TrafficOptions>, seed: number, name: string, categories: "class" | "type key" = "class"): CatalogueSample {
  const rec = generateTraffic({ ...traffic, recordingId: name }, new Rng(seed)).recording;
  const set = extractRecording(rec, O).set;
  const e = embedScenarios(set, O.embedding);
  const sc = set.scenarios;
  const keys = scenarioTypeKeys(sc, O.plan.typeKey);
  const c = categories === "class" ? scenarioCategories(sc, { typeKeys: keys }) : { kind: "type key" as const, categories: keys };
  if (c.kind !== categories) throw new Error(`asked for ${categories} categories, extraction gave ${c.kind}s`);
  return {
    name,
    categoryKind: c.kind,
    categories: c.categories,
    km: sc.map((s) => s.km),
    hours: sc.map((s) => s.seconds / 3600),
    drives: sc.map((s) => `${s.recording}/${s.egoTrack}`),
    recordings: sc.map((s) => s.recording),
    features: e.raw,
    featureNames: e.features.map((f) => f.name),
    featureGroups: e.features.map((f) => f.group),
    making: null,
  };
}
