import { VERSION } from "../core/version.js";
import { FEATURE_GROUPS } from "../embed/features.js";
import { LATERAL, LONGITUDINAL } from "../maneuvers/labels.js";
import type { PipelineResult } from "../pipeline/runPipeline.js";
import { criticalReasons } from "../plan/criticality.js";
import { resolveTestPlanOptions } from "../plan/options.js";
import type { TestCase, TestPlan } from "../plan/types.js";
import { criticalityFigure, type CriticalRule } from "./criticalityFigure.js";
import { clusterNames, describeTypeKey, reasonInWords, EXPOSURE_WORDS, exposureLegend, roleLegend, shortClusterName, typeKeyLegend, type ReportLegend } from "./describe.js";
import { discoveryFigure, type DiscoverySeries } from "./discoveryFigure.js";
import { foldRepeatedColumns } from "./foldColumns.js";
import { histogramFigure } from "./histogramFigure.js";
import type { ReportCell, ReportDocument, ReportSection } from "./html.js";
import { kDistanceFigure } from "./kDistanceFigure.js";
import { kSweepFigure } from "./kSweepFigure.js";
import { leadSections, LEAD_SECTIONS, type LeadSection } from "./leadSections.js";
import { breakdown } from "../catalogue/breakdown.js";
import { CONDITION_FIELDS, NOT_GIVEN } from "../recording/conditions.js";
import { logicalSections } from "./logicalSection.js";
import type { FidelityRow } from "../resim/fidelityTable.js";
import { fidelitySection } from "./fidelitySection.js";
import { scenarioMapFigure } from "./scenarioMapFigure.js";
import { shareFigure, type ShareBar } from "./shareFigure.js";

const pct = (x: number, digits = 2): string => `${(100 * x).toFixed(digits)} %`;
const fix = (x: number | null, digits = 2): string => (x === null || !Number.isFinite(x) ? "–" : x.toFixed(digits));
const big = (x: number): string => (x >= 1e6 ? x.toExponential(3) : x.toLocaleString("en", { maximumFractionDigits: 1 }));

/** The cautions every report carries, whatever the plan says in addition. */
export const REPORT_CAUTIONS = [
  "These figures describe the recordings that went in: their roads, traffic, weather and sensors. They say nothing about situations those recordings could not contain.",
  "Statistical estimates of exposure and coverage are not a safety argument on their own. Whether a test plan is sufficient is decided in the ISO 26262 and ISO 21448 (SOTIF) processes and by the responsible safety assessment, not by this tool.",
  "Exposure classes are shown as an aid for hazard analysis (thresholds quoted from memory of ISO 26262-3 Annex B); they are not classifications made by this tool.",
];

/** Plain words for the roles (the legend explains them in full). */
const ROLE_WORDS: Record<string, string> = { representative: "stands for its cluster", critical: "kept: critical", rare: "kept: rare" };

function reasonWords(reason: string, t: TestCase, name: (l: number) => string): string {
  return reasonInWords(reason, shortClusterName(name(t.cluster)), t.memberCount);
}

/** The first plan rule a scenario crossed, from the plan's own reasons. */
function ruleOf(reasons: string[]): CriticalRule | null {
  const r = reasons[0];
  if (!r) return null;
  if (r.startsWith("critical: min TTC")) return "ttc";
  if (r.startsWith("critical: min time headway")) return "thw";
  if (r.startsWith("critical: cut-in")) return "cut-in";
  if (r.startsWith("critical: peak deceleration")) return "decel";
  return "flag";
}

export interface BuildReportOptions {
  title?: string;
  /** Sections placed first when the plan has logical scenarios (default: the registered LEAD_SECTIONS). */
  leadSections?: readonly LeadSection[];
  /** Re-simulation results (resim/resimPlanFolder), shown before the warnings when given. */
  fidelity?: readonly FidelityRow[];
}

/** Turn a pipeline result into the report document (data only; renderHtml makes the page). */
export function buildReport(r: PipelineResult, titleOrOptions: string | BuildReportOptions = {}, fidelityRows?: readonly FidelityRow[]): ReportDocument {
  const opts: BuildReportOptions = typeof titleOrOptions === "string" ? { title: titleOrOptions, fidelity: fidelityRows } : { fidelity: fidelityRows, ...titleOrOptions };
  const title = opts.title ?? "roadsieve test plan";
  // The plan of logical scenarios (schema 2) comes first (logicalSection.ts); the sections after
  // it describe the global cluster view, plan.exploration, in a reader's terms.
  const plan = r.plan.exploration;
  const sc = r.scenarios.scenarios;
  const n = sc.length;
  const names = clusterNames(sc, r.labels, r.typeKeys);
  const name = (l: number): string => names.name(l);
  const hover = sc.map((s, i) => `${s.id}<br>${shortClusterName(name(r.labels[i]!))}<br>${describeTypeKey(r.typeKeys[i]!)}<br>${(s.km * 1000).toFixed(0)} m, ${s.seconds.toFixed(1)} s`);
  const reps = plan.testCases.map((t) => t.scenarioIndex);
  // The plan's own definition of critical, with the thresholds the plan ran with.
  const planOptions = resolveTestPlanOptions(r.options.plan);
  const reasons = sc.map((s) => criticalReasons(s, planOptions));
  const critical = reasons.map((x) => x.length > 0);
  const sections: ReportSection[] = [];
  const window = describeWindow(r);

  sections.push({
    id: "summary",
    heading: "Summary",
    paragraphs: [
      `A scenario is one ${window} window of one vehicle's drive (that vehicle is "the ego"). The recordings were cut into ${n} scenarios. ` +
        `The plan groups them into logical scenarios by class and parameters (first sections below); the later sections show the same scenarios grouped into ${r.k} clusters of similar scenarios (the cluster view), with ${plan.testCases.length} cluster test cases: ` +
        `${plan.selection.representatives} that each stand for a whole cluster, ${plan.selection.critical} kept because they crossed a criticality rule, and ${plan.selection.rare} kept because they are rare.`,
      ...r.plan.summary.split(/\n+/).filter((p) => p.trim() !== ""),
    ],
  });
  sections.push({ id: "cautions", heading: "Cautions", tone: "caution", bullets: r.plan.cautions.length > 0 ? r.plan.cautions : REPORT_CAUTIONS });
  // Sections registered in the slot (leadSections.ts), then the plan of logical scenarios.
  sections.push(...leadSections(r.plan as unknown as TestPlan & { logicalScenarios?: unknown[] }, opts.leadSections ?? LEAD_SECTIONS));
  sections.push(...logicalSections(r.plan));

  sections.push(testCaseSection(r, name, window));

  sections.push({
    id: "map",
    heading: "Map of similar scenarios",
    paragraphs: [
      `Each point is one scenario. Scenarios are compared on ${r.embedding.features.length} measured features (see "What the clustering compares"); the ${r.map.method === "umap" ? "UMAP" : "principal-component (PCA)"} map places similar scenarios near each other. ` +
        (r.map.fittedOn < n ? `The map was fitted on a seeded sample of ${r.map.fittedOn} scenarios and the rest placed onto it. ` : "") +
        `Distances on the map are only a guide: the clustering itself works on all features.`,
    ],
    figures: [
      {
        figure: scenarioMapFigure({ coords: r.map.coords, labels: r.labels, representatives: reps, hover, critical, method: r.map.method, clusterName: (l) => shortClusterName(name(l)) }),
        caption:
          "What it shows: every scenario as a dot, coloured by its cluster (grey: rare, in no dense cluster); black-edged diamonds are the test cases, red rings the scenarios the plan counts as critical. " +
          "How to read it: dots close together are similar scenarios; a cluster whose dots spread widely is less well represented by its one diamond. The axes have no units. Click a legend entry to hide or show a cluster; hover a dot for its id and type.",
      },
    ],
  });

  const clusterFigures: { figure: ReturnType<typeof kSweepFigure>; caption: string }[] = [];
  if (r.sweep)
    clusterFigures.push({
      figure: kSweepFigure(r.sweep.rows, r.k, "chosen"),
      caption:
        `What it shows: for each number of clusters k tried, how well the scenarios separate. How to read it: the silhouette (blue, left axis; −1 to 1, higher is better) peaks where the clusters are most distinct; inertia (dotted, right axis) always falls as k grows; Davies–Bouldin (lower panel) is better when lower. ` +
        `Rule used: ${r.sweep.rule}. Silhouette on ${r.sweep.silhouetteExact ? "all" : `a seeded sample of ${r.sweep.silhouetteSample}`} scenarios.`,
    });
  if (r.dbscan?.epsSuggestion)
    clusterFigures.push({
      figure: kDistanceFigure(r.dbscan.epsSuggestion.kDistances, r.dbscan.eps, r.dbscan.epsSuggestion.k),
      caption:
        `What it shows: for every scenario, the distance to its ${r.dbscan.epsSuggestion.k}-th most similar scenario, sorted. How to read it: where the curve bends up sharply, scenarios stop having close neighbours; the red line (the radius eps) is placed at that bend, and the scenarios above it are the rare ones. ` +
        `${r.dbscan.epsSuggestion.method}. DBSCAN ran on ${r.dbscan.components} principal components (${pct(r.dbscan.explainedVariance, 1)} of the variance) with minPts ${r.dbscan.minPts}: ${r.dbscan.nClusters} dense regions, ${r.dbscan.nNoise} rare scenarios.`,
    });
  sections.push({
    id: "clusters",
    heading: "Clusters and how often they occur",
    paragraphs: [
      `k-means with k = ${r.k} (${r.sweep ? "chosen by silhouette" : "given"}), weighted by ${r.options.weightBy === "km" ? "kilometres" : "hours"}, converged ${r.kmeans.converged ? "" : "NOT "}after ${r.kmeans.iterations} iterations. ` +
        `Each cluster is named after what most of its scenarios do. Rates are occurrences per 1000 vehicle-km with exact Poisson (Garwood) 95 % intervals.`,
    ],
    figures: clusterFigures,
    tables: [
      foldRepeatedColumns({
        columns: ["cluster", "typical scenario (medoid)", "scenarios", "km", "hours", "share of km", "share of time", "drives", "per 1000 km [95 % CI]", "exposure aid", "how often (reading)"],
        rows: plan.exposureTable.map((e): ReportCell[] => [
          name(e.cluster),
          e.medoidId ?? "–",
          e.scenarios,
          Number(e.km.toFixed(3)),
          Number(e.hours.toFixed(4)),
          pct(e.share, 3),
          pct(e.timeShare, 3),
          e.drives,
          `${fix(e.ratePer1000km.rate)} [${fix(e.ratePer1000km.lower)}, ${fix(e.ratePer1000km.upper)}]`,
          { code: e.exposureClass, label: EXPOSURE_WORDS[e.exposureClass] ?? "" },
          e.frequency.class ? `${e.frequency.class}: ${e.frequency.wording}` : e.frequency.wording,
        ]),
      }),
    ],
    legends: [exposureLegend()],
  });

  const th = { ttc: planOptions.ttcBelow, thw: planOptions.thwBelow, cutInThw: planOptions.cutInThwBelow, decel: planOptions.decelAbove };
  const ruleCount = new Map<string, number>();
  for (const x of reasons) if (x.length > 0) ruleCount.set(ruleOf(x)!, (ruleCount.get(ruleOf(x)!) ?? 0) + 1);
  sections.push({
    id: "criticality",
    heading: "Criticality: which scenarios came close",
    paragraphs: [
      `The plan counts a scenario as critical when its time-to-collision fell below ${th.ttc} s, its time headway below ${th.thw} s, a cut-in happened with a headway below ${th.cutInThw} s, or the ego braked harder than ${th.decel} m/s²${planOptions.criticalFlags.length > 0 ? `, or it carries one of the flags ${planOptions.criticalFlags.join(", ")}` : ""} (common practice thresholds; plan options). ` +
        `${plan.selection.criticalScenarios} scenarios are critical (first rule crossed: ${[...ruleCount.entries()].map(([k, v]) => `${k === "ttc" ? "TTC" : k === "thw" ? "headway" : k === "cut-in" ? "cut-in" : k === "decel" ? "braking" : "flag"} ${v}`).join(", ") || "none"}); every one is a test case or stands behind one.`,
    ],
    figures: [
      {
        figure: criticalityFigure(
          sc.map((s, i) => ({ minTtc: s.criticality.minTtc, minThw: s.criticality.minThw, rule: ruleOf(reasons[i]!), hover: hover[i] })),
          th,
        ),
        caption:
          `What it shows: each scenario's shortest time headway (x) and shortest time-to-collision while closing in (y), on log scales. How to read it: further down and left is closer to a collision; the dashed red lines are the plan's TTC (${th.ttc} s) and headway (${th.thw} s) thresholds, the dotted line the cut-in headway threshold (${th.cutInThw} s). ` +
          `Red markers are critical, the marker shape tells which rule (legend); scenarios critical only for hard braking can lie anywhere here — see the braking chart below. Scenarios with no leader or never closing in sit at the top or right edge ("${60}+ / none").`,
      },
      {
        figure: histogramFigure(
          sc.map((s) => s.criticality.maxDecel),
          "Hardest braking per scenario",
          "peak deceleration of the ego (m/s²)",
          { bins: 60, logY: true, threshold: th.decel },
        ),
        caption: `What it shows: how many scenarios reached each peak deceleration of the ego. How to read it: the count axis is logarithmic so the few hard-braking scenarios stay visible; the dashed red line is the plan's braking threshold (${th.decel} m/s²) — every scenario to its right is critical.`,
      },
    ],
  });

  const cov = plan.coverage;
  const series: DiscoverySeries[] = [];
  for (const [label, c] of [
    ["type keys", cov.typeKeys],
    ["clusters", cov.clusters],
  ] as const) {
    series.push({ name: `${label}: seen, in recording order`, km: c.discovery.observed.km, count: c.discovery.observed.distinct, style: "observed" });
    const ex = c.discovery.expected;
    const rare = ex.method.map((m, i) => (m !== "extrapolated" ? i : -1)).filter((i) => i >= 0);
    const extra = ex.method.map((m, i) => (m !== "rarefied" ? i : -1)).filter((i) => i >= 0);
    series.push({ name: `${label}: expected (rarefaction)`, km: rare.map((i) => ex.km[i]!), count: rare.map((i) => ex.distinct[i]!), style: "rarefied" });
    if (extra.length > 1) series.push({ name: `${label}: expected with more driving`, km: extra.map((i) => ex.km[i]!), count: extra.map((i) => ex.distinct[i]!), style: "extrapolated" });
  }
  const covBullets = (label: string, c: typeof cov.typeKeys): string[] => [
    `${label}: ${c.observed} seen in ${c.scenarios} scenarios (${c.singletons} seen once, ${c.doubletons} twice); Chao1 estimates ${c.chao1.estimate.toFixed(1)} in all (${Math.round(c.chao1.level * 100)} % interval ${c.chao1.lower.toFixed(1)}–${c.chao1.upper.toFixed(1)}).`,
    `${label}: chance that the next scenario is of a kind not yet seen (Good–Turing): ${pct(c.unseenMass)}.`,
    ...c.effort.map((e) => `${label}: to see ${pct(e.share, 0)} of the estimated kinds, about ${big(e.additionalKm)} more vehicle-km (${big(e.additionalScenarios)} scenarios) would be needed (Chao et al. 2009).`),
    `${label}: coupon-collector view with every estimated kind equally likely: ${big(c.couponCollector.equal.expectedKm)} vehicle-km expected to see them all; with the observed frequencies and a tail for the unseen ones: ${big(c.couponCollector.estimated.expectedKm)} vehicle-km (${pct(c.couponCollector.estimated.quantile.q, 1)} quantile ${big(c.couponCollector.estimated.quantile.km)}). ${c.couponCollector.note}`,
  ];
  const zf = cov.zeroFailure;
  const tkRows = cov.typeKeys.table.map((t): ReportCell[] => [{ code: t.kind, label: describeTypeKey(t.kind) }, t.count]);
  sections.push({
    id: "coverage",
    heading: "How complete is the catalogue?",
    paragraphs: [
      'Kinds of scenario are counted two ways: by type key (what the ego did, who was around, which events happened; legend below) and by cluster (with each rare scenario counted as a kind of its own). The "seen" curve shows how many kinds appeared as kilometres accumulated; the expected curve (rarefaction) smooths out the recording order, and the extrapolation (Shen, Chao & Lin 2003) shows what more driving would add.',
      `With no event in the ${big(zf.recordedKm)} recorded vehicle-km, a rate below ${zf.rateBoundPerKm.toExponential(2)} per km is shown at ${pct(zf.confidence, 0)} confidence (n = −ln(1 − C) / r).` +
        (zf.reference ? ` Showing a rate below ${zf.reference.label} this way would need ${big(zf.reference.kmNeeded)} km; the recordings are ${pct(zf.reference.recordedShareOfNeeded, 4)} of that.` : ""),
    ],
    bullets: [...covBullets("Type keys", cov.typeKeys), ...covBullets("Clusters", cov.clusters)],
    figures: [
      {
        figure: discoveryFigure(series, [
          { name: "type keys, Chao1 estimate", value: cov.typeKeys.chao1.estimate },
          { name: "clusters, Chao1 estimate", value: cov.clusters.chao1.estimate },
        ]),
        caption:
          "What it shows: how many distinct kinds of scenario had appeared after each amount of driving (solid), the same averaged over recording order (dashed), and projected for more driving (dotted). " +
          "How to read it: a curve still rising steeply at the right means more driving keeps finding new kinds, so the catalogue is far from complete; a flattening curve means new kinds have become rare. Estimated totals that lie far above the curves are named at the top instead of drawn.",
      },
    ],
    tables: [{ caption: "Type keys by frequency (most frequent first)", columns: ["type key (and in words)", "scenarios"], rows: tkRows, maxRows: 40 }],
    legends: [typeKeyLegend()],
  });

  sections.push(featureSection(r));

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
  const legend = typeKeyLegend();
  const meaning = (code: string): string => legend.entries.find((e) => e.code === code)?.meaning ?? "";
  const maneuverWords: Record<string, string> = {
    keep: "keeps its speed",
    accelerate: "speeds up",
    decelerate: "slows down",
    "lane-keep": "keeps its lane",
    "lane-change-left": "changes lane to the left",
    "lane-change-right": "changes lane to the right",
  };
  sections.push({
    id: "maneuvers",
    heading: "Maneuvers and events",
    paragraphs: [`${segments} basic maneuver segments detected over ${r.recordings.reduce((a, x) => a + x.tracks, 0)} tracks.`],
    tables: [
      { columns: ["basic maneuver", "segments"], rows: [...LONGITUDINAL, ...LATERAL].map((m): ReportCell[] => [`${m} (${maneuverWords[m]})`, segCounts.get(m) ?? 0]) },
      {
        columns: ["event (seen from the ego)", "occurrences"],
        rows: [...events.entries()].sort((a, b) => b[1] - a[1] || (a[0] < b[0] ? -1 : 1)).map(([k, v]): ReportCell[] => [`${k}: ${meaning(k)}`, v]),
      },
    ],
  });

  sections.push({
    id: "recordings",
    heading: "Recordings",
    tables: [
      {
        columns: ["recording", "file", "road", "lanes", "frame rate (Hz)", "tracks", "rows", "rejected tracks", "scenarios", "vehicle-km", "vehicle-hours", "sha256"],
        rows: r.recordings.map((x): ReportCell[] => [x.id, x.source, x.road, x.lanes, x.frameRate, x.tracks, x.rows, x.rejected, x.scenarios, Number(x.km.toFixed(3)), Number(x.hours.toFixed(4)), x.checksum]),
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
  // The same list as plan.json's "warnings" (planFromClustering hands the recordings' and stages'
  // warnings to the plan), so a reader of either sees the same.
  // Hook: re-simulation results (resim/resimPlanFolder), when the caller has them.
  if (opts.fidelity && opts.fidelity.length > 0) sections.push(fidelitySection(opts.fidelity));
  const w = r.plan.warnings;
  sections.push({
    id: "warnings",
    heading: `Warnings (${w.length})`,
    paragraphs: [w.length === 0 ? "No warnings: plan.json lists none." : "The same list as in plan.json (\"warnings\")."],
    bullets: w.slice(0, 200).concat(w.length > 200 ? [`… ${w.length - 200} more in plan.json`] : []),
  });

  const totalKm = plan.totals.km;
  return {
    title,
    subtitle: `${r.recordings.map((x) => `${x.id} (${x.road})`).join(", ")}: ${big(totalKm)} vehicle-km, ${plan.totals.hours.toFixed(2)} vehicle-hours, ${n} scenarios`,
    tiles: [
      { label: "recorded vehicle-km", value: big(totalKm) },
      { label: "vehicle-hours", value: plan.totals.hours.toFixed(2) },
      { label: "scenarios", value: String(n) },
      // The headline is the plan of logical scenarios; the cluster view has its own sections below.
      { label: "logical scenarios", value: String(r.plan.selection.logicalScenarios) },
      { label: "concrete test cases", value: String(r.plan.selection.testCases) },
      { label: "km share of logical scenarios with a test case", value: pct(r.plan.accounting.testedShare, 1) },
      { label: "critical events (each counted once)", value: String(r.plan.selection.criticalEvents) },
      { label: "chance next scenario is a new type", value: pct(cov.typeKeys.unseenMass, 1) },
    ],
    sections,
    provenance: {
      tool: `roadsieve ${VERSION}`,
      seed: String(r.options.seed),
      "plan schema": r.plan.schemaVersion,
      "cluster method": plan.provenance.clusterMethod,
      ...Object.fromEntries(r.recordings.map((x) => [`input ${x.source}`, `sha256 ${x.checksum}`])),
      options: JSON.stringify({ k: r.options.k, kRange: r.options.kRange, nInit: r.options.nInit, map: r.options.map, weightBy: r.options.weightBy, dbscan: r.options.dbscan, plan: r.options.plan }),
    },
  };
}

/** The test-case section: the share chart, then one row per test case with why it is there. */
function testCaseSection(r: PipelineResult, name: (l: number) => string, window: string): ReportSection {
  const plan = r.plan.exploration;
  const bars = shareBars(plan.testCases, 30, name);
  const rows = plan.testCases.map((t): ReportCell[] => [
    t.id,
    { lines: [ROLE_WORDS[t.role] ?? t.role, ...t.reasons.map((x) => reasonWords(x, t, name))] },
    { code: t.typeKey, label: describeTypeKey(t.typeKey) },
    shortClusterName(name(t.cluster)),
    `${t.source.recording}, vehicle ${t.source.egoTrack}, ${t.source.tStart.toFixed(1)}–${t.source.tEnd.toFixed(1)} s`,
    pct(t.share, 3),
    fix(t.criticality.minTtc),
    fix(t.criticality.minThw),
    fix(t.criticality.maxDecel),
    t.memberCount,
    `${fix(t.standsFor.ratePer1000km.rate)} [${fix(t.standsFor.ratePer1000km.lower)}, ${fix(t.standsFor.ratePer1000km.upper)}]`,
    { code: t.standsFor.exposureClass, label: EXPOSURE_WORDS[t.standsFor.exposureClass] ?? "" },
  ]);
  const table = foldRepeatedColumns({
    columns: [
      "test case",
      "why it is in the plan",
      "what happens (type key)",
      "cluster",
      "where in the recordings",
      "share of km it stands for",
      "shortest TTC (s)",
      "shortest headway (s)",
      "hardest braking (m/s²)",
      "scenarios it stands for",
      "per 1000 km [95 % CI]",
      "exposure aid",
    ],
    rows,
    maxRows: 300,
  });
  const legends: ReportLegend[] = [roleLegend(), typeKeyLegend(), exposureLegend()];
  return {
    id: "test-cases",
    heading: "Test cases and why each is in the plan",
    paragraphs: [
      `${plan.testCases.length} test cases, each a real recorded ${window} scenario: ${plan.selection.representatives} representatives (the typical scenario of a cluster, standing for all of its kilometres), ` +
        `${plan.selection.critical} critical and ${plan.selection.rare} rare scenarios kept on their own so that they are not averaged away. ` +
        `Together they stand for ${pct(plan.accounting.testCasesShare)} of the recorded vehicle-kilometres and ${pct(plan.accounting.testCasesTimeShare)} of the recorded time; ` +
        `${pct(plan.accounting.leftOutShare)} of the kilometres is left out by the budget.` +
        (plan.selection.budgetExceeded ? " The critical and rare scenarios alone exceed the budget; they are kept anyway." : ""),
      "“Why it is in the plan” gives the role and, for critical and rare cases, the rule and the measured figure that put it there. Columns in which most rows have the same value are summarised in one sentence above the table.",
    ],
    figures: [
      {
        figure: shareFigure(bars, { kmShare: plan.accounting.leftOutShare, timeShare: plan.accounting.leftOutTimeShare }),
        caption:
          "What it shows: the share of the recorded kilometres each test case stands for (bar) and of the recorded time (black tick). How to read it: a representative's bar is its whole cluster; critical and rare cases stand only for themselves, so their bars are tiny and the smaller ones are summed per role at the bottom. Bars and “not represented” add up to 100 %.",
      },
    ],
    tables: [table],
    legends,
  };
}

/** What the clustering compares: the feature groups, so that names like nb.* or tl.03.* are explained. */
function featureSection(r: PipelineResult): ReportSection {
  const f = r.embedding.features;
  const prefix: Record<string, { prefix: string; meaning: string }> = {
    ego: { prefix: "ego.*", meaning: "the ego's own speed, acceleration, braking, lateral speed and lane" },
    maneuvers: { prefix: "man.*", meaning: "share of the window spent speeding up, slowing down or changing lane; number of lane changes" },
    neighbours: { prefix: "nb.<slot>.*", meaning: "for each of the eight places around the ego (ahead, behind, left-ahead, …): how long it was occupied, the mean gap and relative speed" },
    events: { prefix: "ev.*", meaning: "number of cut-ins, cut-outs, overtakings and closing-in events" },
    criticality: { prefix: "crit.*", meaning: "1 / shortest TTC, shortest headway, hardest required deceleration (DRAC), threshold flags" },
    timeline: { prefix: "tl.<step>.*", meaning: "the window cut into equal time steps (tl.00 first): ego speed, maneuvers, gap to the leader, neighbours left and right, 1/TTC per step" },
  };
  return {
    id: "features",
    heading: "What the clustering compares",
    paragraphs: [
      `Each scenario is described by ${f.length} measured features in ${FEATURE_GROUPS.length} groups; the groups are weighted so that each counts about equally. ` +
        "Notebooks use the feature names below; in the catalogue database their dots become underscores (ego.speed.mean → column ego_speed_mean of the features table), and the feature_info table lists every feature with its unit and meaning.",
    ],
    legends: [
      {
        title: "Feature names, by group",
        entries: FEATURE_GROUPS.map((g) => ({ code: prefix[g]!.prefix, meaning: `${g} (${f.filter((x) => x.group === g).length} features): ${prefix[g]!.meaning}` })),
      },
    ],
  };
}

/**
 * Bars for the share figure: the largest `top` test cases one by one, the rest summed per role so
 * that a plan with hundreds of small rare or critical test cases stays readable.
 */
function shareBars(cases: TestPlan["testCases"], top: number, name: (l: number) => string): ShareBar[] {
  const sorted = [...cases].sort((a, b) => b.share - a.share || a.id.localeCompare(b.id));
  const shown = sorted.slice(0, top);
  const bars: ShareBar[] = shown.map((t) => ({
    name: t.id,
    kmShare: t.share,
    timeShare: t.timeShare,
    reason: t.role,
    hover: `${t.id} (${t.role}): ${describeTypeKey(t.typeKey)}<br>${shortClusterName(name(t.cluster))}, ${t.memberCount} scenarios, ${t.standsFor.km.toFixed(2)} km, ${(t.standsFor.hours * 60).toFixed(1)} min`,
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
  const w = (r.scenarios.options as { window?: { mode?: string; lengthS?: number; minS?: number; maxS?: number } } | undefined)?.window;
  if (w?.mode === "fixed" && w.lengthS) return `${w.lengthS} s`;
  if (w?.mode === "events") return `${w.minS}–${w.maxS} s event-cut`;
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
