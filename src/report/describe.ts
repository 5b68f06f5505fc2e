/**
 * Plain-language labels and legends for every code the report shows: type keys (each part and each
 * code in it), exposure classes, criticality flags, the test-case roles, and names for clusters.
 * The report never shows a code without a label beside it and an entry in a legend; the browser
 * test checks that every code shown has an entry.
 */
import { SCENE_EVENTS, SLOTS } from "../scene/slots.js";
import type { Scenario } from "../scenario/types.js";

/** One legend: a title and code → meaning entries. */
export interface ReportLegend {
  title: string;
  entries: { code: string; meaning: string }[];
}

const LATERAL_WORDS: Record<string, string> = { LK: "keeps its lane", LCL: "lane change to the left", LCR: "lane change to the right" };
const LONGITUDINAL_WORDS: Record<string, string> = { K: "steady speed", A: "speeds up", D: "slows down", "A+D": "speeds up and slows down" };
const EVENT_WORDS: Record<string, string> = {
  "cut-in": "another vehicle cuts in ahead of the ego",
  "cut-out": "the leader leaves the ego's lane",
  overtaken: "another vehicle overtakes the ego",
  "closing-in": "the ego closes in on its leader (TTC finite)",
  ttc: "flag: time-to-collision fell below the scene threshold",
  thw: "flag: time headway fell below the scene threshold",
  "harsh-braking": "flag: the ego braked harder than the scene threshold",
};
const SIDE_WORDS: Record<string, string> = {
  ahead: "a vehicle ahead in the ego's lane (the leader)",
  behind: "a vehicle behind in the ego's lane",
  left: "vehicles in the lane to the left",
  right: "vehicles in the lane to the right",
  "left-ahead": "left lane, ahead",
  "left-alongside": "left lane, alongside",
  "left-behind": "left lane, behind",
  "right-ahead": "right lane, ahead",
  "right-alongside": "right lane, alongside",
  "right-behind": "right lane, behind",
};

/** ISO 26262-3 Annex B exposure classes by share of operating time (quoted from memory). */
export const EXPOSURE_WORDS: Record<string, string> = {
  E0: "incredible",
  E1: "very low probability",
  E2: "low probability (under 1 % of operating time)",
  E3: "medium probability (1 % to 10 % of operating time)",
  E4: "high probability (over 10 % of operating time)",
};

/** The legend of the type key: its four parts, then every code that can appear in each. */
export function typeKeyLegend(): ReportLegend {
  const entries: { code: string; meaning: string }[] = [
    { code: "|", meaning: "separates the four parts: lane changes | speed | neighbours (occ:) | events (ev:)" },
    { code: ">", meaning: "then (order of lane changes)" },
    { code: "…", meaning: "more lane changes followed; the list is cut after the first three" },
    { code: "-", meaning: "none" },
  ];
  for (const [c, m] of Object.entries(LATERAL_WORDS)) entries.push({ code: c, meaning: m });
  for (const [c, m] of Object.entries(LONGITUDINAL_WORDS)) entries.push({ code: c, meaning: m + (c === "A+D" ? " (both within the window; + means “and”)" : "") });
  entries.push({ code: "occ:", meaning: "neighbours present for more than half of the window" });
  for (const s of ["ahead", "behind", "left", "right", ...SLOTS.filter((x) => x !== "ahead" && x !== "behind")]) entries.push({ code: s, meaning: SIDE_WORDS[s]! });
  entries.push({ code: "ev:", meaning: "events seen in the window, and the criticality flags set" });
  for (const e of [...SCENE_EVENTS, "ttc", "thw", "harsh-braking"]) entries.push({ code: e, meaning: EVENT_WORDS[e]! });
  return { title: "How to read a type key (e.g. LCL|D|occ:ahead,left|ev:overtaken)", entries };
}

export function exposureLegend(): ReportLegend {
  return {
    title: "Exposure aid (ISO 26262-3 Annex B duration classes, thresholds quoted from memory; an aid, not a classification)",
    entries: Object.entries(EXPOSURE_WORDS).map(([code, meaning]) => ({ code, meaning })),
  };
}

export function roleLegend(): ReportLegend {
  return {
    title: "Why a test case is in the plan",
    entries: [
      { code: "representative", meaning: "the medoid of a cluster: the real recorded scenario closest to all others of its cluster; it stands for the whole cluster's kilometres" },
      { code: "critical", meaning: "crossed one of the plan's criticality rules (the rule and the measured figure are given); kept on its own so it is not averaged away" },
      { code: "rare", meaning: "in no dense cluster (DBSCAN noise) or of a type key seen only once; kept on its own" },
    ],
  };
}

/** Split a type key into its parts without validating (for display). */
function parts(key: string): { lat: string; lon: string | null; occ: string; ev: string } {
  const p = key.split("|");
  if (p.length === 3) return { lat: p[0]!, lon: null, occ: p[1]!, ev: p[2]! };
  return { lat: p[0] ?? "", lon: p[1] ?? null, occ: p[2] ?? "occ:-", ev: p[3] ?? "ev:-" };
}

function list(items: string[]): string {
  if (items.length <= 1) return items.join("");
  return `${items.slice(0, -1).join(", ")} and ${items[items.length - 1]}`;
}

/** Words for the lane-change part ("LCL>LCR…" → "lane changes left, then right, then more"). */
export function describeLateral(lat: string): string {
  const cut = lat.endsWith("…");
  const body = cut ? lat.slice(0, -1) : lat;
  if (body === "LK") return "keeps its lane";
  const seq = body.split(">").map((c) => (c === "LCL" ? "left" : c === "LCR" ? "right" : c === "LK" ? "keeps lane" : c));
  const word = seq.length === 1 && !cut ? "lane change" : "lane changes";
  return `${word} ${seq.join(", then ")}${cut ? ", then more" : ""}`;
}

/** A type key in plain words, e.g. "lane change left; slows down; vehicles ahead and left; overtaken". */
export function describeTypeKey(key: string): string {
  const p = parts(key);
  const out = [describeLateral(p.lat)];
  if (p.lon !== null) {
    const cut = p.lon.endsWith("…");
    const body = cut ? p.lon.slice(0, -1) : p.lon;
    out.push(LONGITUDINAL_WORDS[body] ?? body.split(">").map((c) => LONGITUDINAL_WORDS[c] ?? c).join(", then ") + (cut ? ", then more" : ""));
  }
  const occ = p.occ.replace(/^occ:/, "");
  out.push(occ === "-" ? "no neighbours" : `neighbours ${list(occ.split(","))}`);
  const ev = p.ev.replace(/^ev:/, "");
  if (ev !== "-")
    out.push(
      ev
        .split(",")
        .map((e) => (e === "ttc" ? "low TTC" : e === "thw" ? "short headway" : e))
        .join(", "),
    );
  return out.join("; ");
}

/** A readable name per cluster label, from what its members mostly do. */
export interface ClusterNames {
  /** Short name, e.g. "cluster 3: keeps its lane, speeds up, ~112 km/h". */
  name(label: number): string;
}

/**
 * Name each cluster by its members' most frequent type key (in words) and their km-weighted mean
 * speed; noise is "rare (no dense cluster)". Names are derived only from the data, so they change
 * when the clusters do.
 */
export function clusterNames(scenarios: readonly Scenario[], labels: ArrayLike<number>, typeKeys: readonly string[]): ClusterNames {
  const byCluster = new Map<number, { keys: Map<string, number>; km: number; speedKm: number; n: number }>();
  for (let i = 0; i < scenarios.length; i++) {
    const l = labels[i]!;
    if (l < 0) continue;
    let g = byCluster.get(l);
    if (!g) byCluster.set(l, (g = { keys: new Map(), km: 0, speedKm: 0, n: 0 }));
    const s = scenarios[i]!;
    const k = typeKeys[i]!;
    g.keys.set(k, (g.keys.get(k) ?? 0) + 1);
    g.km += s.km;
    g.speedKm += s.meanSpeed * s.km;
    g.n++;
  }
  const names = new Map<number, string>();
  for (const [l, g] of byCluster) {
    let best = "";
    let bestN = -1;
    for (const [k, c] of [...g.keys.entries()].sort((a, b) => (a[0] < b[0] ? -1 : 1)))
      if (c > bestN) {
        best = k;
        bestN = c;
      }
    const p = parts(best);
    const lon = p.lon === null ? "" : `, ${LONGITUDINAL_WORDS[p.lon] ?? p.lon}`;
    const kmh = g.km > 0 ? Math.round((3.6 * g.speedKm) / g.km) : NaN;
    const share = Math.round((100 * bestN) / g.n);
    // The rest of the most common type key (who is around, which events) as the detail.
    const rest = describeTypeKey(best).split("; ").slice(p.lon === null ? 1 : 2).join("; ");
    names.set(l, `cluster ${l}: ${describeLateral(p.lat)}${lon}, ~${kmh} km/h (most common, ${share} % of its scenarios: ${rest})`);
  }
  return {
    name(label: number): string {
      if (label < 0) return "rare: in no dense cluster";
      return names.get(label) ?? `cluster ${label}`;
    },
  };
}

/** Short cluster name (without the parenthesis), for chart legends. */
export function shortClusterName(full: string): string {
  const i = full.indexOf(" (");
  return i > 0 ? full.slice(0, i) : full;
}

/** A plan reason (plan.json's reasons) in words a reader outside the project follows. */
export function reasonInWords(reason: string, clusterName?: string, members?: number): string {
  if (reason.startsWith("medoid of cluster"))
    return `typical of ${clusterName ?? reason.slice("medoid of ".length)}: the recorded scenario closest to all ${members ?? "the others"} in it`;
  if (reason === "rare: DBSCAN noise (recurs in no cluster)") return "rare: like no dense group of scenarios (DBSCAN noise)";
  if (reason === "rare: type key seen once") return "rare: the only scenario of its type key";
  return reason;
}
