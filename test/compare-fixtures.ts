/**
 * One generated recording as one side of a comparison, without clustering: generator → maneuvers →
 * neighbours → scenario windows → type keys and raw features (the same stages and default options
 * as runPipeline). Shared by test/compare*.test.ts and bench/compare.ts.
 */
import { Rng } from "../src/core/rng.js";
import type { CatalogueSample } from "../src/compare/catalogueSample.js";
import { scenarioTypeKeys } from "../src/coverage/typeKey.js";
import { embedScenarios } from "../src/embed/features.js";
import { detectAllManeuvers } from "../src/maneuvers/detectAllManeuvers.js";
import { resolvePipelineOptions } from "../src/pipeline/options.js";
import { buildScenarios } from "../src/scenario/buildScenarios.js";
import { buildScenes } from "../src/scene/buildScenes.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import type { TrafficOptions } from "../src/synth/options.js";

const O = resolvePipelineOptions({});

export function generatedSample(traffic: Partial<TrafficOptions>, seed: number, name: string): CatalogueSample {
  const rec = generateTraffic({ ...traffic, recordingId: name }, new Rng(seed)).recording;
  const m = detectAllManeuvers(rec, O.maneuvers);
  const scenes = buildScenes(rec, m, O.scene);
  const set = buildScenarios(rec, m, scenes, O.scenario);
  const e = embedScenarios(set, O.embedding);
  const sc = set.scenarios;
  return {
    name,
    categoryKind: "type key",
    categories: scenarioTypeKeys(sc, O.plan.typeKey),
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
