/** Comparing catalogues and condition groups, and diffing plan versions. */
export { compareCatalogues, resolveCompareOptions, COMPARE_DEFAULTS, COMPARE_CAUTIONS } from "./compareCatalogues.js";
export type { CompareOptions, ResolvedCompareOptions, CatalogueComparison, CategoryComparison, SideFigures } from "./compareCatalogues.js";
export { sampleFromResult, subsetSample, splitByCondition, makingOfResult, makingOfProvenance } from "./catalogueSample.js";
export type { CatalogueSample, CatalogueMaking } from "./catalogueSample.js";
export { catalogueDifferences } from "./catalogueDifferences.js";
export { homogeneityTest, poolSparseCategories, chiSquareSurvival } from "./homogeneityTest.js";
export type { HomogeneityResult, TestStatistic } from "./homogeneityTest.js";
export { energyDistanceTest, chiSquarePermutationTest } from "./permutationTests.js";
export type { PermutationResult, PermutationUnits } from "./permutationTests.js";
export { wilsonInterval, newcombeDifference } from "./proportionDifference.js";
export type { ProportionInterval } from "./proportionDifference.js";
export { diffPlans } from "./diffPlans.js";
export type { DiffablePlan, DiffableTestCase, DiffableLogicalScenario, PlanDiff, EntryDiff, KeptEntry } from "./diffPlans.js";
export { readPlanFolder, readPlanJson, diffPlanFiles } from "./readPlanFolder.js";
export type { PlanFolder } from "./readPlanFolder.js";
export { comparisonSummary, planDiffSummary } from "./comparisonSummary.js";
export { typeKeyParent, coarsenSparseCategories } from "./homogeneityTest.js";
