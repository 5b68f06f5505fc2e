import { InputError } from "../core/errors.js";
import type { Scenario } from "../scenario/types.js";
import { compensatedSum } from "./compensatedSum.js";
import { describeExposure, exposureContext, exposureNote, type ExposureContext, type ExposureFigures, type ExposureOptions } from "./describeExposure.js";

/** One row of the exposure table: a cluster (or the DBSCAN noise, cluster -1) and what it stands for. */
export interface ClusterExposureRow extends ExposureFigures {
  /** Cluster label; -1 for the noise row. */
  cluster: number;
  /** Medoid scenario index and id, when medoids were given (null for noise or an empty cluster). */
  medoid: number | null;
  medoidId: string | null;
}

export interface ExposureTable {
  /** Clusters in ascending label order, then the noise row (if there is noise). */
  rows: ClusterExposureRow[];
  totals: { scenarios: number; km: number; hours: number; drives: number };
  /** Compensated sums of the row shares; both are 1 up to rounding (|sum − 1| < 1e-12). */
  shareSum: number;
  timeShareSum: number;
  note: string;
  warnings: string[];
}

export interface ClusterExposureInput {
  scenarios: readonly Scenario[];
  /** Cluster label per scenario, -1 = noise. */
  labels: Int32Array;
  /** Medoid scenario index per cluster label (index = label), -1 for an empty cluster. */
  medoids?: Int32Array;
}

/** Group scenario indices by label (counting sort); returns the groups for labels 0..K-1 and noise. */
export function groupByLabel(labels: Int32Array, n: number): { clusters: Int32Array[]; noise: Int32Array } {
  if (labels.length !== n) throw new InputError(`labels has ${labels.length} entries but there are ${n} scenarios`, { column: "labels", value: labels.length });
  let k = 0;
  let noiseCount = 0;
  for (let i = 0; i < n; i++) {
    const l = labels[i]!;
    if (l < -1) throw new InputError(`labels[${i}]=${l}; expected a cluster label >= 0 or -1 for noise`, { column: "labels", row: i + 1, value: l });
    if (l === -1) noiseCount++;
    else if (l + 1 > k) k = l + 1;
  }
  const counts = new Int32Array(k);
  for (let i = 0; i < n; i++) if (labels[i]! >= 0) counts[labels[i]!]!++;
  const clusters = Array.from(counts, (c) => new Int32Array(c));
  const fill = new Int32Array(k);
  const noise = new Int32Array(noiseCount);
  let nf = 0;
  for (let i = 0; i < n; i++) {
    const l = labels[i]!;
    if (l === -1) noise[nf++] = i;
    else clusters[l]![fill[l]!++] = i;
  }
  return { clusters, noise };
}

/**
 * The exposure table: for every cluster and for the noise, the vehicle-kilometres and hours it stands
 * for, absolute and as shares (all rows together, noise included, add up to 1), the number of
 * occurrences, the rate per 1000 km with an exact Poisson interval, and the ISO 26262-3 exposure
 * reading (an aid, never a decision).
 */
export function clusterExposure(input: ClusterExposureInput, options: ExposureOptions = {}, context?: ExposureContext): ExposureTable {
  const { scenarios, labels, medoids } = input;
  const ctx = context ?? exposureContext(scenarios, options);
  const { clusters, noise } = groupByLabel(labels, scenarios.length);
  const warnings: string[] = [];
  if (medoids && medoids.length < clusters.length)
    throw new InputError(`medoids has ${medoids.length} entries but labels go up to ${clusters.length - 1}`, { column: "medoids", value: medoids.length });
  const rows: ClusterExposureRow[] = [];
  clusters.forEach((members, c) => {
    if (members.length === 0) {
      warnings.push(`cluster ${c} has no members; it is left out of the exposure table`);
      return;
    }
    let medoid: number | null = null;
    if (medoids) {
      const m = medoids[c]!;
      if (m >= 0) {
        if (m >= scenarios.length || labels[m] !== c)
          throw new InputError(`medoids[${c}]=${m} is not a member of cluster ${c}`, { column: "medoids", row: c + 1, value: m });
        medoid = m;
      } else warnings.push(`cluster ${c} has ${members.length} members but no medoid`);
    }
    rows.push({ cluster: c, medoid, medoidId: medoid === null ? null : scenarios[medoid]!.id, ...describeExposure(ctx, members) });
  });
  if (noise.length > 0) rows.push({ cluster: -1, medoid: null, medoidId: null, ...describeExposure(ctx, noise) });
  return {
    rows,
    totals: { scenarios: ctx.n, km: ctx.totalKm, hours: ctx.totalSeconds / 3600, drives: ctx.drives },
    shareSum: compensatedSum(rows.map((r) => r.share)),
    timeShareSum: compensatedSum(rows.map((r) => r.timeShare)),
    note: exposureNote,
    warnings,
  };
}
