/** cluster/: k-means, choosing k, DBSCAN, medoids, assigning new scenarios, fitted models. */
export { kmeans, absoluteTolerance, shareMatrix, MIN_ROWS_FOR_THREADS } from "./kmeans.js";
export type { KMeansOptions, KMeansResult, KMeansAlgorithm } from "./kmeans.js";
export { kmeansPlusPlus } from "./kmeansPlusPlus.js";
export type { KMeansPlusPlusOptions } from "./kmeansPlusPlus.js";
export { silhouette, silhouetteDetail, calinskiHarabasz, daviesBouldin, SILHOUETTE_SAMPLE_SIZE } from "./metrics.js";
export type { SilhouetteOptions, SilhouetteResult } from "./metrics.js";
export { sweepK, SWEEP_RULE } from "./sweepK.js";
export type { SweepKOptions, SweepKRow, SweepKResult } from "./sweepK.js";
export { dbscan } from "./dbscan.js";
export type { DbscanOptions, DbscanResult } from "./dbscan.js";
export { suggestEps, kneeOfIncreasing, SUGGEST_EPS_METHOD } from "./suggestEps.js";
export type { SuggestEpsOptions, SuggestEpsResult } from "./suggestEps.js";
export { medoids } from "./medoids.js";
export type { MedoidsOptions, MedoidsResult } from "./medoids.js";
export { kmeansModel, dbscanModel, modelToJSON, modelFromJSON, NOVELTY_QUANTILE } from "./model.js";
export type { ClusterModel, KMeansModel, DbscanModel } from "./model.js";
export { assign } from "./assign.js";
export type { AssignResult } from "./assign.js";
export { fitClustering, resolveClusteringOptions, CLUSTERING_DEFAULTS } from "./fitClustering.js";
export type { ClusteringOptions, ResolvedClusteringOptions, FitClusteringOptions, FitClusteringResult, ClusteringDbscan } from "./fitClustering.js";
export {
  clusteringModelToJson,
  clusteringModelFromJson,
  saveClusteringModel,
  loadClusteringModel,
  CLUSTERING_MODEL_FORMAT,
  CLUSTERING_MODEL_VERSION,
  checkModelFeatures,
} from "./clusteringModel.js";
export type { ClusteringModel } from "./clusteringModel.js";
export { assignScenarios } from "./assignScenarios.js";
export type { AssignScenariosResult, EmbeddingFeatures } from "./assignScenarios.js";
