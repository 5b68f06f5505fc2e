import { InputError } from "../core/errors.js";
import { compensatedSum } from "../exposure/compensatedSum.js";
import { abundance, frequencyCounts } from "./abundance.js";
import { chao1F0 } from "./chao1.js";
import { extrapolatedRichness, rarefiedRichness, type ExtrapolationOptions } from "./rarefaction.js";

export interface DiscoveryCurveOptions extends ExtrapolationOptions {
  /** Number of sample sizes on the expected curve, from 1 to the end point (default 40). */
  knots?: number;
  /** End point of the expected curve as a multiple of the sample size (default 2: extrapolation to double). */
  endpointFactor?: number;
  /** Most points kept on the observed curve (default 200; evenly spaced, the last point always kept). */
  maxObservedPoints?: number;
}

export interface DiscoveryCurve {
  /** Distinct kinds seen against cumulative km, in the order given (recording order). */
  observed: { scenarios: number[]; km: number[]; distinct: number[] };
  /**
   * Expected distinct kinds against sample size: rarefaction (Hurlbert 1971) up to n, the observed
   * value at n, extrapolation (Shen, Chao & Lin 2003) beyond. km = scenarios × mean km per scenario.
   */
  expected: { scenarios: number[]; km: number[]; distinct: number[]; method: ("rarefied" | "observed" | "extrapolated")[] };
  kmPerScenario: number;
  /** S_obs + f0: the level the extrapolation tends to. */
  asymptote: number;
}

/**
 * Discovery curves for a sequence of kinds (type keys or cluster labels) with the kilometres of each
 * observation. The expected curve treats the catalogue as a random sample of windows, so its km axis
 * uses the mean km per scenario.
 */
export function discoveryCurve(kinds: ArrayLike<string | number>, km: ArrayLike<number>, options: DiscoveryCurveOptions = {}): DiscoveryCurve {
  const n = kinds.length;
  if (n === 0) throw new InputError("the discovery curve needs at least one scenario");
  if (km.length !== n) throw new InputError(`km has ${km.length} values but there are ${n} scenarios`, { column: "km", value: km.length });
  const knots = options.knots ?? 40;
  const factor = options.endpointFactor ?? 2;
  const maxObs = options.maxObservedPoints ?? 200;
  if (!(Number.isInteger(knots) && knots >= 2)) throw new InputError(`knots=${knots} should be an integer >= 2`, { column: "knots", value: knots });
  if (!(factor >= 1)) throw new InputError(`endpointFactor=${factor} should be >= 1`, { column: "endpointFactor", value: factor });
  if (!(Number.isInteger(maxObs) && maxObs >= 2)) throw new InputError(`maxObservedPoints=${maxObs} should be an integer >= 2`, { column: "maxObservedPoints", value: maxObs });

  // Observed curve in the given order.
  const keep = new Set<number>();
  if (n <= maxObs) for (let i = 0; i < n; i++) keep.add(i);
  else for (let j = 0; j < maxObs; j++) keep.add(Math.round(((n - 1) * j) / (maxObs - 1)));
  const seen = new Set<string | number>();
  const observed = { scenarios: [] as number[], km: [] as number[], distinct: [] as number[] };
  let cumKm = 0;
  let comp = 0;
  for (let i = 0; i < n; i++) {
    // Running compensated sum of km.
    const v = km[i]!;
    const t = cumKm + v;
    comp += Math.abs(cumKm) >= Math.abs(v) ? cumKm - t + v : v - t + cumKm;
    cumKm = t;
    seen.add(kinds[i]!);
    if (keep.has(i)) {
      observed.scenarios.push(i + 1);
      observed.km.push(cumKm + comp);
      observed.distinct.push(seen.size);
    }
  }
  const totalKm = compensatedSum(km);
  const kmPerScenario = totalKm / n;

  // Expected curve.
  const counts = abundance(Array.from({ length: n }, (_, i) => kinds[i]!)).counts;
  const fc = frequencyCounts(counts);
  const end = Math.max(n, Math.round(factor * n));
  const sizes = new Set<number>([n]);
  for (let j = 0; j < knots; j++) sizes.add(Math.max(1, Math.round(1 + ((end - 1) * j) / (knots - 1))));
  const ordered = [...sizes].sort((a, b) => a - b);
  const expected = { scenarios: [] as number[], km: [] as number[], distinct: [] as number[], method: [] as ("rarefied" | "observed" | "extrapolated")[] };
  for (const m of ordered) {
    expected.scenarios.push(m);
    expected.km.push(m * kmPerScenario);
    if (m < n) {
      expected.distinct.push(rarefiedRichness(counts, m, fc));
      expected.method.push("rarefied");
    } else if (m === n) {
      expected.distinct.push(fc.sObs);
      expected.method.push("observed");
    } else {
      expected.distinct.push(extrapolatedRichness(counts, m, options, fc));
      expected.method.push("extrapolated");
    }
  }
  const f0 = fc.f1 === 0 ? 0 : (options.f0 ?? chao1F0(fc, options.variant, options.finiteSampleFactor));
  return { observed, expected, kmPerScenario, asymptote: fc.sObs + f0 };
}
