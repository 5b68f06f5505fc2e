import { InputError } from "../core/errors.js";
import type { CoverageOptions, NoiseAs } from "../coverage/catalogueCoverage.js";
import { resolveCoverageOptions } from "../coverage/catalogueCoverage.js";
import { KM_PER_MILE } from "../coverage/zeroFailure.js";
import { resolveTypeKeyOptions, type TypeKeyOptions } from "../coverage/typeKey.js";
import { resolveExposureOptions, type ExposureOptions } from "../exposure/describeExposure.js";

export type CriticalPolicy = "each" | "most-critical-per-type";

export interface TestPlanOptions {
  /** Most test cases (integer >= 1). Critical and rare scenarios are kept even beyond it, with a warning. */
  budget?: number;
  /** Stop adding representatives once the test cases stand for this share of the weight (0 < share <= 1). */
  targetShare?: number;
  /** What orders the clusters and what targetShare counts: "km" (default) or "hours". */
  weightBy?: "km" | "hours";
  /** A scenario is critical when its minimum TTC is below this (s; default 1.5, common practice). */
  ttcBelow?: number;
  /** … or its minimum time headway is below this (s; default 0.5, common practice). */
  thwBelow?: number;
  /** … or a cut-in happens in the window and its minimum time headway is below this (s; default 1.0, common practice). */
  cutInThwBelow?: number;
  /** … or the ego's peak deceleration is above this (m/s²; default 4, about 0.4 g: common practice for hard braking). */
  decelAbove?: number;
  /** … or it carries one of these criticality flags (default none). */
  criticalFlags?: string[];
  /**
   * "each" (default): every critical scenario no representative is is a test case of its own.
   * "most-critical-per-type": critical scenarios of one cluster and type key are represented by the
   * most critical of them (lowest TTC, then THW, then highest deceleration), or by the cluster's
   * medoid when that is critical with the same type key; the others are listed as its members.
   */
  criticalPolicy?: CriticalPolicy;
  /** Keep every DBSCAN noise scenario as a test case (default true). */
  includeNoise?: boolean;
  /** Keep every scenario whose type key occurs only once (default true). */
  includeSingletonTypes?: boolean;
  /** How noise counts in the cluster coverage figures (default "singletons"). */
  clusterNoise?: NoiseAs;
  /** Most members listed per test case in plan.json (default: all). */
  maxMembersListed?: number;
  typeKey?: TypeKeyOptions;
  coverage?: CoverageOptions;
  exposure?: ExposureOptions;
  /** Confidence of the zero-failure line (default 0.95). */
  zeroFailureConfidence?: number;
  /**
   * Reference rate (events per km) for the zero-failure line; default 1.09 per 100 million miles
   * (the US fatality rate used by Kalra & Paddock 2016). null leaves the comparison out.
   */
  zeroFailureReferencePerKm?: number | null;
  zeroFailureReferenceLabel?: string;
}

interface PlanDefaults {
  weightBy: "km" | "hours";
  ttcBelow: number;
  thwBelow: number;
  cutInThwBelow: number;
  decelAbove: number;
  criticalFlags: string[];
  criticalPolicy: CriticalPolicy;
  includeNoise: boolean;
  includeSingletonTypes: boolean;
  clusterNoise: NoiseAs;
  maxMembersListed: number;
  zeroFailureConfidence: number;
  zeroFailureReferencePerKm: number | null;
  zeroFailureReferenceLabel: string;
}

export const PLAN_DEFAULTS: Readonly<PlanDefaults> = {
  weightBy: "km",
  ttcBelow: 1.5,
  thwBelow: 0.5,
  cutInThwBelow: 1.0,
  decelAbove: 4,
  criticalFlags: [],
  criticalPolicy: "each",
  includeNoise: true,
  includeSingletonTypes: true,
  clusterNoise: "singletons",
  maxMembersListed: Infinity,
  zeroFailureConfidence: 0.95,
  zeroFailureReferencePerKm: 1.09e-8 / KM_PER_MILE,
  zeroFailureReferenceLabel: "1.09 fatalities per 100 million miles (US human drivers, as used by Kalra & Paddock 2016)",
};

export type ResolvedTestPlanOptions = PlanDefaults & {
  budget: number | null;
  targetShare: number | null;
  typeKey: ReturnType<typeof resolveTypeKeyOptions>;
  coverage: ReturnType<typeof resolveCoverageOptions>;
  exposure: ReturnType<typeof resolveExposureOptions>;
};

function bad(name: string, value: unknown, expected: string): never {
  throw new InputError(`${name}=${JSON.stringify(value)} should be ${expected}`, { column: name, value: String(value) });
}

/** Resolve defaults and validate every plan option once. */
export function resolveTestPlanOptions(options: TestPlanOptions = {}): ResolvedTestPlanOptions {
  const o = { ...PLAN_DEFAULTS, criticalFlags: [...PLAN_DEFAULTS.criticalFlags] } as PlanDefaults;
  for (const k of Object.keys(PLAN_DEFAULTS) as (keyof PlanDefaults)[]) {
    const v = (options as Record<string, unknown>)[k];
    if (v !== undefined) (o as unknown as Record<string, unknown>)[k] = v;
  }
  const budget = options.budget ?? null;
  const targetShare = options.targetShare ?? null;
  if (budget !== null && !(Number.isInteger(budget) && budget >= 1)) bad("budget", budget, "an integer >= 1");
  if (targetShare !== null && !(targetShare > 0 && targetShare <= 1)) bad("targetShare", targetShare, "a share in (0, 1]");
  if (o.weightBy !== "km" && o.weightBy !== "hours") bad("weightBy", o.weightBy, `"km" or "hours"`);
  if (!(o.ttcBelow >= 0)) bad("ttcBelow", o.ttcBelow, "a time in s >= 0");
  if (!(o.thwBelow >= 0)) bad("thwBelow", o.thwBelow, "a time in s >= 0");
  if (!(o.cutInThwBelow >= 0)) bad("cutInThwBelow", o.cutInThwBelow, "a time in s >= 0 (0 switches it off)");
  if (!(o.decelAbove > 0)) bad("decelAbove", o.decelAbove, "a deceleration in m/s² > 0 (Infinity switches it off)");
  if (!Array.isArray(o.criticalFlags) || o.criticalFlags.some((f) => typeof f !== "string")) bad("criticalFlags", o.criticalFlags, "an array of flag names");
  if (o.criticalPolicy !== "each" && o.criticalPolicy !== "most-critical-per-type")
    bad("criticalPolicy", o.criticalPolicy, `"each" or "most-critical-per-type"`);
  if (o.clusterNoise !== "singletons" && o.clusterNoise !== "excluded") bad("clusterNoise", o.clusterNoise, `"singletons" or "excluded"`);
  if (!(o.maxMembersListed === Infinity || (Number.isInteger(o.maxMembersListed) && o.maxMembersListed >= 1)))
    bad("maxMembersListed", o.maxMembersListed, "an integer >= 1");
  if (!(o.zeroFailureConfidence > 0 && o.zeroFailureConfidence < 1)) bad("zeroFailureConfidence", o.zeroFailureConfidence, "strictly between 0 and 1");
  if (o.zeroFailureReferencePerKm !== null && !(o.zeroFailureReferencePerKm > 0 && Number.isFinite(o.zeroFailureReferencePerKm)))
    bad("zeroFailureReferencePerKm", o.zeroFailureReferencePerKm, "a rate per km > 0, or null");
  return {
    ...o,
    budget,
    targetShare,
    typeKey: resolveTypeKeyOptions(options.typeKey),
    coverage: resolveCoverageOptions(options.coverage),
    exposure: resolveExposureOptions(options.exposure),
  };
}
