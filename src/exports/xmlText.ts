/** Small helpers for writing XML text deterministically (no DOM, no dependency). */

/** Attribute/text escaping for the five XML special characters. */
export function xmlEscape(s: string): string {
  return s.replace(/&/g, "&amp;").replace(/</g, "&lt;").replace(/>/g, "&gt;").replace(/"/g, "&quot;").replace(/'/g, "&apos;");
}

/** Fixed-decimal number text without "-0" and without trailing zeros, deterministic ("1.5", "0", "-2.25"). */
export function xmlNumber(v: number, digits = 4): string {
  if (!Number.isFinite(v)) throw new RangeError(`cannot write the non-finite number ${v} into XML`);
  let s = v.toFixed(digits);
  if (s.includes(".")) s = s.replace(/0+$/, "").replace(/\.$/, "");
  return s === "-0" ? "0" : s;
}

/** `name="value"` pairs in the given order (values escaped). */
export function xmlAttrs(attrs: ReadonlyArray<readonly [string, string]>): string {
  return attrs.map(([k, v]) => ` ${k}="${xmlEscape(v)}"`).join("");
}
