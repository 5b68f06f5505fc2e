import { spawnSync } from "node:child_process";
import { fileURLToPath } from "node:url";

/** The official ASAM schemas shipped with the project (standards/, with their provenance). */
export const OSC_XSD = fileURLToPath(new URL("../../standards/openscenario/OpenSCENARIO-1.2.0.xsd", import.meta.url));
export const ODR_XSD = fileURLToPath(new URL("../../standards/opendrive/1.6.1/opendrive_16_core.xsd", import.meta.url));

/**
 * Validate files against an XSD with xmllint (libxml2). Returns the files that fail with xmllint's
 * messages; xmllint is a required test tool (CI installs libxml2-utils), so its absence is a failure.
 */
export function xsdFailures(files: readonly string[], xsd: string): string[] {
  const failures: string[] = [];
  for (let i = 0; i < files.length; i += 200) {
    const chunk = files.slice(i, i + 200);
    const r = spawnSync("xmllint", ["--noout", "--schema", xsd, ...chunk], { encoding: "utf8", maxBuffer: 1 << 26 });
    if (r.error) throw new Error(`xmllint is needed to validate against the ASAM XSD: ${r.error.message}`);
    if (r.status !== 0) failures.push(...r.stderr.split("\n").filter((l) => l.trim() !== "" && !/ validates$/.test(l)));
  }
  return failures;
}
