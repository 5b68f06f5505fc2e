import { VERSION } from "../core/version.js";
import { LATERAL, LONGITUDINAL } from "../maneuvers/labels.js";
import type { PipelineResult } from "../pipeline/runPipeline.js";
import { criticalityFigure } from "./criticalityFigure.js";
import { discoveryFigure, type DiscoverySeries } from "./discoveryFigure.js";
import type { ReportDocument, ReportSection } from "./html.js";
import { kDistanceFigure } from "./kDistanceFigure.js";
import { kSweepFigure } from "./kSweepFigure.js";
import { scenarioMapFigure } from "./scenarioMapFigure.js";
import { shareFigure, type ShareBar } from "./shareFigure.js";
import type { TestPlan } from "../plan/types.js";
import { criticalReasons } from "../plan/criticality.js";
import { resolveTestPlanOptions } from "../plan/options.js";
import { breakdown } from "../catalogue/breakdown.js";
import { CONDITION_FIELDS, NOT_GIVEN } from "../recording/conditions.js";
import { logicalSections } from "./logicalSection.js";

const pct = (x: number, digits = 2): string => `${(100 * x).toFixed(digits)} %`;
const fix = (x: number | null, digits = 2): string => (x === null || !Number.isFinite(x) ? "–" : x.toFixed(digits));
const big = (x: number): string => (x >= 1e6 ? x.toExponential(3) : x.toLocaleString("en", { maximumFractionDigits: 1 }));

/** The cautions every report carries, whatever the plan says in addition. */
export const REPORT_CAUTIONS = [
  "These figures describe the recordings that went in: their roads, traffic, weather and sensors. They say nothing about situations those recordings could not contain.",
  "Statistical estimates of exposure and coverage are not a safety argument on their own. Whether a test plan is sufficient is decided in the ISO 26262 and ISO 21448 (SOTIF) processes and by the responsible safety assessment, not by this tool.",
  "Exposure classes are shown as an aid for hazard analysis (thresholds quoted from memory of ISO 26262-3 Annex B); they are not classifications made by this tool.",
];

/** Turn a pipeline result into the report document (data only; renderHtml makes the page). */
export function buildReport(r: PipelineResult, title = "roadsieve test plan"): ReportDocument {
  // The sections below describe the global cluster view (plan.exploration); logicalSection the plan of logical scenarios.
  const plan = r.plan.exploration;
  const sc = r.scenarios.scenarios;
  const n = sc.length;
  const hover = sc.map((s, i) => `${s.id}<br>cluster ${r.labels[i]}<br>${r.typeKeys[i]}<br>${(s.km * 1000).toFixed(0)} m, ${s.seconds.toFixed(1)} s`);
  const reps = plan.testCases.map((t) => t.scenarioIndex);
  // The plan's own definition of critical, with the thresholds the plan ran with.
  const planOptions = resolveTestPlanOptions(r.options.plan);
  const critical = sc.map((s) => criticalReasons(s, planOptions).length > 0);
  const sections: ReportSection[] = [];

  sections.push({
    id: "summary",
    heading: "Summary",
    paragraphs: r.plan.summary.split(/\n+/).filter((p) => p.trim() !== ""),
  });
  sections.push({ id: "cautions", heading: "Cautions", tone: "caution", bullets: plan.cautions.length > 0 ? plan.cautions : REPORT_CAUTIONS });
  sections.push(...logicalSections(r.plan));

  sections.push({
    id: "map",
    heading: "Scenario map",
    paragraphs: [
      `Every scenario (a ${describeWindow(r)} window of one vehicle's drive) as a point on a 2-D ${r.map.method.toUpperCase()} map of its ${r.embedding.features.length}-feature embedding. ` +
        `Colours are clusters; grey points are DBSCAN noise, the rare scenarios; diamonds are the test cases; red rings mark the scenarios the plan counts as critical. ` +
        (r.map.fittedOn < n ? `The map was fitted on a seeded sample of ${r.map.fittedOn} scenarios and the rest placed onto it. ` : "") +
        `Distances on the map are only a guide: clustering works on the full embedding.`,
    ],
    figures: [{ figure: scenarioMapFigure({ coords: r.map.coords, labels: r.labels, representatives: reps, hover, critical, method: r.map.method }) }],
  });

  const bars = shareBars(plan.testCases, 30);
  sections.push({
    id: "test-cases",
    heading: "Test cases and what they stand for",
    paragraphs: [
      `${plan.testCases.length} test cases: ${plan.selection.representatives} representatives (the medoid of a cluster: a real recorded scenario, never a synthetic average), ` +
        `${plan.selection.critical} critical and ${plan.selection.rare} rare scenarios kept on their own so that they are not averaged away. ` +
        `Together they stand for ${pct(plan.accounting.testCasesShare)} of the recorded vehicle-kilometres and ${pct(plan.accounting.testCasesTimeShare)} of the recorded time; ` +
        `${pct(plan.accounting.leftOutShare)} of the kilometres is left out by the budget.` +
        (plan.selection.budgetExceeded ? " The critical and rare scenarios alone exceed the budget; they are kept anyway." : ""),
    ],
    figures: [{ figure: shareFigure(bars, { kmShare: plan.accounting.leftOutShare, timeShare: plan.accounting.leftOutTimeShare }) }],
    tables: [
      {
        columns: ["test case", "role", "scenario", "cluster", "type key", "km share", "time share", "km", "hours", "per 1000 km [95 % CI]", "exposure aid", "min TTC (s)", "min THW (s)", "members"],
        rows: plan.testCases.map((t) => [
          t.id,
          t.role,
          `${t.source.recording} track ${t.source.egoTrack}, ${t.source.tStart.toFixed(2)}–${t.source.tEnd.toFixed(2)} s`,
          t.cluster,
          t.typeKey,
          pct(t.share, 3),
          pct(t.timeShare, 3),
          Number(t.standsFor.km.toFixed(3)),
          Number(t.standsFor.hours.toFixed(4)),
          `${fix(t.standsFor.ratePer1000km.rate)} [${fix(t.standsFor.ratePer1000km.lower)}, ${fix(t.standsFor.ratePer1000km.upper)}]`,
          t.standsFor.exposureClass,
          fix(t.criticality.minTtc),
          fix(t.criticality.minThw),
          t.memberCount,
        ]),
        maxRows: 200,
      },
    ],
  });

  const clusterFigures: { figure: ReturnType<typeof kSweepFigure>; caption?: string }[] = [];
  if (r.sweep) clusterFigures.push({ figure: kSweepFigure(r.sweep.rows, r.k, "suggested"), caption: `Rule: ${r.sweep.rule}. Silhouette on ${r.sweep.silhouetteExact ? "all" : `a seeded sample of ${r.sweep.silhouetteSample}`} scenarios.` });
  if (r.dbscan?.epsSuggestion)
    clusterFigures.push({
      figure: kDistanceFigure(r.dbscan.epsSuggestion.kDistances, r.dbscan.eps, r.dbscan.epsSuggestion.k),
      caption: `${r.dbscan.epsSuggestion.method}. DBSCAN ran on ${r.dbscan.components} principal components (${pct(r.dbscan.explainedVariance, 1)} of the variance) with minPts ${r.dbscan.minPts}: ${r.dbscan.nClusters} dense regions, ${r.dbscan.nNoise} noise scenarios.`,
    });
  sections.push({
    id: "clusters",
    heading: "Clusters and exposure",
    paragraphs: [
      `k-means with k = ${r.k} (${r.sweep ? "chosen by silhouette" : "given"}), weighted by ${r.options.weightBy === "km" ? "kilometres" : "hours"}, converged ${r.kmeans.converged ? "" : "NOT "}after ${r.kmeans.iterations} iterations (inertia ${r.kmeans.inertia.toPrecision(6)}). ` +
        `Rates are occurrences per 1000 vehicle-km with exact Poisson (Garwood) intervals.`,
    ],
    figures: clusterFigures,
    tables: [
      {
        columns: ["cluster", "medoid", "scenarios", "km", "hours", "km share", "time share", "drives", "per 1000 km [CI]", "exposure aid", "frequency reading"],
        rows: plan.exposureTable.map((e) => [
          e.cluster < 0 ? "noise" : e.cluster,
          e.medoidId ?? "–",
          e.scenarios,
          Number(e.km.toFixed(3)),
          Number(e.hours.toFixed(4)),
          pct(e.share, 3),
          pct(e.timeShare, 3),
          e.drives,
          `${fix(e.ratePer1000km.rate)} [${fix(e.ratePer1000km.lower)}, ${fix(e.ratePer1000km.upper)}]`,
          e.exposureClass,
          e.frequency.class ? `${e.frequency.class}: ${e.frequency.wording}` : e.frequency.wording,
        ]),
      },
    ],
  });

  const cov = plan.coverage;
  const series: DiscoverySeries[] = [];
  for (const [name, c] of [
    ["type keys", cov.typeKeys],
    ["clusters", cov.clusters],
  ] as const) {
    series.push({ name: `${name}: observed`, km: c.discovery.observed.km, count: c.discovery.observed.distinct, style: "observed" });
    const ex = c.discovery.expected;
    const rare = ex.method.map((m, i) => (m !== "extrapolated" ? i : -1)).filter((i) => i >= 0);
    const extra = ex.method.map((m, i) => (m !== "rarefied" ? i : -1)).filter((i) => i >= 0);
    series.push({ name: `${name}: expected (rarefaction)`, km: rare.map((i) => ex.km[i]!), count: rare.map((i) => ex.distinct[i]!), style: "rarefied" });
    if (extra.length > 1) series.push({ name: `${name}: extrapolated`, km: extra.map((i) => ex.km[i]!), count: extra.map((i) => ex.distinct[i]!), style: "extrapolated" });
  }
  const covBullets = (label: string, c: typeof cov.typeKeys): string[] => [
    `${label}: ${c.observed} seen in ${c.scenarios} scenarios (${c.singletons} seen once, ${c.doubletons} twice); Chao1 estimates ${c.chao1.estimate.toFixed(1)} in all (${Math.round(c.chao1.level * 100)} % interval ${c.chao1.lower.toFixed(1)}–${c.chao1.upper.toFixed(1)}).`,
    `${label}: chance that the next scenario is of a kind not yet seen (Good–Turing): ${pct(c.unseenMass)}.`,
    ...c.effort.map((e) => `${label}: to see ${pct(e.share, 0)} of the estimated kinds, about ${big(e.additionalKm)} more vehicle-km (${big(e.additionalScenarios)} scenarios) would be needed (Chao et al. 2009).`),
    `${label}: coupon-collector view with every estimated kind equally likely: ${big(c.couponCollector.equal.expectedKm)} vehicle-km expected to see them all; with the observed frequencies and a tail for the unseen ones: ${big(c.couponCollector.estimated.expectedKm)} vehicle-km (${pct(c.couponCollector.estimated.quantile.q, 1)} quantile ${big(c.couponCollector.estimated.quantile.km)}). ${c.couponCollector.note}`,
  ];
  const zf = cov.zeroFailure;
  sections.push({
    id: "coverage",
    heading: "How complete is the catalogue?",
    paragraphs: [
      "Scenario kinds are counted two ways: readable type keys (maneuver sequence, occupied neighbour slots, events) and clusters. The discovery curve shows how many kinds appeared as kilometres accumulated; the expected curve (rarefaction) smooths out the recording order, and the extrapolation (Shen, Chao & Lin 2003) shows what more driving would add.",
      `With no event in the ${big(zf.recordedKm)} recorded vehicle-km, a rate below ${zf.rateBoundPerKm.toExponential(2)} per km is shown at ${pct(zf.confidence, 0)} confidence (n = −ln(1 − C) / r).` +
        (zf.reference ? ` Showing a rate below ${zf.reference.label} this way would need ${big(zf.reference.kmNeeded)} km; the recordings are ${pct(zf.reference.recordedShareOfNeeded, 4)} of that.` : ""),
    ],
    bullets: [...covBullets("Type keys", cov.typeKeys), ...covBullets("Clusters", cov.clusters)],
    figures: [
      {
        figure: discoveryFigure(series, [
          { name: "type keys, Chao1", value: cov.typeKeys.chao1.estimate },
          { name: "clusters, Chao1", value: cov.clusters.chao1.estimate },
        ]),
      },
    ],
    tables: [{ caption: "Type keys by frequency (most frequent first)", columns: ["type key", "scenarios"], rows: cov.typeKeys.table.map((t) => [t.kind, t.count]), maxRows: 40 }],
  });

  const thresholds = { ttc: planOptions.ttcBelow, thw: planOptions.thwBelow };
  sections.push({
    id: "criticality",
    heading: "Criticality",
    paragraphs: [
      `Minimum time-to-collision (while closing in) and minimum time headway per scenario. Thresholds used by the plan: TTC below ${thresholds.ttc} s, THW below ${thresholds.thw} s (common practice). ${plan.selection.criticalScenarios} scenarios are critical; every one of them is a test case or stands behind one.`,
    ],
    figures: [{ figure: criticalityFigure(sc.map((s, i) => ({ minTtc: s.criticality.minTtc, minThw: s.criticality.minThw, label: r.labels[i]!, hover: hover[i] })), thresholds) }],
  });

  const segCounts = new Map<string, number>();
  let segments = 0;
  for (const rec of r.maneuvers)
    for (const tm of rec)
      for (const s of tm.segments) {
        segCounts.set(s.maneuver, (segCounts.get(s.maneuver) ?? 0) + 1);
        segments++;
      }
  const events = new Map<string, number>();
  for (const s of sc) for (const e of s.events) events.set(e.kind, (events.get(e.kind) ?? 0) + 1);
  sections.push({
    id: "maneuvers",
    heading: "Maneuvers and events",
    paragraphs: [`${segments} basic maneuver segments detected over ${r.recordings.reduce((a, x) => a + x.tracks, 0)} tracks.`],
    tables: [
      {
        columns: ["basic maneuver", "segments"],
        rows: [...LONGITUDINAL, ...LATERAL].map((m) => [m, segCounts.get(m) ?? 0]),
      },
      { columns: ["event (ego's view)", "occurrences"], rows: [...events.entries()].sort((a, b) => b[1] - a[1]).map(([k, v]) => [k, v]) },
    ],
  });

  sections.push({
    id: "recordings",
    heading: "Recordings",
    tables: [
      {
        columns: ["recording", "file", "road", "lanes", "Hz", "tracks", "rows", "rejected tracks", "scenarios", "vehicle-km", "vehicle-hours", "sha256"],
        rows: r.recordings.map((x) => [x.id, x.source, x.road, x.lanes, x.frameRate, x.tracks, x.rows, x.rejected, x.scenarios, Number(x.km.toFixed(3)), Number(x.hours.toFixed(4)), x.checksum]),
      },
    ],
  });
  const stated = CONDITION_FIELDS.filter((f) => r.recordings.some((x) => x.conditions?.[f] !== undefined));
  if (stated.length > 0)
    sections[sections.length - 1]!.tables!.push({
      caption: "Conditions as stated in each road description",
      columns: ["recording", ...stated],
      rows: r.recordings.map((x) => [x.id, ...stated.map((f) => x.conditions?.[f] ?? NOT_GIVEN)]),
    });
  if (r.recordings.length > 1) sections.push(breakdownSection(r, stated));
  const allWarnings = [...r.recordings.flatMap((x) => x.warnings.map((w) => `${x.id}: ${w}`)), ...r.warnings];
  if (allWarnings.length > 0) sections.push({ id: "warnings", heading: `Warnings (${allWarnings.length})`, bullets: allWarnings.slice(0, 200).concat(allWarnings.length > 200 ? [`… ${allWarnings.length - 200} more in plan.json`] : []) });

  const totalKm = plan.totals.km;
  return {
    title,
    subtitle: `${r.recordings.map((x) => `${x.id} (${x.road})`).join(", ")}: ${big(totalKm)} vehicle-km, ${plan.totals.hours.toFixed(2)} vehicle-hours, ${n} scenarios`,
    tiles: [
      { label: "recorded vehicle-km", value: big(totalKm) },
      { label: "vehicle-hours", value: plan.totals.hours.toFixed(2) },
      { label: "scenarios", value: String(n) },
      { label: "clusters", value: String(r.k) },
      { label: "test cases", value: String(plan.testCases.length) },
      { label: "km share stood for", value: pct(plan.accounting.testCasesShare, 1) },
      { label: "chance next scenario is a new type", value: pct(cov.typeKeys.unseenMass, 1) },
      { label: "critical scenarios", value: String(plan.selection.criticalScenarios) },
    ],
    sections,
    provenance: {
      tool: `roadsieve ${VERSION}`,
      seed: String(r.options.seed),
      "plan schema": plan.schemaVersion,
      "cluster method": plan.provenance.clusterMethod,
      ...Object.fromEntries(r.recordings.map((x) => [`input ${x.source}`, `sha256 ${x.checksum}`])),
      options: JSON.stringify({ k: r.options.k, kRange: r.options.kRange, nInit: r.options.nInit, map: r.options.map, weightBy: r.options.weightBy, dbscan: r.options.dbscan, plan: r.options.plan }),
    },
  };
}

/**
 * Bars for the share figure: the largest `top` test cases one by one, the rest summed per role so
 * that a plan with hundreds of small rare or critical test cases stays readable.
 */
function shareBars(cases: TestPlan["testCases"], top: number): ShareBar[] {
  const sorted = [...cases].sort((a, b) => b.share - a.share || a.id.localeCompare(b.id));
  const shown = sorted.slice(0, top);
  const bars: ShareBar[] = shown.map((t) => ({
    name: t.id,
    kmShare: t.share,
    timeShare: t.timeShare,
    reason: t.role,
    hover: `${t.id} (${t.role}): ${t.typeKey}<br>cluster ${t.cluster}, ${t.memberCount} scenarios, ${t.standsFor.km.toFixed(2)} km, ${(t.standsFor.hours * 60).toFixed(1)} min`,
  }));
  const rest = new Map<string, { n: number; km: number; time: number }>();
  for (const t of sorted.slice(top)) {
    const g = rest.get(t.role) ?? { n: 0, km: 0, time: 0 };
    g.n++;
    g.km += t.share;
    g.time += t.timeShare;
    rest.set(t.role, g);
  }
  for (const [role, g] of [...rest.entries()].sort((a, b) => a[0].localeCompare(b[0])))
    bars.push({ name: `${g.n} more ${role}`, kmShare: g.km, timeShare: g.time, reason: role, hover: `${g.n} further ${role} test cases, each standing for itself (see the table)` });
  return bars;
}

function describeWindow(r: PipelineResult): string {
  const w = (r.scenarios.options as { window?: { mode?: string; seconds?: number; minSeconds?: number; maxSeconds?: number } } | undefined)?.window;
  if (w?.mode === "fixed" && w.seconds) return `${w.seconds} s`;
  if (w?.mode === "events") return `${w.minSeconds}–${w.maxSeconds} s event-cut`;
  return "scenario";
}

/**
 * Shares by recording and by every stated condition with at least two values: the categories with the
 * largest shares, one column per group, and a caution naming the categories seen in one recording only.
 */
function breakdownSection(r: PipelineResult, stated: readonly (typeof CONDITION_FIELDS)[number][]): ReportSection {
  const sc = r.scenarios.scenarios;
  const tables: ReportSection["tables"] = [];
  const bullets: string[] = [];
  const groupings = ["recording" as const, ...stated.filter((f) => new Set(r.recordings.map((x) => x.conditions?.[f] ?? NOT_GIVEN)).size > 1)];
  let kind = "type key";
  for (const by of groupings) {
    const b = breakdown(sc, r.recordings, by, r.weights, { typeKeys: r.typeKeys });
    kind = b.categoryKind;
    const share = new Map(b.rows.map((x) => [`${x.group}\u0000${x.category}`, x.share]));
    const top = b.categories.slice(0, 15);
    tables.push({
      caption: `Share of ${r.options.weightBy} by ${by} (${b.categories.length} ${kind === "class" ? "classes" : "type keys"}; the ${top.length} largest overall)`,
      columns: [kind, ...b.groups.map((g) => `${g.group} (${g.km.toFixed(1)} km)`), "recordings"],
      rows: top.map((c) => [c.category, ...b.groups.map((g) => pct(share.get(`${g.group}\u0000${c.category}`) ?? 0, 1)), c.recordings.length]),
    });
    if (by === "recording") {
      bullets.push(...b.warnings);
      tables.push({
        caption: `Coverage of each recording's own ${kind === "class" ? "classes" : "type keys"} (Good–Turing: chance its next scenario is of a kind it has not shown yet)`,
        columns: ["recording", "scenarios", "kinds seen", "seen once", "seen twice", "unseen mass", "Chao1"],
        rows: b.groups.map((g) => [g.group, g.scenarios, g.coverage.categories, g.coverage.singletons, g.coverage.doubletons, pct(g.coverage.unseenMass, 1), g.coverage.chao1.toFixed(1)]),
      });
    }
  }
  return {
    id: "breakdown",
    heading: "Shares by recording and condition",
    paragraphs: [
      `How the ${kind === "class" ? "classes" : "type keys"} divide each recording's ${r.options.weightBy}${groupings.length > 1 ? " and each stated condition's" : ""}. ` +
        "A share that differs between recordings is a property of those recordings (site, day, traffic); a category seen in one recording only rests on that recording. " +
        "roadsieve compare tests whether two groups differ (docs/catalogue-over-time.md).",
    ],
    bullets,
    tone: bullets.length > 0 ? "caution" : "normal",
    tables,
  };
}
