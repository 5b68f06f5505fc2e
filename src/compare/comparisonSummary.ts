import type { CatalogueComparison } from "./compareCatalogues.js";
import type { PlanDiff } from "./diffPlans.js";

const pct = (v: number) => `${(100 * v).toFixed(1)} %`;
const pp = (v: number) => `${v >= 0 ? "+" : ""}${(100 * v).toFixed(1)}`;
const pval = (p: number) => (p < 0.0001 ? p.toExponential(1) : p.toFixed(4));

/** A comparison in plain text (for the CLI and notebooks): the tests first, then the largest differences. */
export function comparisonSummary(c: CatalogueComparison, maxRows = 15): string {
  const lines: string[] = [];
  const side = (s: CatalogueComparison["a"]) =>
    `${s.name}: ${s.scenarios} scenarios, ${s.drives} drives, ${s.recordings.length} recording(s), ${s.km.toFixed(1)} km, ${s.hours.toFixed(2)} h, ${s.categories} ${c.categoryKind === "class" ? "classes" : "type keys"}`;
  lines.push(`A  ${side(c.a)}`, `B  ${side(c.b)}`, "");
  const f = c.frequency;
  lines.push(`Category frequencies (${f.categories.length} columns after merging sparse categories; windows taken as independent):`);
  lines.push(`  chi-square ${f.chiSquare.statistic.toFixed(2)}, df ${f.chiSquare.df}, p = ${pval(f.chiSquare.p)}`);
  lines.push(`  G-test     ${f.gTest.statistic.toFixed(2)}, df ${f.gTest.df}, p = ${pval(f.gTest.p)}`);
  lines.push(`  permutation of ${f.permutation.unit}s (${f.permutation.units.a} + ${f.permutation.units.b}, ${f.permutation.permutations} permutations): p = ${pval(f.permutation.p)}`);
  if (c.embedding)
    lines.push(`Features (energy distance, ${c.embedding.permutations} permutations of ${c.embedding.unit}s): T = ${c.embedding.statistic.toFixed(3)}, p = ${pval(c.embedding.p)}`);
  const d = c.discovery.atEqualEffort;
  lines.push(`Discovery: ${c.discovery.a.observed.distinct.at(-1)} vs ${c.discovery.b.observed.distinct.at(-1)} kinds seen; at ${d.scenarios} scenarios each ${d.a.toFixed(1)} vs ${d.b.toFixed(1)} expected (rarefaction); asymptote ${c.discovery.a.asymptote.toFixed(1)} vs ${c.discovery.b.asymptote.toFixed(1)}`);
  lines.push(`Only in A: ${c.onlyInA.length}, only in B: ${c.onlyInB.length}`, "");
  const level = Math.round(100 * c.options.level);
  lines.push(`Largest share differences (B − A, percentage points of ${c.options.weightBy}; ${level} % ${c.categories[0]?.interval.method ?? ""}):`);
  const rows = [...c.categories].sort((x, y) => Math.abs(y.difference) - Math.abs(x.difference) || (x.category < y.category ? -1 : 1)).slice(0, maxRows);
  const w = Math.min(48, Math.max(8, ...rows.map((r) => r.category.length)));
  for (const r of rows)
    lines.push(
      `  ${r.category.padEnd(w)}  ${pct(r.a.share).padStart(7)}  ${pct(r.b.share).padStart(7)}  ${pp(r.difference).padStart(6)} [${pp(r.interval.lower)}, ${pp(r.interval.upper)}]${r.seenIn === "both" ? "" : `  (${r.seenIn})`}`,
    );
  if (c.warnings.length > 0) lines.push("", ...c.warnings.map((x) => `warning: ${x}`));
  lines.push("", ...c.cautions.map((x) => `caution: ${x}`));
  return lines.join("\n");
}

/** A plan diff in plain text. */
export function planDiffSummary(d: PlanDiff): string {
  const lines: string[] = [];
  const t = d.testCases;
  lines.push(`Test cases: ${t.kept.length} kept, ${t.added.length} added, ${t.dropped.length} dropped${t.reused.length ? `, ${t.reused.length} ids reused for another scenario` : ""} (${pct(d.keptShareOfOld)} of the old ones kept)`);
  const fmtKept = (k: PlanDiff["testCases"]["kept"][number]) =>
    `  = ${k.id}  ${k.oldShare === null ? "?" : pct(k.oldShare)} → ${k.newShare === null ? "?" : pct(k.newShare)}${k.change === null ? "" : ` (${pp(k.change)} pp)`}`;
  for (const k of t.kept) lines.push(fmtKept(k));
  for (const id of t.added) lines.push(`  + ${id}`);
  for (const id of t.dropped) lines.push(`  - ${id}`);
  for (const r of t.reused) lines.push(`  ~ ${r.id}  ${r.oldScenarioId} → ${r.newScenarioId}`);
  if (t.sameScenario.length > 0) lines.push(`Same recorded scenario under another id: ${t.sameScenario.map((x) => `${x.oldId} → ${x.newId}`).join(", ")}`);
  if (d.logicalScenarios) {
    const l = d.logicalScenarios;
    lines.push(`Logical scenarios: ${l.kept.length} kept, ${l.added.length} added, ${l.dropped.length} dropped`);
    for (const k of l.kept) lines.push(fmtKept(k));
    for (const id of l.added) lines.push(`  + ${id}`);
    for (const id of l.dropped) lines.push(`  - ${id}`);
  }
  const o = d.totals.old;
  const n = d.totals.new;
  if (o.km !== null && n.km !== null) lines.push(`Recorded: ${o.scenarios} → ${n.scenarios} scenarios, ${o.km.toFixed(1)} → ${n.km.toFixed(1)} km`);
  for (const w of d.warnings) lines.push(`warning: ${w}`);
  return lines.join("\n");
}
