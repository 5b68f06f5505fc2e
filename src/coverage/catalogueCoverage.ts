import { renameDeprecated } from "../core/aliases.js";
import { DEFAULTS } from "../core/defaults.js";
import { InputError } from "../core/errors.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { checkLevel } from "../exposure/poissonInterval.js";
import { abundance, frequencyCounts } from "./abundance.js";
import { chao1, type Chao1Result, type Chao1Variant } from "./chao1.js";
import { couponCollector, couponCollectorEqual, groupProbabilities, harmonicNumber } from "./couponCollector.js";
import { discoveryCurve, type DiscoveryCurve } from "./discoveryCurve.js";
import { additionalSamplesForShare, type EffortMethod } from "./samplingEffort.js";
import { unseenMass } from "./unseenMass.js";

export interface CoverageOptions {
  /** Confidence level of the Chao1 interval (default DEFAULTS.confidence = 0.95). */
  confidence?: number;
  /** @deprecated use confidence (accepted for one version). */
  level?: number;
  /** Chao1 variant (default "bias-corrected"). */
  chao1Variant?: Chao1Variant;
  /** Use the (n − 1)/n factor in Chao1 (default false). */
  finiteSampleFactor?: boolean;
  /** Shares of the estimated kinds for which to report the further driving needed (default [0.9, 0.95, 0.99]). */
  targetShares?: number[];
  /** Formula for the further driving (default "chao2009"). */
  effortMethod?: EffortMethod;
  /** Probability for the coupon-collector quantile (default 0.95). */
  couponQuantile?: number;
  /** Relative spread allowed when merging near-equal probabilities for the coupon collector (default 1e-3). */
  couponRelTol?: number;
  /** Points on the expected discovery curve (default 40). */
  knots?: number;
  /** End of the expected discovery curve as a multiple of the scenarios in hand (default 2). */
  endpointFactor?: number;
  /** Most points on the observed discovery curve (default 200). */
  maxObservedPoints?: number;
}

interface CoverageDefaults {
  confidence: number;
  chao1Variant: Chao1Variant;
  finiteSampleFactor: boolean;
  targetShares: number[];
  effortMethod: EffortMethod;
  couponQuantile: number;
  couponRelTol: number;
  knots: number;
  endpointFactor: number;
  maxObservedPoints: number;
}
export type ResolvedCoverageOptions = CoverageDefaults;

export const COVERAGE_DEFAULTS: Readonly<CoverageDefaults> = {
  confidence: DEFAULTS.confidence,
  chao1Variant: "bias-corrected",
  finiteSampleFactor: false,
  targetShares: [0.9, 0.95, 0.99],
  effortMethod: "chao2009",
  couponQuantile: 0.95,
  couponRelTol: 1e-3,
  knots: 40,
  endpointFactor: 2,
  maxObservedPoints: 200,
};

export function resolveCoverageOptions(options: CoverageOptions = {}): ResolvedCoverageOptions {
  const o: CoverageDefaults = { ...COVERAGE_DEFAULTS, targetShares: [...COVERAGE_DEFAULTS.targetShares] };
  const given = renameDeprecated(options, { level: "confidence" }, "coverage options");
  for (const k of Object.keys(given) as (keyof CoverageOptions)[]) if (given[k] !== undefined) (o as unknown as Record<string, unknown>)[k] = given[k];
  checkLevel(o.confidence);
  for (const g of o.targetShares)
    if (!(g > 0 && g < 1)) throw new InputError(`targetShares contains ${g}; each share should be strictly between 0 and 1`, { column: "targetShares", value: g });
  if (!(o.couponQuantile > 0 && o.couponQuantile < 1))
    throw new InputError(`couponQuantile=${o.couponQuantile} should be strictly between 0 and 1`, { column: "couponQuantile", value: o.couponQuantile });
  if (!(o.couponRelTol >= 0 && o.couponRelTol < 0.1))
    throw new InputError(`couponRelTol=${o.couponRelTol} should be in [0, 0.1)`, { column: "couponRelTol", value: o.couponRelTol });
  return o;
}

export interface EffortRow {
  /** Share g of the estimated kinds. */
  share: number;
  /** g · Ŝ. */
  targetKinds: number;
  additionalScenarios: number;
  additionalKm: number;
}

export interface CouponFigures {
  /** Kinds in the model. */
  kinds: number;
  /** Expected scenarios (and km) from scratch until every kind has appeared. */
  expectedScenarios: number;
  expectedKm: number;
  /** Quantile of the Poissonized collection time, in scenarios and km. */
  quantile: { q: number; scenarios: number; km: number };
  /** Expected further scenarios (and km) until every kind not seen yet has appeared. */
  additionalScenarios: number;
  additionalKm: number;
  relativeErrorBound: number;
}

export interface CoverageEstimate {
  /** What the kinds are: "type keys" or "clusters". */
  kinds: string;
  scenarios: number;
  km: number;
  kmPerScenario: number;
  /** Distinct kinds seen, singletons f1 and doubletons f2. */
  observed: number;
  singletons: number;
  doubletons: number;
  /** Good–Turing f1 / n: the chance that the next scenario is of a kind not seen yet. */
  unseenMass: number;
  /** The Chao–Jost (2012) refinement of the same quantity. */
  unseenMassChaoJost: number;
  chao1: Chao1Result;
  /** Further driving to expect to see a share of the estimated kinds (Chao et al. 2009). */
  effort: EffortRow[];
  /**
   * Coupon-collector views. "equal": all S_obs + round(f0) kinds equally likely (n·H_n). "estimated":
   * the observed frequencies scaled by (1 − u), plus round(f0) unseen kinds sharing u equally, with u
   * the Chao–Jost unseen mass (a rough model of the tail; the true rare kinds may be rarer).
   */
  couponCollector: { equal: CouponFigures; estimated: CouponFigures; note: string };
  discovery: DiscoveryCurve;
  /** Every kind with its count, most frequent first. */
  table: { kind: string; count: number }[];
}

/**
 * How complete the catalogue is, for one way of telling kinds apart (type keys or clusters): kinds
 * seen, unseen probability mass, Chao1 with its interval, the further driving needed to see a share
 * of the estimated kinds, coupon-collector projections and discovery curves. `km` gives each
 * scenario's kilometres (in the same order as `kinds`).
 */
export function catalogueCoverage(
  kinds: ArrayLike<string | number>,
  km: ArrayLike<number>,
  options: CoverageOptions | ResolvedCoverageOptions = {},
  label = "kinds",
): CoverageEstimate {
  const o = resolveCoverageOptions(options);
  const n = kinds.length;
  if (n === 0) throw new InputError(`coverage of ${label} needs at least one scenario`);
  if (km.length !== n) throw new InputError(`km has ${km.length} values but there are ${n} scenarios`, { column: "km", value: km.length });
  const ab = abundance(Array.from({ length: n }, (_, i) => kinds[i]!));
  const counts = ab.counts;
  const fc = frequencyCounts(counts);
  const totalKm = compensatedSum(km);
  const kmPer = totalKm / n;
  const c1 = chao1(counts, { variant: o.chao1Variant, finiteSampleFactor: o.finiteSampleFactor, confidence: o.confidence });
  const f0opts = { f0: c1.f0 };
  const effort = o.targetShares.map((g) => {
    const add = additionalSamplesForShare(counts, g, { ...f0opts, method: o.effortMethod });
    return { share: g, targetKinds: g * c1.estimate, additionalScenarios: add, additionalKm: add * kmPer };
  });
  const q = o.couponQuantile;
  const u = unseenMass(counts, "good-turing");
  // The coupon model shares out the Chao–Jost unseen mass: unlike f1/n it stays below 1 when every
  // kind was seen once, so the observed kinds keep a positive probability.
  const uModel = unseenMass(counts, "chao-jost");
  const f0r = c1.f0 > 0 && uModel > 0 ? Math.max(1, Math.round(c1.f0)) : 0;

  // Equal probabilities over the estimated number of kinds.
  const sEq = fc.sObs + f0r;
  const eq = couponCollectorEqual(sEq, { quantiles: [q] });
  const equal: CouponFigures = {
    kinds: sEq,
    expectedScenarios: eq.expected,
    expectedKm: eq.expected * kmPer,
    quantile: { q, scenarios: eq.quantiles[0]!.draws, km: eq.quantiles[0]!.draws * kmPer },
    // f0r specific kinds of probability 1/S each: E = S · H_{f0r}.
    additionalScenarios: sEq * harmonicNumber(f0r),
    additionalKm: sEq * harmonicNumber(f0r) * kmPer,
    relativeErrorBound: 0,
  };

  // Observed frequencies plus an equal share of the unseen mass for each estimated unseen kind.
  const probs = counts.map((c) => (c / fc.n) * (1 - (f0r > 0 ? uModel : 0)));
  const grouped = groupProbabilities(probs, o.couponRelTol);
  if (f0r > 0) grouped.groups.push({ p: uModel / f0r, count: f0r });
  grouped.types += f0r;
  const est = couponCollector(grouped, { quantiles: [q] });
  // f0r kinds of probability uModel/f0r each: E = H_{f0r} · f0r / uModel.
  const addEst = f0r > 0 ? (harmonicNumber(f0r) * f0r) / uModel : 0;
  const estimated: CouponFigures = {
    kinds: est.types,
    expectedScenarios: est.expected,
    expectedKm: est.expected * kmPer,
    quantile: { q, scenarios: est.quantiles[0]!.draws, km: est.quantiles[0]!.draws * kmPer },
    additionalScenarios: addEst,
    additionalKm: addEst * kmPer,
    relativeErrorBound: est.relativeErrorBound,
  };

  return {
    kinds: label,
    scenarios: n,
    km: totalKm,
    kmPerScenario: kmPer,
    observed: fc.sObs,
    singletons: fc.f1,
    doubletons: fc.f2,
    unseenMass: u,
    unseenMassChaoJost: unseenMass(counts, "chao-jost"),
    chao1: c1,
    effort,
    couponCollector: {
      equal,
      estimated,
      note: "scenarios are treated as independent draws; km = scenarios × mean km per scenario; quantiles are of the Poissonized collection time",
    },
    discovery: discoveryCurve(kinds, km, { f0: c1.f0, knots: o.knots, endpointFactor: o.endpointFactor, maxObservedPoints: o.maxObservedPoints }),
    table: ab.kinds.map((k, i) => ({ kind: String(k), count: counts[i]! })),
  };
}

export type NoiseAs = "singletons" | "excluded";

/**
 * Kinds for cluster coverage: the cluster label as "c<label>", and each DBSCAN noise scenario either
 * as a kind of its own ("noise:<index>", the cautious reading: a situation that recurred nowhere else)
 * or left out. Returns the kinds and the scenario indices they belong to.
 */
export function clusterKinds(labels: Int32Array, noiseAs: NoiseAs = "singletons"): { kinds: string[]; indices: Int32Array } {
  const kinds: string[] = [];
  const idx: number[] = [];
  for (let i = 0; i < labels.length; i++) {
    const l = labels[i]!;
    if (l >= 0) {
      kinds.push(`c${l}`);
      idx.push(i);
    } else if (noiseAs === "singletons") {
      kinds.push(`noise:${i}`);
      idx.push(i);
    } else if (noiseAs !== "excluded") {
      const never: never = noiseAs;
      throw new InputError(`noiseAs="${String(never)}" should be "singletons" or "excluded"`);
    }
  }
  return { kinds, indices: Int32Array.from(idx) };
}
