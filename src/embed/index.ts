/** Scenario embedding: named features, scaling. */
export { embedScenarios, describeFeatures, rawFeatures, FEATURE_GROUPS, THW_CAP_S, DRAC_CAP, INVERSE_TTC_CAP } from "./features.js";
export type { FeatureInfo, FeatureGroup, EmbedOptions, Embedding } from "./features.js";
export { standardize, applyStandardization } from "./scale.js";
export type { StandardizeOptions, Standardization } from "./scale.js";
