/**
 * The "assigned back to its own logical scenario" check: each re-simulated test case's measured
 * values go through `assign` (the fitted model's assignment, supplied by the caller) and the result
 * is compared with the logical scenario the test case belongs to.
 */
export interface AssignBackItem {
  testCase: string;
  logicalScenario: string;
  /** Values measured from the re-simulated run (whatever the assign function needs). */
  values: Record<string, number | null>;
}

export interface AssignBackResult {
  /** Per test case: the assigned logical scenario and whether it is its own. */
  rows: { testCase: string; expected: string; assigned: string | null; ok: boolean }[];
  /** Share assigned back to their own logical scenario (null when there are none). */
  share: number | null;
}

export function assignBack(items: readonly AssignBackItem[], assign: (values: Record<string, number | null>) => string | null): AssignBackResult {
  const rows = items.map((it) => {
    const assigned = assign(it.values);
    return { testCase: it.testCase, expected: it.logicalScenario, assigned, ok: assigned === it.logicalScenario };
  });
  return { rows, share: rows.length > 0 ? rows.filter((r) => r.ok).length / rows.length : null };
}

/**
 * A simple assignment to use when no fitted model is at hand: the nearest representative in
 * parameter space, each parameter scaled by its spread (p95 − p05), over the parameters both have.
 */
export function nearestRepresentative(
  representatives: readonly { id: string; values: Record<string, number | null>; scale: Record<string, number> }[],
): (values: Record<string, number | null>) => string | null {
  return (values) => {
    let best: string | null = null;
    let bestD = Infinity;
    for (const r of representatives) {
      let d = 0;
      let n = 0;
      for (const [k, v] of Object.entries(r.values)) {
        const w = values[k];
        if (v === null || w === null || w === undefined) continue;
        const s = r.scale[k] && r.scale[k]! > 0 ? r.scale[k]! : 1;
        d += ((w - v) / s) ** 2;
        n++;
      }
      if (n === 0) continue;
      d /= n;
      if (d < bestD) {
        bestD = d;
        best = r.id;
      }
    }
    return best;
  };
}
