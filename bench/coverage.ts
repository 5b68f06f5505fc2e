/**
 * Coverage and plan benchmark.
 *
 *   npx tsx bench/main.ts coverage [--n 50000000] [--reltol 0.001] [--scenarios 100000]
 *
 * 1. Coupon collector for n Zipf(s = 1) kinds with grouped probabilities (the fast path), against the
 *    ungrouped integral (every kind evaluated at every quadrature point) for n = 10⁶, where that is
 *    still affordable: the ratio is the speed-up of grouping.
 * 2. buildTestPlan on a synthetic catalogue of --scenarios windows.
 * Prints a readable log and, as the last line, one JSON object with the figures.
 */
import { couponCollector, couponCollectorEqual, zipfProbabilities } from "../src/coverage/index.js";
import { buildTestPlan } from "../src/plan/index.js";
import { plantedCatalogue } from "../test/plan-fixtures.js";

function arg(args: string[], name: string): string | undefined {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
}

function time<T>(fn: () => T, repeat = 3): { value: T; ms: number } {
  let best = Infinity;
  let value!: T;
  for (let r = 0; r < repeat; r++) {
    const t0 = performance.now();
    value = fn();
    best = Math.min(best, performance.now() - t0);
  }
  return { value, ms: best };
}

export async function run(args: string[]): Promise<void> {
  const n = Number(arg(args, "--n") ?? 5e7);
  const relTol = Number(arg(args, "--reltol") ?? 1e-3);
  const nScen = Number(arg(args, "--scenarios") ?? 100000);

  const zipf = time(() => couponCollector(zipfProbabilities(n, 1, relTol), { quantiles: [0.5, 0.95, 0.999] }));
  console.log(
    `Zipf s=1, n=${n}: E = ${zipf.value.expected.toExponential(6)}, q99.9 = ${zipf.value.quantiles[2]!.draws.toExponential(4)}, ` +
      `${zipf.value.groups} groups, bound ${zipf.value.relativeErrorBound.toExponential(1)}: ${zipf.ms.toFixed(0)} ms`,
  );
  const equal = time(() => couponCollector([{ p: 1 / n, count: n }]));
  console.log(`equal, n=${n}: integral ${equal.value.expected.toExponential(6)} vs n·H_n ${couponCollectorEqual(n).expected.toExponential(6)}: ${equal.ms.toFixed(1)} ms`);

  const m = 1e6;
  const grouped = time(() => couponCollector(zipfProbabilities(m, 1, relTol)));
  const ungrouped = time(() => couponCollector(zipfProbabilities(m, 1, 0)), 1);
  const agree = Math.abs(grouped.value.expected / ungrouped.value.expected - 1);
  console.log(
    `Zipf n=10⁶: grouped ${grouped.ms.toFixed(0)} ms (${grouped.value.groups} groups) vs ungrouped ${ungrouped.ms.toFixed(0)} ms ` +
      `(${ungrouped.value.groups} groups): ×${(ungrouped.ms / grouped.ms).toFixed(0)}, relative difference ${agree.toExponential(2)}`,
  );

  const drives = Math.max(1, Math.round(nScen / 100));
  const cat = plantedCatalogue(1, drives, 100, Math.max(6, Math.round(nScen / 1000)));
  const plan = time(
    () => buildTestPlan({ scenarios: cat.scenarios, labels: cat.labels, medoids: cat.medoids, embedding: cat.embedding, clusterMethod: "dbscan" }, { budget: 50 }),
    1,
  );
  console.log(`buildTestPlan on ${cat.scenarios.length} scenarios: ${plan.ms.toFixed(0)} ms, ${plan.value.testCases.length} test cases`);
  console.log(
    JSON.stringify({
      bench: "coverage",
      zipfN: n,
      relTol,
      zipfMs: zipf.ms,
      zipfExpected: zipf.value.expected,
      zipfQ999: zipf.value.quantiles[2]!.draws,
      zipfGroups: zipf.value.groups,
      equalMs: equal.ms,
      millionGroupedMs: grouped.ms,
      millionUngroupedMs: ungrouped.ms,
      speedup: ungrouped.ms / grouped.ms,
      relativeDifference: agree,
      planScenarios: cat.scenarios.length,
      planMs: plan.ms,
    }),
  );
}
