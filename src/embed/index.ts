/** Scenario embedding: named features, scaling. */
export { embedScenarios, describeFeatures, rawFeatures, FEATURE_GROUPS, THW_CAP_S, DRAC_CAP, INVERSE_TTC_CAP } from "./features.js";
export type { FeatureInfo, FeatureGroup, EmbedOptions, Embedding } from "./features.js";
export { standardize, applyStandardization } from "./scale.js";
export type { StandardizeOptions, Standardization } from "./scale.js";
export { pca, pcaTransform } from "./pca.js";
export type { PcaResult } from "./pca.js";
export { map2d, membership, UMAP_PLACEMENT } from "./map2d.js";
export type { Map2dOptions, Map2dResult, Map2dMethod } from "./map2d.js";
