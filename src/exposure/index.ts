/** Exposure: what each cluster and test case stands for in kilometres, hours, shares and rates. */
export { logGamma, regularizedGammaP, regularizedGammaQ, inverseRegularizedGamma, chiSquareQuantile, erfc, normalQuantile, normalQuantileUpper } from "./gamma.js";
export { poissonInterval, poissonRate, checkLevel } from "./poissonInterval.js";
export type { Interval, RateEstimate } from "./poissonInterval.js";
export { compensatedSum, toShares } from "./compensatedSum.js";
export { scenarioWeights, WEIGHT_BY } from "./sampleWeights.js";
export type { WeightBy } from "./sampleWeights.js";
export {
  exposureClassByTimeShare,
  exposureClassByFrequency,
  FREQUENCY_WORDING,
  EXPOSURE_AID_NOTE,
} from "./exposureClass.js";
export type { DurationClass, FrequencyClass, FrequencyBasis, FrequencyReading } from "./exposureClass.js";
export { exposureContext, describeExposure, resolveExposureOptions, EXPOSURE_DEFAULTS } from "./describeExposure.js";
export type { ExposureOptions, ResolvedExposureOptions, ExposureContext, ExposureFigures, RatePer1000km } from "./describeExposure.js";
export { clusterExposure, groupByLabel } from "./clusterExposure.js";
export type { ClusterExposureRow, ClusterExposureInput, ExposureTable } from "./clusterExposure.js";
