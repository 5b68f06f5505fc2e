import { InputError } from "../core/errors.js";
import { normalQuantile } from "../exposure/gamma.js";
import { checkLevel } from "../exposure/poissonInterval.js";

/** A two-sided interval for a proportion or a difference of proportions. */
export interface ProportionInterval {
  estimate: number;
  lower: number;
  upper: number;
  level: number;
  method: string;
}

function checkCount(k: number, n: number, name: string): void {
  if (!(Number.isInteger(n) && n >= 0)) throw new InputError(`${name}: n=${n} should be an integer >= 0`, { column: name, value: n });
  if (!(Number.isInteger(k) && k >= 0 && k <= n)) throw new InputError(`${name}: k=${k} should be an integer in [0, n=${n}]`, { column: name, value: k });
}

/**
 * Wilson score interval for k successes in n trials (Wilson 1927; Newcombe 1998, method 3, without
 * continuity correction). n = 0 gives [0, 1].
 */
export function wilsonInterval(k: number, n: number, level = 0.95): ProportionInterval {
  checkLevel(level);
  checkCount(k, n, "wilsonInterval");
  const method = "Wilson score";
  if (n === 0) return { estimate: NaN, lower: 0, upper: 1, level, method };
  const z = normalQuantile(1 - (1 - level) / 2);
  const p = k / n;
  const z2 = z * z;
  const centre = (p + z2 / (2 * n)) / (1 + z2 / n);
  const half = ((z / (1 + z2 / n)) * Math.sqrt((p * (1 - p)) / n + z2 / (4 * n * n)));
  // Exact ends at k = 0 and k = n (the formula gives them up to rounding).
  return { estimate: p, lower: k === 0 ? 0 : Math.max(0, centre - half), upper: k === n ? 1 : Math.min(1, centre + half), level, method };
}

/**
 * Interval for the difference of two independent proportions p2 − p1 (k2/n2 − k1/n1) by Newcombe's
 * hybrid score method (Newcombe 1998, "Interval estimation for the difference between independent
 * proportions", Statistics in Medicine 17, method 10): the Wilson limits of each proportion combined
 * as δ − sqrt((p2 − l2)² + (u1 − p1)²) and δ + sqrt((u2 − p2)² + (p1 − l1)²).
 */
export function newcombeDifference(k1: number, n1: number, k2: number, n2: number, level = 0.95): ProportionInterval {
  const a = wilsonInterval(k1, n1, level);
  const b = wilsonInterval(k2, n2, level);
  const p1 = n1 > 0 ? k1 / n1 : 0;
  const p2 = n2 > 0 ? k2 / n2 : 0;
  const d = p2 - p1;
  const lower = d - Math.sqrt((p2 - b.lower) ** 2 + (a.upper - p1) ** 2);
  const upper = d + Math.sqrt((b.upper - p2) ** 2 + (p1 - a.lower) ** 2);
  return { estimate: d, lower: Math.max(-1, lower), upper: Math.min(1, upper), level, method: "Newcombe hybrid score (Wilson limits)" };
}
