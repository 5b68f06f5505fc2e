import type { CatalogueSample } from "./catalogueSample.js";

/** Stable JSON with sorted keys, for comparing option objects. */
function canonical(v: unknown): string {
  if (Array.isArray(v)) return `[${v.map(canonical).join(",")}]`;
  if (v && typeof v === "object") {
    const o = v as Record<string, unknown>;
    return `{${Object.keys(o)
      .filter((k) => o[k] !== undefined)
      .sort()
      .map((k) => `${JSON.stringify(k)}:${canonical(o[k])}`)
      .join(",")}}`;
  }
  return JSON.stringify(v);
}

/** The leaves where two option objects differ, as "path: a vs b" (at most `limit`). */
function leafDifferences(x: unknown, y: unknown, path: string, out: string[], limit = 6): void {
  if (out.length >= limit || canonical(x) === canonical(y)) return;
  if (x && y && typeof x === "object" && typeof y === "object" && !Array.isArray(x) && !Array.isArray(y)) {
    const keys = [...new Set([...Object.keys(x), ...Object.keys(y)])].sort();
    for (const k of keys) leafDifferences((x as Record<string, unknown>)[k], (y as Record<string, unknown>)[k], path ? `${path}.${k}` : k, out, limit);
    return;
  }
  const show = (v: unknown) => (v === undefined ? "not set" : canonical(v).slice(0, 60));
  out.push(`${path} ${show(x)} vs ${show(y)}`);
}

/**
 * What makes two catalogues incomparable, in words: a different tool version, scenario windows,
 * embedding options, maneuver detection or scene options, type-key options (when categories are type
 * keys), feature set, or one side with classes and the other with type keys. Empty when they can be
 * compared.
 */
export function catalogueDifferences(a: CatalogueSample, b: CatalogueSample): string[] {
  const out: string[] = [];
  if (a.categoryKind !== b.categoryKind) out.push(`categories are ${a.categoryKind}s in "${a.name}" but ${b.categoryKind}s in "${b.name}"`);
  const ma = a.making;
  const mb = b.making;
  if (ma && mb) {
    if (ma.tool !== mb.tool) out.push(`made with different tool versions (${ma.tool} vs ${mb.tool})`);
    const d: string[] = [];
    leafDifferences(ma.scenario, mb.scenario, "scenario", d);
    if (d.length > 0) out.push(`different scenario windows (${d.join(", ")})`);
    const e: string[] = [];
    leafDifferences(ma.embedding, mb.embedding, "embedding", e);
    if (e.length > 0) out.push(`different embedding options (${e.join(", ")})`);
    for (const [key, what] of [
      ["maneuvers", "maneuver detection options"],
      ["scene", "scene options (neighbours, criticality thresholds)"],
    ] as const) {
      const m: string[] = [];
      leafDifferences(ma[key], mb[key], key, m);
      if (m.length > 0) out.push(`different ${what} (${m.join(", ")})`);
    }
    if (a.categoryKind === "type key") {
      const t: string[] = [];
      leafDifferences(ma.typeKey, mb.typeKey, "typeKey", t);
      if (t.length > 0) out.push(`different type-key options (${t.join(", ")})`);
    }
  }
  if (a.features && b.features) {
    const sa = new Set(a.featureNames);
    const sb = new Set(b.featureNames);
    const onlyA = a.featureNames.filter((f) => !sb.has(f));
    const onlyB = b.featureNames.filter((f) => !sa.has(f));
    if (onlyA.length > 0 || onlyB.length > 0 || a.featureNames.join("\u0000") !== b.featureNames.join("\u0000"))
      out.push(
        `different feature sets (${a.featureNames.length} vs ${b.featureNames.length} features${onlyA.length ? `; only in "${a.name}": ${onlyA.slice(0, 3).join(", ")}${onlyA.length > 3 ? " …" : ""}` : ""}${onlyB.length ? `; only in "${b.name}": ${onlyB.slice(0, 3).join(", ")}${onlyB.length > 3 ? " …" : ""}` : ""}${onlyA.length === 0 && onlyB.length === 0 ? "; same names, different order" : ""})`,
      );
  }
  return out;
}
