import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { VERSION } from "../core/version.js";
import { checkMatrix } from "./_validate.js";
import type { KMeansResult } from "./kmeans.js";
import type { DbscanResult } from "./dbscan.js";

/** A fitted k-means model: enough to assign new scenarios. */
export interface KMeansModel {
  kind: "kmeans";
  centroids: Matrix;
  /**
   * Per cluster, the 95th percentile of the training rows' distances to their centroid (0 for a
   * cluster whose rows all sit on it). Novelty = distance / scale: above 1 means farther out than 95 %
   * of the cluster's own training rows.
   */
  scale: Float64Array;
  inertia: number;
}

/** A fitted DBSCAN model: the core rows with their clusters, eps and minPts. */
export interface DbscanModel {
  kind: "dbscan";
  eps: number;
  minPts: number;
  /** The core rows (copies), one per row of this matrix. */
  core: Matrix;
  /** Cluster of each core row. */
  coreLabels: Int32Array;
  nClusters: number;
}

export type ClusterModel = KMeansModel | DbscanModel;

/** Quantile used for KMeansModel.scale (common practice for a novelty radius; adjustable later). */
export const NOVELTY_QUANTILE = 0.95;

/** Build a k-means model from the training rows and the fit. */
export function kmeansModel(X: Matrix, fit: KMeansResult): KMeansModel {
  checkMatrix(X, "X");
  const { centroids, labels } = fit;
  if (labels.length !== X.rows) throw new InputError(`fit.labels.length=${labels.length} should equal X.rows=${X.rows}`);
  if (centroids.cols !== X.cols) throw new InputError(`centroids have ${centroids.cols} columns; X has ${X.cols}`);
  const k = centroids.rows;
  const d = X.cols;
  const per: number[][] = Array.from({ length: k }, () => []);
  for (let i = 0; i < X.rows; i++) {
    const c = labels[i]!;
    let s = 0;
    for (let t = 0; t < d; t++) s += (X.data[i * d + t]! - centroids.data[c * d + t]!) ** 2;
    per[c]!.push(Math.sqrt(s));
  }
  const scale = new Float64Array(k);
  for (let c = 0; c < k; c++) scale[c] = quantile(per[c]!, NOVELTY_QUANTILE);
  return { kind: "kmeans", centroids: { data: centroids.data.slice(), rows: k, cols: d }, scale, inertia: fit.inertia };
}

/** Build a DBSCAN model from the training rows and the fit (keeps a copy of the core rows). */
export function dbscanModel(X: Matrix, fit: DbscanResult): DbscanModel {
  checkMatrix(X, "X");
  if (fit.labels.length !== X.rows) throw new InputError(`fit.labels.length=${fit.labels.length} should equal X.rows=${X.rows}`);
  const d = X.cols;
  let m = 0;
  for (let i = 0; i < X.rows; i++) m += fit.core[i]!;
  const core: Matrix = { data: new Float64Array(m * d), rows: m, cols: d };
  const coreLabels = new Int32Array(m);
  let p = 0;
  for (let i = 0; i < X.rows; i++) {
    if (!fit.core[i]) continue;
    core.data.set(X.data.subarray(i * d, (i + 1) * d), p * d);
    coreLabels[p++] = fit.labels[i]!;
  }
  return { kind: "dbscan", eps: fit.eps, minPts: fit.minPts, core, coreLabels, nClusters: fit.nClusters };
}

/** Linear-interpolation quantile of unsorted values (numpy's default "linear" method). */
function quantile(values: number[], q: number): number {
  if (values.length === 0) return 0;
  const s = values.slice().sort((a, b) => a - b);
  const h = (s.length - 1) * q;
  const lo = Math.floor(h);
  const hi = Math.min(s.length - 1, lo + 1);
  return s[lo]! + (h - lo) * (s[hi]! - s[lo]!);
}

const FORMAT = "roadsieve/cluster-model";

/** Serialise a fitted model as JSON text (numbers round-trip exactly). */
export function modelToJSON(model: ClusterModel): string {
  const m = (x: Matrix) => ({ rows: x.rows, cols: x.cols, data: Array.from(x.data) });
  switch (model.kind) {
    case "kmeans":
      return JSON.stringify({
        format: FORMAT,
        formatVersion: 1,
        writtenBy: `roadsieve ${VERSION}`,
        kind: "kmeans",
        centroids: m(model.centroids),
        scale: Array.from(model.scale),
        inertia: model.inertia,
      });
    case "dbscan":
      return JSON.stringify({
        format: FORMAT,
        formatVersion: 1,
        writtenBy: `roadsieve ${VERSION}`,
        kind: "dbscan",
        eps: model.eps,
        minPts: model.minPts,
        nClusters: model.nClusters,
        core: m(model.core),
        coreLabels: Array.from(model.coreLabels),
      });
    default: {
      const never: never = model;
      throw new InputError(`unknown model kind ${JSON.stringify((never as { kind: unknown }).kind)}`);
    }
  }
}

/** Read a model written by modelToJSON; every field is checked and a bad one is named. */
export function modelFromJSON(text: string, file?: string): ClusterModel {
  let o: Record<string, unknown>;
  try {
    o = JSON.parse(text) as Record<string, unknown>;
  } catch (e) {
    throw new InputError(`not valid JSON: ${(e as Error).message}`, { file });
  }
  const bad = (field: string, expected: string): never => {
    throw new InputError(`field "${field}" should be ${expected}`, { file, column: field, value: JSON.stringify(o?.[field])?.slice(0, 80) });
  };
  if (!o || typeof o !== "object" || o.format !== FORMAT) bad("format", JSON.stringify(FORMAT));
  if (o.formatVersion !== 1) bad("formatVersion", "1");
  const num = (field: string, min: number): number => {
    const v = o[field];
    if (typeof v !== "number" || !Number.isFinite(v) || v < min) bad(field, `a finite number >= ${min}`);
    return v as number;
  };
  const matrix = (field: string): Matrix => {
    const v = o[field] as { rows?: unknown; cols?: unknown; data?: unknown };
    if (!v || typeof v !== "object" || !Number.isInteger(v.rows) || !Number.isInteger(v.cols) || !Array.isArray(v.data))
      bad(field, "{ rows, cols, data: number[] }");
    const rows = v.rows as number;
    const cols = v.cols as number;
    const data = v.data as unknown[];
    if (data.length !== rows * cols || !data.every((x) => typeof x === "number" && Number.isFinite(x)))
      bad(field, `rows*cols = ${rows * cols} finite numbers`);
    return { rows, cols, data: Float64Array.from(data as number[]) };
  };
  const array = (field: string, length: number, integer: boolean): number[] => {
    const v = o[field];
    if (!Array.isArray(v) || v.length !== length || !v.every((x) => typeof x === "number" && Number.isFinite(x) && (!integer || Number.isInteger(x))))
      bad(field, `an array of ${length} ${integer ? "integers" : "finite numbers"}`);
    return v as number[];
  };
  switch (o.kind) {
    case "kmeans": {
      const centroids = matrix("centroids");
      return { kind: "kmeans", centroids, scale: Float64Array.from(array("scale", centroids.rows, false)), inertia: num("inertia", 0) };
    }
    case "dbscan": {
      const core = matrix("core");
      const nClusters = num("nClusters", 0);
      const coreLabels = Int32Array.from(array("coreLabels", core.rows, true));
      for (const l of coreLabels) if (l < 0 || l >= nClusters) bad("coreLabels", `integers in [0, nClusters=${nClusters})`);
      return { kind: "dbscan", eps: num("eps", Number.MIN_VALUE), minPts: num("minPts", 1), nClusters, core, coreLabels };
    }
    default:
      return bad("kind", '"kmeans" or "dbscan"');
  }
}
