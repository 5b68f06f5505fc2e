import { InputError } from "../core/errors.js";
import { frequencyCounts } from "./abundance.js";

export type UnseenMassMethod = "good-turing" | "chao-jost";

/**
 * Probability that the next observation is of a kind not seen yet.
 * - "good-turing": f1 / n (Good 1953, "The population frequencies of species and the estimation of
 *   population parameters", Biometrika 40, 237–264), the default.
 * - "chao-jost": (f1 / n) · A with A = (n − 1) f1 / ((n − 1) f1 + 2 f2), or (n − 1)(f1 − 1) /
 *   ((n − 1)(f1 − 1) + 2) when f2 = 0 — one minus the sample coverage estimate of Chao & Jost (2012,
 *   "Coverage-based rarefaction and extrapolation", Ecology 93, 2533–2547), less biased for small n.
 */
export function unseenMass(counts: ArrayLike<number>, method: UnseenMassMethod = "good-turing"): number {
  const { n, f1, f2 } = frequencyCounts(counts);
  switch (method) {
    case "good-turing":
      return f1 / n;
    case "chao-jost": {
      if (f1 === 0) return 0;
      const a = f2 > 0 ? ((n - 1) * f1) / ((n - 1) * f1 + 2 * f2) : ((n - 1) * (f1 - 1)) / ((n - 1) * (f1 - 1) + 2);
      return (f1 / n) * a;
    }
    default: {
      const never: never = method;
      throw new InputError(`unseen-mass method "${String(never)}" should be "good-turing" or "chao-jost"`);
    }
  }
}
