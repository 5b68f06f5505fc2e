/**
 * One table of the defaults that several stages share with the pipeline, so that a stage called on
 * its own (rs.cluster.kmeans, rs.embed.map2d, …) behaves exactly as the pipeline's call of it:
 * the same seed, the same number of k-means restarts, the same range of k, the same 2-D map and
 * the same confidence level. Stage-specific defaults stay in each stage's `…_DEFAULTS` table.
 */
export const DEFAULTS = Object.freeze({
  /** Seed of every random choice when none is given. */
  seed: 1,
  /** k-means restarts (k-means++ initialisation), keeping the lowest inertia. */
  nInit: 4,
  /** Range of k tried when k is chosen by silhouette, [kMin, kMax] (kMax capped at n − 1). */
  kRange: Object.freeze([2, 12]) as readonly [number, number],
  /** 2-D map of the scenarios. */
  map: "umap" as "umap" | "pca",
  /** Confidence level of every interval (Poisson rates, Chao1, zero-failure line). */
  confidence: 0.95,
});
