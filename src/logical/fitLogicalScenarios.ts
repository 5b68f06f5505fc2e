import { createHash } from "node:crypto";
import { InputError } from "../core/errors.js";
import { zeros, type Matrix } from "../core/matrix.js";
import type { Rng } from "../core/rng.js";
import { kmeans } from "../cluster/kmeans.js";
import { medoids } from "../cluster/medoids.js";
import { calinskiHarabasz, daviesBouldin, silhouette } from "../cluster/metrics.js";
import type { Scenario } from "../scenario/types.js";
import { SCENARIO_CLASSES, isScenarioClassId, scenarioClass, type ParameterSpec, type ScenarioClassId } from "./classes.js";
import { normalQuantile, sortedOrder, weightedQuantile } from "./stats.js";

/** Options of {@link fitLogicalScenarios}. */
export interface LogicalFitOptions {
  /** Smallest k whose representatives lie within tolerance of this share of the class's exposure (default 0.9). */
  coverage?: number;
  /** Most clusters per class (default 2: a test plan of tens of cases, see docs/logical.md). */
  maxK?: number;
  /** Per-parameter tolerance overrides (parameter name → value in its unit). */
  tolerances?: Record<string, number>;
  /** Classes to cluster; the others form one logical scenario each (default all). Unknown ids are an error. */
  classes?: string[];
  /** k-means restarts (default 4). */
  nInit?: number;
  /** Silhouette below this is reported as weak structure (default 0.25, Kaufman & Rousseeuw 1990). */
  weakSilhouette?: number;
  /** Histogram bins per parameter (default 10). */
  bins?: number;
}

export interface ResolvedLogicalFitOptions {
  coverage: number;
  maxK: number;
  tolerances: Record<string, number>;
  classes: ScenarioClassId[];
  nInit: number;
  weakSilhouette: number;
  bins: number;
}

export function resolveLogicalFitOptions(o: LogicalFitOptions = {}): ResolvedLogicalFitOptions {
  const coverage = o.coverage ?? 0.9;
  if (!(coverage > 0 && coverage <= 1)) throw new InputError(`coverage=${coverage} should be a share in (0, 1]`, { column: "coverage", value: String(coverage) });
  const maxK = o.maxK ?? 2;
  if (!(Number.isInteger(maxK) && maxK >= 1)) throw new InputError(`maxK=${maxK} should be an integer >= 1`, { column: "maxK", value: String(maxK) });
  const classes = o.classes ?? SCENARIO_CLASSES.map((c) => c.id);
  for (const c of classes) if (!isScenarioClassId(c)) throw new InputError(`unknown scenario class "${c}"; known: ${SCENARIO_CLASSES.map((x) => x.id).join(", ")}`, { column: "classes", value: String(c) });
  const known = new Set(SCENARIO_CLASSES.flatMap((c) => c.parameters.map((p) => p.name)));
  const tolerances = { ...(o.tolerances ?? {}) };
  for (const [k, v] of Object.entries(tolerances)) {
    if (!known.has(k)) throw new InputError(`unknown parameter "${k}" in tolerances`, { column: "tolerances", value: k });
    if (!(v > 0 && Number.isFinite(v))) throw new InputError(`tolerance ${k}=${v} should be > 0`, { column: "tolerances", value: String(v) });
  }
  const nInit = o.nInit ?? 4;
  const weakSilhouette = o.weakSilhouette ?? 0.25;
  const bins = o.bins ?? 10;
  if (!(Number.isInteger(bins) && bins >= 1)) throw new InputError(`bins=${bins} should be an integer >= 1`, { column: "bins", value: String(bins) });
  return { coverage, maxK, tolerances, classes: classes as ScenarioClassId[], nInit, weakSilhouette, bins };
}

export interface LogicalParameter {
  name: string;
  unit: string;
  description: string;
  min: number;
  max: number;
  p05: number;
  p50: number;
  p95: number;
  /** Members where the parameter was measurable. */
  measurable: number;
  /** Exposure-weighted histogram over [min, max]; weights add up to 1 over the measurable members. */
  histogram: { edges: number[]; weights: number[] };
}

/** The fitted marginal of one parameter: measurable values ascending with their weights, and the weight share without a value. */
export interface Marginal {
  name: string;
  values: number[];
  weights: number[];
  nullShare: number;
  spec: ParameterSpec;
}

export interface FittedLogicalScenario {
  id: string;
  classId: ScenarioClassId;
  className: string;
  name: string;
  /** Scenario indices, ascending. */
  members: number[];
  representative: number;
  parameters: LogicalParameter[];
  dependence: { method: "gaussian-copula"; parameters: string[]; correlation: number[][] } | null;
  representationError: Record<string, { median: number; p90: number }>;
  marginals: Marginal[];
  /** Root-mean-square standardized deviation of the members from their weighted mean (the spread Neyman allocation uses). */
  spread: number;
}

export interface ClassFit {
  classId: ScenarioClassId;
  name: string;
  scenarios: number;
  k: number;
  /** Exposure share of the class within tolerance of its representative at the chosen k. */
  coverage: number;
  /** Coverage per k tried. */
  tried: { k: number; coverage: number }[];
  silhouette: number | null;
  calinskiHarabasz: number | null;
  daviesBouldin: number | null;
  weak: boolean;
}

export interface LogicalModelClass {
  classId: ScenarioClassId;
  parameters: string[];
  mean: number[];
  sd: number[];
  tolerance: number[];
  scenarios: { id: string; centre: (number | null)[]; radius: number }[];
}

/** What assignLogicalScenarios needs: standardization, tolerances and representatives per class. */
export interface LogicalModel {
  format: "roadsieve-logical-model";
  version: 1;
  classes: LogicalModelClass[];
}

export interface LogicalFit {
  classes: ClassFit[];
  scenarios: FittedLogicalScenario[];
  /** Logical scenario index per scenario. */
  labelOf: Int32Array;
  model: LogicalModel;
  warnings: string[];
}

const sig = (x: number): string => (Math.abs(x) >= 10 ? x.toFixed(0) : x.toPrecision(2));

/**
 * Cluster inside each class on its standardized parameters and describe each cluster as a logical
 * scenario. k per class: the smallest k (1..maxK) whose exact medoids lie within the per-parameter
 * tolerances of at least `coverage` of the class's exposure (every parameter within tolerance; a
 * missing value matches only a missing value); silhouette, Calinski–Harabasz and Davies–Bouldin of
 * the chosen k are reported beside it, with a warning when the silhouette is below weakSilhouette.
 */
export function fitLogicalScenarios(scenarios: readonly Scenario[], weights: Float64Array, rng: Rng, options: LogicalFitOptions = {}): LogicalFit {
  const o = resolveLogicalFitOptions(options);
  const n = scenarios.length;
  const warnings: string[] = [];
  const byClass = new Map<ScenarioClassId, number[]>();
  for (let i = 0; i < n; i++) {
    const c = scenarios[i]!.scenarioClass;
    if (!c || !scenarios[i]!.parameters) throw new InputError(`scenario ${scenarios[i]!.id} has no class or parameters; run measureScenarioParameters during extraction`, { row: i + 1 });
    const l = byClass.get(c);
    if (l) l.push(i);
    else byClass.set(c, [i]);
  }
  const labelOf = new Int32Array(n).fill(-1);
  const classes: ClassFit[] = [];
  const fitted: FittedLogicalScenario[] = [];
  const model: LogicalModel = { format: "roadsieve-logical-model", version: 1, classes: [] };
  for (const cls of SCENARIO_CLASSES) {
    const idx = byClass.get(cls.id);
    if (!idx) continue;
    const specs = cls.parameters;
    const d = specs.length;
    const m = idx.length;
    const tol = specs.map((p) => o.tolerances[p.name] ?? p.tolerance);
    const raw = idx.map((i) => specs.map((p) => scenarios[i]!.parameters![p.name] ?? null));
    const w = Float64Array.from(idx, (i) => weights[i]!);
    // Standardize with exposure weights; a missing value sits at the mean (z = 0).
    const mean = new Array<number>(d).fill(0);
    const sd = new Array<number>(d).fill(1);
    for (let j = 0; j < d; j++) {
      let sw = 0;
      let s = 0;
      for (let r = 0; r < m; r++) if (raw[r]![j] !== null) (sw += w[r]!), (s += w[r]! * raw[r]![j]!);
      if (sw > 0) mean[j] = s / sw;
      let v = 0;
      for (let r = 0; r < m; r++) if (raw[r]![j] !== null) v += w[r]! * (raw[r]![j]! - mean[j]!) ** 2;
      sd[j] = sw > 0 && v / sw > 1e-18 ? Math.sqrt(v / sw) : 1;
    }
    const X: Matrix = zeros(m, d);
    for (let r = 0; r < m; r++) for (let j = 0; j < d; j++) X.data[r * d + j] = raw[r]![j] === null ? 0 : (raw[r]![j]! - mean[j]!) / sd[j]!;
    const totalW = w.reduce((a, b) => a + b, 0);
    // The tolerance rule looks at the class's key parameters (ParameterSpec.key; all when none is marked).
    const keys = specs.map((p, j) => (p.key ? j : -1)).filter((j) => j >= 0);
    const checked = keys.length > 0 ? keys : specs.map((_, j) => j);
    const within = (r: number, q: number): boolean => {
      for (const j of checked) {
        const a = raw[r]![j]!;
        const b = raw[q]![j]!;
        if (a === null || b === null) {
          if (a !== b) return false;
        } else if (Math.abs(a - b) > tol[j]! + 1e-12) return false;
      }
      return true;
    };
    const distinct = new Set(raw.map((v) => JSON.stringify(v))).size;
    const kMax = cls.id === "other" || !o.classes.includes(cls.id) ? 1 : Math.min(o.maxK, distinct);
    const tried: { k: number; coverage: number }[] = [];
    let chosen: { labels: Int32Array; med: Int32Array; coverage: number; k: number } | null = null;
    for (let k = 1; k <= kMax; k++) {
      const start = k === 1 ? new Int32Array(m) : kmeans(X, k, { rng: rng.fork(`logical/${cls.id}/${k}`), nInit: o.nInit, weights: w }).labels;
      const { labels, med } = k === 1 ? { labels: start, med: medoids(X, start).indices } : nearestMedoidLabels(X, start);
      let cov = 0;
      for (let r = 0; r < m; r++) if (med[labels[r]!]! >= 0 && within(r, med[labels[r]!]!)) cov += w[r]!;
      const coverage = totalW > 0 ? cov / totalW : 1;
      tried.push({ k, coverage });
      chosen = { labels, med, coverage, k };
      if (coverage >= o.coverage) break;
    }
    const { labels, med, coverage, k } = chosen!;
    if (coverage < o.coverage && kMax > 1)
      warnings.push(`class "${cls.id}": even k = ${k} puts only ${(coverage * 100).toFixed(1)} % of its exposure within tolerance of a representative (target ${(o.coverage * 100).toFixed(0)} %)`);
    let sil: number | null = null;
    let ch: number | null = null;
    let db: number | null = null;
    const used = new Set(Array.from(labels)).size;
    if (k >= 2 && used >= 2 && m > used) {
      // A seeded sample of 2000 rows keeps the per-class report cheap (the exact score costs O(m²)).
      sil = silhouette(X, labels, { rng: rng.fork(`logical/${cls.id}/silhouette`), sampleSize: 2000 });
      ch = calinskiHarabasz(X, labels);
      db = daviesBouldin(X, labels);
    }
    const weak = sil !== null && sil < o.weakSilhouette;
    if (weak) warnings.push(`class "${cls.id}": weak cluster structure (silhouette ${sil!.toFixed(2)} < ${o.weakSilhouette}); its logical scenarios split a continuum rather than separate groups`);
    classes.push({ classId: cls.id, name: cls.name, scenarios: m, k, coverage, tried, silhouette: sil, calinskiHarabasz: ch, daviesBouldin: db, weak });
    const mc: LogicalModelClass = { classId: cls.id, parameters: specs.map((p) => p.name), mean, sd, tolerance: tol, scenarios: [] };
    for (let c = 0; c < k; c++) {
      const rows: number[] = [];
      for (let r = 0; r < m; r++) if (labels[r] === c) rows.push(r);
      if (rows.length === 0) continue;
      const repRow = med[c]!;
      const ls = describeCluster(scenarios, idx, rows, repRow, raw, w, X, specs, cls.id, o.bins);
      for (const r of rows) labelOf[idx[r]!] = fitted.length;
      let radius = 0;
      for (const r of rows) {
        let s = 0;
        for (let j = 0; j < d; j++) s += (X.data[r * d + j]! - X.data[repRow * d + j]!) ** 2;
        radius = Math.max(radius, Math.sqrt(s));
      }
      mc.scenarios.push({ id: ls.id, centre: raw[repRow]!, radius });
      fitted.push(ls);
    }
    model.classes.push(mc);
  }
  return { classes, scenarios: fitted, labelOf, model, warnings };
}

/**
 * From k-means labels to a partition in which every scenario belongs to its nearest representative
 * (exact medoid): alternate "medoid of each cluster" and "nearest medoid" until nothing moves (the
 * Voronoi iteration of k-medoids; each step lowers the sum of distances to the medoids, Park & Jun,
 * Expert Systems with Applications 36, 2009). Assigning a scenario to the nearest representative —
 * what assignLogicalScenarios does for new scenarios — then reproduces the fit's labels exactly.
 */
function nearestMedoidLabels(X: Matrix, start: Int32Array): { labels: Int32Array; med: Int32Array } {
  const { rows: m, cols: d } = X;
  let labels = start;
  let med = medoids(X, labels).indices;
  for (let iter = 0; iter < 100; iter++) {
    const next = new Int32Array(m);
    for (let r = 0; r < m; r++) {
      let best = -1;
      let bestD = Infinity;
      for (let c = 0; c < med.length; c++) {
        const q = med[c]!;
        if (q < 0) continue;
        let s = 0;
        for (let j = 0; j < d; j++) s += (X.data[r * d + j]! - X.data[q * d + j]!) ** 2;
        const dist = Math.sqrt(s);
        if (dist < bestD) {
          bestD = dist;
          best = c;
        }
      }
      next[r] = best;
    }
    let moved = false;
    for (let r = 0; r < m && !moved; r++) moved = next[r] !== labels[r];
    labels = next;
    if (!moved) break;
    const again = medoids(X, labels).indices;
    // A cluster that lost every member keeps no representative; the others move to their new medoid.
    let same = again.length === med.length;
    for (let c = 0; c < again.length && same; c++) same = again[c] === med[c];
    med = again;
    if (same) break;
  }
  return { labels, med };
}

function describeCluster(
  scenarios: readonly Scenario[],
  idx: number[],
  rows: number[],
  repRow: number,
  raw: (number | null)[][],
  w: Float64Array,
  X: Matrix,
  specs: readonly ParameterSpec[],
  classId: ScenarioClassId,
  bins: number,
): FittedLogicalScenario {
  const d = specs.length;
  const cls = scenarioClass(classId);
  const rep = idx[repRow]!;
  const repScenario = scenarios[rep]!;
  const id = `LS-${classId}-${createHash("sha256").update(repScenario.id).digest("hex").slice(0, 8)}`;
  const parameters: LogicalParameter[] = [];
  const marginals: Marginal[] = [];
  const representationError: Record<string, { median: number; p90: number }> = {};
  let wAll = 0;
  for (const r of rows) wAll += w[r]!;
  for (let j = 0; j < d; j++) {
    const spec = specs[j]!;
    const meas = rows.filter((r) => raw[r]![j] !== null);
    const vals = meas.map((r) => raw[r]![j]!);
    const ws = meas.map((r) => w[r]!);
    const order = sortedOrder(vals);
    const sv = order.map((i) => vals[i]!);
    const sw = order.map((i) => ws[i]!);
    let wMeas = 0;
    for (const x of ws) wMeas += x;
    marginals.push({ name: spec.name, values: sv, weights: sw, nullShare: wAll > 0 ? 1 - wMeas / wAll : 0, spec });
    if (vals.length === 0) {
      parameters.push({ name: spec.name, unit: spec.unit, description: spec.description, min: 0, max: 0, p05: 0, p50: 0, p95: 0, measurable: 0, histogram: { edges: [], weights: [] } });
      continue;
    }
    const min = sv[0]!;
    const max = sv[sv.length - 1]!;
    const nb = max > min ? bins : 1;
    const edges = Array.from({ length: nb + 1 }, (_, b) => (b === nb ? max : min + ((max - min) * b) / nb));
    const hw = new Array<number>(nb).fill(0);
    for (let i = 0; i < vals.length; i++) {
      const b = max > min ? Math.min(nb - 1, Math.floor(((vals[i]! - min) / (max - min)) * nb)) : 0;
      hw[b]! += wMeas > 0 ? ws[i]! / wMeas : 0;
    }
    parameters.push({
      name: spec.name,
      unit: spec.unit,
      description: spec.description,
      min,
      max,
      p05: weightedQuantile(sv, sw, 0.05, sv.map((_, i) => i)),
      p50: weightedQuantile(sv, sw, 0.5, sv.map((_, i) => i)),
      p95: weightedQuantile(sv, sw, 0.95, sv.map((_, i) => i)),
      measurable: vals.length,
      histogram: { edges, weights: hw },
    });
    // Representation error: |member − representative| where both are measurable, exposure-weighted.
    const rv = raw[repRow]![j];
    if (rv !== null) {
      const errs = meas.map((r) => Math.abs(raw[r]![j]! - rv));
      representationError[spec.name] = { median: weightedQuantile(errs, ws, 0.5), p90: weightedQuantile(errs, ws, 0.9) };
    }
  }
  // Dependence: Gaussian copula on weighted mid-ranks of the parameters that vary, over complete rows.
  const varying = specs.map((_, j) => j).filter((j) => parameters[j]!.measurable >= 3 && parameters[j]!.max > parameters[j]!.min);
  let dependence: FittedLogicalScenario["dependence"] = null;
  const complete = rows.filter((r) => varying.every((j) => raw[r]![j] !== null));
  if (varying.length >= 2 && complete.length >= 3) {
    const wc = complete.map((r) => w[r]!);
    const W = wc.reduce((a, b) => a + b, 0);
    const Z = varying.map((j) => {
      const v = complete.map((r) => raw[r]![j]!);
      const ord = sortedOrder(v);
      const z = new Array<number>(v.length);
      let c = 0;
      // Ties share the mid-point of their block of cumulative weight.
      for (let p = 0; p < ord.length; ) {
        let q = p;
        let bw = 0;
        while (q < ord.length && v[ord[q]!] === v[ord[p]!]) bw += wc[ord[q++]!]!;
        const u = (c + bw / 2) / W;
        for (let t = p; t < q; t++) z[ord[t]!] = normalQuantile(Math.min(1 - 1e-9, Math.max(1e-9, u)));
        c += bw;
        p = q;
      }
      return z;
    });
    const mu = Z.map((z) => z.reduce((s, x, i) => s + wc[i]! * x, 0) / W);
    const cov = Z.map((za, a) => Z.map((zb, b) => za.reduce((s, x, i) => s + wc[i]! * (x - mu[a]!) * (zb[i]! - mu[b]!), 0) / W));
    const corr = cov.map((row, a) => row.map((c, b) => (a === b ? 1 : c / Math.sqrt(cov[a]![a]! * cov[b]![b]!))));
    dependence = { method: "gaussian-copula", parameters: varying.map((j) => specs[j]!.name), correlation: corr };
  }
  // Spread: RMS standardized deviation from the weighted mean.
  const cen = new Array<number>(d).fill(0);
  for (const r of rows) for (let j = 0; j < d; j++) cen[j]! += (w[r]! * X.data[r * d + j]!) / (wAll || 1);
  let ss = 0;
  for (const r of rows) for (let j = 0; j < d; j++) ss += (w[r]! * (X.data[r * d + j]! - cen[j]!) ** 2) / (wAll || 1);
  const spread = Math.sqrt(ss / d);
  const shown = specs
    .map((p, j) => ({ p, v: raw[repRow]![j] }))
    .filter((x) => x.v !== null && x.p.name !== "egoSpeed")
    .slice(0, 2)
    .map((x) => `${x.p.name} ${sig(x.v!)} ${x.p.unit}`);
  const ego = raw[repRow]![0];
  const name = `${cls.name}${ego !== null && ego !== undefined ? `, ego ${sig(ego)} m/s` : ""}${shown.length > 0 ? `, ${shown.join(", ")}` : ""}`;
  return {
    id,
    classId,
    className: cls.name,
    name,
    members: rows.map((r) => idx[r]!).sort((a, b) => a - b),
    representative: rep,
    parameters,
    dependence,
    representationError,
    marginals,
    spread,
  };
}
