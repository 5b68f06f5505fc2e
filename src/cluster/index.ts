/** cluster/: k-means, choosing k, DBSCAN, medoids, assigning new scenarios, fitted models. */
export { kmeans, absoluteTolerance, MIN_ROWS_FOR_THREADS } from "./kmeans.js";
export type { KMeansOptions, KMeansResult, KMeansAlgorithm } from "./kmeans.js";
export { kmeansPlusPlus } from "./kmeansPlusPlus.js";
export type { KMeansPlusPlusOptions } from "./kmeansPlusPlus.js";
