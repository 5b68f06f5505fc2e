import { existsSync } from "node:fs";
import { join } from "node:path";
import { assignScenarios } from "../cluster/assignScenarios.js";
import { checkModelFeatures, loadClusteringModel, type ClusteringModel } from "../cluster/clusteringModel.js";
import { NOVELTY_QUANTILE } from "../cluster/model.js";
import { InputError } from "../core/errors.js";
import type { Progress } from "../core/progress.js";
import { VERSION } from "../core/version.js";
import { abundance, frequencyCounts } from "../coverage/abundance.js";
import { chao1 } from "../coverage/chao1.js";
import { scenarioTypeKeys, type TypeKeyOptions } from "../coverage/typeKey.js";
import { unseenMass } from "../coverage/unseenMass.js";
import { embedScenarios } from "../embed/features.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { scenarioWeights } from "../exposure/sampleWeights.js";
import { extractRecording, type RecordingSummary } from "../pipeline/extractRecording.js";
import { mergeScenarioSets } from "../pipeline/mergeScenarioSets.js";
import { extractionOptionsOf } from "../pipeline/options.js";
import { checkDistinctIds } from "../pipeline/planCatalogue.js";
import type { Recording } from "../recording/types.js";
import { scenarioCategories, type CategoryKind } from "../catalogue/scenarioCategories.js";
import type { CatalogueSample } from "./catalogueSample.js";
import { compareCatalogues, type CatalogueComparison, type CompareOptions } from "./compareCatalogues.js";
import { readPlanFolder } from "./readPlanFolder.js";

/** One cluster before and after adding the batch. */
export interface AddedCluster {
  /** Cluster label; −1 = novel (DBSCAN noise under the plan's eps). */
  cluster: number;
  /** The plan's catalogue, the new batch, and both together: scenarios, km, share of the weight. */
  catalogue: { scenarios: number; km: number; share: number };
  batch: { scenarios: number; km: number; share: number };
  updated: { scenarios: number; km: number; share: number };
}

/** Coverage of the categories (classes or type keys), from the scenario counts. */
export interface CategoryCoverage {
  scenarios: number;
  categories: number;
  singletons: number;
  /** Good–Turing f1 / n. */
  unseenMass: number;
  /** Bias-corrected Chao1 estimate of the number of categories. */
  chao1: number;
}

export interface AddResult {
  plan: string;
  model: { k: number; trainingScenarios: number; novelty: string };
  recordings: Pick<RecordingSummary, "id" | "source" | "checksum" | "conditions" | "scenarios" | "km" | "hours">[];
  /** Per cluster (−1 last), shares before and after. The model is not refitted: labels of the plan's scenarios stay. */
  clusters: AddedCluster[];
  /** The batch's novel scenarios (new candidates), most novel first. */
  novel: { scenarioId: string; recording: string; egoTrack: number; tStart: number; tEnd: number; nearestCluster: number; novelty: number; category: string }[];
  /**
   * Scenarios of the batch farther from their nearest k-means centre than 95 % of that cluster's own
   * training scenarios (k-means novelty > 1): about 5 % for a batch like the plan's by construction;
   * a much larger share says the batch drives differently even when the density rule flags nothing.
   */
  farFromClusters: { scenarios: number; share: number; expectedShare: number };
  /** Categories (classes when measured, else type keys) of the batch that the catalogue has never shown: new candidates as well. */
  newCategories: { category: string; scenarios: number; km: number }[];
  categoryKind: CategoryKind;
  coverage: { before: CategoryCoverage; after: CategoryCoverage };
  /** Is the batch like the catalogue? (type keys and features; docs/catalogue-over-time.md). */
  comparison: CatalogueComparison;
  /**
   * Per scenario of the batch: its id, label (−1 novel), nearest cluster, the novelty score the
   * model decides by (distance to the nearest DBSCAN core / eps with DBSCAN, else the k-means one),
   * and the k-means novelty (distance to the centre / the cluster's 95th-percentile training distance).
   */
  assignments: { scenarioId: string; category: string; label: number; nearestCluster: number; novelty: number; kmeansNovelty: number }[];
  warnings: string[];
}

function categoryCoverage(keys: readonly string[]): CategoryCoverage {
  const counts = abundance(keys).counts;
  const fc = frequencyCounts(counts);
  return { scenarios: keys.length, categories: fc.sObs, singletons: fc.f1, unseenMass: keys.length > 0 ? unseenMass(counts) : 0, chao1: keys.length > 0 ? chao1(counts).estimate : 0 };
}

/**
 * Add recordings to a finished plan without refitting: extract them with the options stored in the
 * plan's model.json, assign every scenario to the plan's clusters (assignScenarios: the model's
 * standardization, nearest centre, DBSCAN border rule), and report per cluster the shares of the
 * catalogue, the batch and both together; the novel scenarios (DBSCAN noise under the plan's eps, or
 * k-means novelty above 1 without DBSCAN) as new candidates; categories (classes when measured, else
 * type keys) the catalogue never showed; category coverage before and after; and a comparison of the batch with the catalogue. The plan's files are
 * not changed. A model that does not match the features, or a plan made with another tool version,
 * is an InputError.
 */
export async function addRecordings(planDir: string, recordings: Recording[], options: { compare?: CompareOptions; progress?: Progress } = {}): Promise<AddResult> {
  const modelPath = join(planDir, "model.json");
  if (!existsSync(modelPath)) throw new InputError("no model.json in the plan folder (written by roadsieve plan since the fitted clustering model); re-run roadsieve plan", { file: modelPath });
  const model: ClusteringModel = await loadClusteringModel(modelPath);
  const folder = await readPlanFolder(planDir, planDir);
  if (recordings.length === 0) throw new InputError("give at least one recording to add");
  checkDistinctIds(recordings);
  const known = new Set(folder.recordings.map((r) => r.id));
  for (const r of recordings)
    if (known.has(r.id)) throw new InputError(`recording id "${r.id}" is already in the plan; give the new recording its own id (readRecording option id, CLI --id)`, { file: r.source, value: r.id });
  const warnings: string[] = [];
  if (model.extraction === null) warnings.push("the model records no extraction options; the new recordings are cut and embedded with the defaults");
  const { options: opts, weightBy } = extractionOptionsOf(model.extraction);
  const summaries: RecordingSummary[] = [];
  const sets = recordings.map((rec) => {
    const x = extractRecording(rec, opts, options.progress);
    summaries.push(x.summary);
    for (const w of x.summary.warnings) warnings.push(`${rec.id}: ${w}`);
    return x.set;
  });
  const merged = mergeScenarioSets(sets);
  const sc = merged.scenarios;
  if (sc.length === 0) throw new InputError("the recordings gave no scenarios to add");
  const embedding = embedScenarios(merged, opts.embedding);
  checkModelFeatures(model, embedding.features.map((f) => f.name), modelPath);
  const a = assignScenarios(model, embedding);
  warnings.push(...a.warnings);
  const typeKeyOptions = ((folder.plan.provenance as { options?: Record<string, unknown> }).options?.typeKey ?? {}) as TypeKeyOptions;
  const keys = scenarioTypeKeys(sc, typeKeyOptions);
  const cats = scenarioCategories(sc, { typeKeys: keys });

  // Shares per cluster: the catalogue's stored labels and weights, the batch's assigned labels.
  const old = folder.sample;
  const oldW = weightBy === "km" ? old.km : old.hours;
  const newW = scenarioWeights(sc, weightBy);
  const k = model.k;
  const slots = (labels: ArrayLike<number>, km: ArrayLike<number>, w: ArrayLike<number>) => {
    const out = Array.from({ length: k + 1 }, () => ({ n: 0, km: [] as number[], w: [] as number[] }));
    for (let i = 0; i < labels.length; i++) {
      const s = out[labels[i]! < 0 ? k : labels[i]!]!;
      s.n++;
      s.km.push(km[i]!);
      s.w.push(w[i]!);
    }
    return out;
  };
  const so = slots(folder.clusters, old.km, oldW);
  const sb = slots(a.labels, sc.map((s) => s.km), newW);
  const totO = compensatedSum(oldW);
  const totB = compensatedSum(newW);
  const clusters: AddedCluster[] = [];
  for (let c = 0; c <= k; c++) {
    const o = so[c]!;
    const b = sb[c]!;
    if (c === k && o.n === 0 && b.n === 0) continue;
    const wo = compensatedSum(o.w);
    const wb = compensatedSum(b.w);
    clusters.push({
      cluster: c === k ? -1 : c,
      catalogue: { scenarios: o.n, km: compensatedSum(o.km), share: totO > 0 ? wo / totO : 0 },
      batch: { scenarios: b.n, km: compensatedSum(b.km), share: totB > 0 ? wb / totB : 0 },
      updated: { scenarios: o.n + b.n, km: compensatedSum([...o.km, ...b.km]), share: totO + totB > 0 ? (wo + wb) / (totO + totB) : 0 },
    });
  }
  const score = a.densityNovelty ?? a.novelty;
  const novel = [];
  for (let i = 0; i < sc.length; i++)
    if (a.novel[i]) {
      const s = sc[i]!;
      novel.push({ scenarioId: s.id, recording: s.recording, egoTrack: s.egoTrack, tStart: s.tStart, tEnd: s.tEnd, nearestCluster: a.cluster[i]!, novelty: score[i]!, category: cats.categories[i]! });
    }
  novel.sort((x, y) => y.novelty - x.novelty || (x.scenarioId < y.scenarioId ? -1 : 1));
  if (old.categoryKind !== cats.kind)
    throw new InputError(`the plan's catalogue counts ${old.categoryKind}s but the new recordings give ${cats.kind}s (made with another version of the extraction?)`, { file: join(planDir, "catalogue.duckdb") });
  const oldCats = new Set(old.categories);
  const fresh = new Map<string, { scenarios: number; km: number[] }>();
  cats.categories.forEach((t, i) => {
    if (oldCats.has(t)) return;
    let f = fresh.get(t);
    if (!f) fresh.set(t, (f = { scenarios: 0, km: [] }));
    f.scenarios++;
    f.km.push(sc[i]!.km);
  });
  const newCategories = [...fresh.entries()].map(([category, f]) => ({ category, scenarios: f.scenarios, km: compensatedSum(f.km) })).sort((x, y) => y.km - x.km || (x.category < y.category ? -1 : 1));

  const batch: CatalogueSample = {
    name: "added recordings",
    categoryKind: cats.kind,
    categories: cats.categories,
    km: sc.map((s) => s.km),
    hours: sc.map((s) => s.seconds / 3600),
    drives: sc.map((s) => `${s.recording}/${s.egoTrack}`),
    recordings: sc.map((s) => s.recording),
    features: embedding.raw,
    featureNames: embedding.features.map((f) => f.name),
    featureGroups: embedding.features.map((f) => f.group),
    // Made now, with the plan's stored options: only the tool version can differ.
    making: old.making ? { ...old.making, tool: `roadsieve ${VERSION}` } : null,
  };
  const comparison = compareCatalogues(old, batch, options.compare);
  return {
    plan: planDir,
    model: {
      k,
      trainingScenarios: model.training.rows,
      novelty: model.dbscan ? `DBSCAN border rule on ${model.pca!.components.rows} principal components (eps ${model.dbscan.eps.toPrecision(4)})` : "k-means distance above the cluster's 95th-percentile training distance",
    },
    recordings: summaries.map((s) => ({ id: s.id, source: s.source, checksum: s.checksum, conditions: s.conditions, scenarios: s.scenarios, km: s.km, hours: s.hours })),
    clusters,
    novel,
    farFromClusters: (() => {
      let far = 0;
      for (let i = 0; i < sc.length; i++) if (a.novelty[i]! > 1) far++;
      return { scenarios: far, share: far / sc.length, expectedShare: 1 - NOVELTY_QUANTILE };
    })(),
    newCategories,
    categoryKind: cats.kind,
    coverage: { before: categoryCoverage(old.categories), after: categoryCoverage([...old.categories, ...cats.categories]) },
    comparison,
    assignments: sc.map((s, i) => ({ scenarioId: s.id, category: cats.categories[i]!, label: a.labels[i]!, nearestCluster: a.cluster[i]!, novelty: score[i]!, kmeansNovelty: a.novelty[i]! })),
    warnings,
  };
}
