/** What diffPlans reads of a test case (schema 1 and 2 plans both have these; the rest is optional). */
export interface DiffableTestCase {
  id: string;
  scenarioId?: string | null;
  share?: number;
  role?: string;
  kind?: string;
  logicalScenario?: string;
}

/** What diffPlans reads of a logical scenario (plan schema 2). */
export interface DiffableLogicalScenario {
  id: string;
  name?: string;
  share: number;
  representative?: { scenarioId: string };
}

/** What diffPlans reads of a plan. */
export interface DiffablePlan {
  schemaVersion?: string;
  testCases: readonly DiffableTestCase[];
  logicalScenarios?: readonly DiffableLogicalScenario[];
  totals?: { scenarios?: number; km?: number };
}

export interface KeptEntry {
  id: string;
  oldShare: number | null;
  newShare: number | null;
  /** newShare − oldShare, null when either is unknown. */
  change: number | null;
}

export interface EntryDiff {
  added: string[];
  dropped: string[];
  kept: KeptEntry[];
}

export interface PlanDiff {
  testCases: EntryDiff & {
    /** Dropped and added ids that stand on the same recorded scenario (an id that changed although its scenario stayed). */
    sameScenario: { oldId: string; newId: string; scenarioId: string }[];
    /**
     * Ids found in both plans but standing on different recorded scenarios (ids by rank, e.g.
     * "TC-0001"): not kept, listed here instead (and counted neither as added nor as dropped).
     */
    reused: { id: string; oldScenarioId: string; newScenarioId: string }[];
  };
  /** Logical scenarios, when both plans have them. */
  logicalScenarios: EntryDiff | null;
  totals: { old: { scenarios: number | null; km: number | null }; new: { scenarios: number | null; km: number | null } };
  /** Share of the old test cases whose id is still there. */
  keptShareOfOld: number;
  warnings: string[];
}

/**
 * The difference between two plan versions: test cases added, dropped and kept (by id, with the
 * change of the share each stands for), and the same for logical scenarios when both plans have
 * them. Ids are compared as they are; with content-derived ids (docs/plan.md) a kept id is the same
 * recorded scenario chosen again.
 */
export function diffPlans(oldPlan: DiffablePlan, newPlan: DiffablePlan): PlanDiff {
  const warnings: string[] = [];
  const lsShare = (p: DiffablePlan) => new Map((p.logicalScenarios ?? []).map((l) => [l.id, l.share]));
  const tcShare = (p: DiffablePlan, t: DiffableTestCase): number | null => {
    if (typeof t.share === "number") return t.share;
    if (t.logicalScenario !== undefined) return lsShare(p).get(t.logicalScenario) ?? null;
    return null;
  };
  const entries = <T extends { id: string }>(a: readonly T[], b: readonly T[], share: (which: "old" | "new", x: T) => number | null): EntryDiff => {
    const oldIds = new Map(a.map((x) => [x.id, x]));
    const newIds = new Map(b.map((x) => [x.id, x]));
    const added = b.filter((x) => !oldIds.has(x.id)).map((x) => x.id);
    const dropped = a.filter((x) => !newIds.has(x.id)).map((x) => x.id);
    const kept = b
      .filter((x) => oldIds.has(x.id))
      .map((x) => {
        const o = share("old", oldIds.get(x.id)!);
        const n = share("new", x);
        return { id: x.id, oldShare: o, newShare: n, change: o !== null && n !== null ? n - o : null };
      });
    return { added, dropped, kept };
  };
  for (const [name, p] of [
    ["old", oldPlan],
    ["new", newPlan],
  ] as const) {
    const ids = new Set<string>();
    for (const t of p.testCases) {
      if (ids.has(t.id)) warnings.push(`the ${name} plan has test case id ${t.id} twice; the diff matches the first`);
      ids.add(t.id);
    }
  }
  const tcAll = entries(oldPlan.testCases, newPlan.testCases, (w, t) => tcShare(w === "old" ? oldPlan : newPlan, t));
  // An id in both plans that stands on another recorded scenario is not the same test case.
  const oldScenario = new Map(oldPlan.testCases.map((t) => [t.id, t.scenarioId ?? null]));
  const newScenario = new Map(newPlan.testCases.map((t) => [t.id, t.scenarioId ?? null]));
  const reused: PlanDiff["testCases"]["reused"] = [];
  const tc: EntryDiff = {
    added: tcAll.added,
    dropped: tcAll.dropped,
    kept: tcAll.kept.filter((k) => {
      const a = oldScenario.get(k.id) ?? null;
      const b = newScenario.get(k.id) ?? null;
      if (a !== null && b !== null && a !== b) {
        reused.push({ id: k.id, oldScenarioId: a, newScenarioId: b });
        return false;
      }
      return true;
    }),
  };
  if (reused.length > 0)
    warnings.push(`${reused.length} test case id(s) stand on a different recorded scenario in the new plan (ids by rank, not by content): they are listed as reused, not kept`);
  // Old test cases that are not kept (dropped, or their id reused) whose recorded scenario is chosen
  // again under another id.
  const keptIds = new Set(tc.kept.map((k) => k.id));
  const reusedIds = new Set(reused.map((r) => r.id));
  const notKeptOld = new Map<string, string>();
  for (const t of oldPlan.testCases) if (!keptIds.has(t.id) && t.scenarioId && (reusedIds.has(t.id) || tc.dropped.includes(t.id))) notKeptOld.set(t.scenarioId, t.id);
  const sameScenario: PlanDiff["testCases"]["sameScenario"] = [];
  for (const t of newPlan.testCases) {
    if (keptIds.has(t.id) || !t.scenarioId) continue;
    const oldId = notKeptOld.get(t.scenarioId);
    if (oldId !== undefined && oldId !== t.id) sameScenario.push({ oldId, newId: t.id, scenarioId: t.scenarioId });
  }
  if (sameScenario.length > 0)
    warnings.push(`${sameScenario.length} test case(s) stand on the same recorded scenario under a new id (with content-derived ids: their logical scenario changed; with rank ids: renumbered)`);
  let logical: EntryDiff | null = null;
  if (oldPlan.logicalScenarios && newPlan.logicalScenarios) {
    const so = lsShare(oldPlan);
    const sn = lsShare(newPlan);
    logical = entries(oldPlan.logicalScenarios, newPlan.logicalScenarios, (w, l) => (w === "old" ? so : sn).get(l.id) ?? null);
  } else if (oldPlan.logicalScenarios || newPlan.logicalScenarios) warnings.push("only one plan has logical scenarios; they are not compared");
  return {
    testCases: { ...tc, sameScenario, reused },
    logicalScenarios: logical,
    totals: {
      old: { scenarios: oldPlan.totals?.scenarios ?? null, km: oldPlan.totals?.km ?? null },
      new: { scenarios: newPlan.totals?.scenarios ?? null, km: newPlan.totals?.km ?? null },
    },
    keptShareOfOld: oldPlan.testCases.length > 0 ? tc.kept.length / oldPlan.testCases.length : 1,
    warnings,
  };
}
