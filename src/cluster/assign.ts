import type { Matrix } from "../core/matrix.js";
import { InputError } from "../core/errors.js";
import { checkMatrix } from "./_validate.js";
import { KdTree } from "./_kdtree.js";
import type { ClusterModel } from "./model.js";

export interface AssignResult {
  /** Cluster per new row; -1 (DBSCAN only) = noise: not within eps of any core row. */
  labels: Int32Array;
  /** Euclidean distance to the nearest centroid (k-means) or nearest core row (DBSCAN). */
  distance: Float64Array;
  /**
   * Novelty score: k-means — distance / the cluster's 95th-percentile training distance (> 1: farther
   * out than 95 % of the cluster's own rows); DBSCAN — distance / eps (> 1: noise, a new kind of scenario).
   */
  novelty: Float64Array;
  warnings: string[];
}

/**
 * Assign new scenarios to a fitted model. k-means: nearest centroid (ties to the lower index), the
 * rule k-means itself uses. DBSCAN: a row within eps (inclusive) of a core row belongs to that core
 * row's cluster — the rule that makes a row a border row (Ester et al. 1996, Def. 2–5); with core
 * rows of several clusters within eps the lowest-numbered cluster wins, as in dbscan — otherwise noise
 * (-1). So assigning the training rows reproduces dbscan's labels. New rows never become core: the
 * model does not change.
 */
export function assign(model: ClusterModel, X: Matrix): AssignResult {
  checkMatrix(X, "X", 0);
  const n = X.rows;
  const d = X.cols;
  const labels = new Int32Array(n);
  const distance = new Float64Array(n);
  const novelty = new Float64Array(n);
  const warnings: string[] = [];
  switch (model.kind) {
    case "kmeans": {
      const C = model.centroids;
      if (C.cols !== d) throw new InputError(`X has ${d} columns; the model was fitted on ${C.cols}`);
      for (let i = 0; i < n; i++) {
        let best = 0;
        let bd = Infinity;
        for (let j = 0; j < C.rows; j++) {
          let s = 0;
          for (let t = 0; t < d; t++) {
            const a = X.data[i * d + t]! - C.data[j * d + t]!;
            s += a * a;
          }
          if (s < bd) {
            bd = s;
            best = j;
          }
        }
        labels[i] = best;
        distance[i] = Math.sqrt(bd);
        const sc = model.scale[best]!;
        novelty[i] = sc > 0 ? distance[i]! / sc : distance[i] === 0 ? 0 : Infinity;
      }
      return { labels, distance, novelty, warnings };
    }
    case "dbscan": {
      const core = model.core;
      if (core.cols !== d) throw new InputError(`X has ${d} columns; the model was fitted on ${core.cols}`);
      if (core.rows === 0) {
        labels.fill(-1);
        distance.fill(Infinity);
        novelty.fill(Infinity);
        warnings.push("the model has no core rows: every new row is noise");
        return { labels, distance, novelty, warnings };
      }
      const tree = new KdTree(core);
      const idx = new Int32Array(1);
      const d2 = new Float64Array(1);
      const eps2 = model.eps * model.eps;
      const near: number[] = [];
      for (let i = 0; i < n; i++) {
        tree.knn(X.data, i * d, 1, idx, d2);
        distance[i] = Math.sqrt(d2[0]!);
        if (d2[0]! <= eps2) {
          // Several clusters may have a core row within eps: the lowest-numbered one, as in training.
          near.length = 0;
          tree.radius(X.data, i * d, eps2, near);
          let l = model.coreLabels[idx[0]!]!;
          for (const c of near) if (model.coreLabels[c]! < l) l = model.coreLabels[c]!;
          labels[i] = l;
        } else labels[i] = -1;
        novelty[i] = distance[i]! / model.eps;
      }
      return { labels, distance, novelty, warnings };
    }
    default: {
      const never: never = model;
      throw new InputError(`unknown model kind ${JSON.stringify((never as { kind: unknown }).kind)}`);
    }
  }
}
