/** Coverage: scenario type keys, and how complete the catalogue of kinds is. */
export {
  scenarioTypeKey,
  scenarioTypeKeys,
  parseTypeKey,
  resolveTypeKeyOptions,
  TYPE_KEY_DEFAULTS,
  LATERAL_CODES,
  LONGITUDINAL_CODES,
} from "./typeKey.js";
export type { TypeKeyOptions, ResolvedTypeKeyOptions, TypeKeyParts } from "./typeKey.js";
export { abundance, frequencyCounts } from "./abundance.js";
export type { Abundance, FrequencyCounts } from "./abundance.js";
export { unseenMass } from "./unseenMass.js";
export type { UnseenMassMethod } from "./unseenMass.js";
export { chao1, chao1F0 } from "./chao1.js";
export type { Chao1Options, Chao1Result, Chao1Variant } from "./chao1.js";
export { rarefiedRichness, extrapolatedRichness, expectedRichness } from "./rarefaction.js";
export type { ExtrapolationOptions } from "./rarefaction.js";
export { additionalSamplesForShare } from "./samplingEffort.js";
export type { EffortOptions, EffortMethod } from "./samplingEffort.js";
export {
  couponCollector,
  couponCollectorEqual,
  groupProbabilities,
  zipfProbabilities,
  harmonicNumber,
} from "./couponCollector.js";
export type { ProbabilityGroup, GroupedProbabilities, CouponCollectorOptions, CouponCollectorResult } from "./couponCollector.js";
export { zeroFailureDistance, zeroFailureRateBound, KM_PER_MILE } from "./zeroFailure.js";
export { discoveryCurve } from "./discoveryCurve.js";
export type { DiscoveryCurve, DiscoveryCurveOptions } from "./discoveryCurve.js";
export { catalogueCoverage, clusterKinds, resolveCoverageOptions, COVERAGE_DEFAULTS } from "./catalogueCoverage.js";
export type { CoverageOptions, ResolvedCoverageOptions, CoverageEstimate, CouponFigures, EffortRow, NoiseAs } from "./catalogueCoverage.js";
