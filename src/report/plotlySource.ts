import { existsSync, readFileSync } from "node:fs";
import { createRequire } from "node:module";
import { fileURLToPath } from "node:url";

let cached: string | undefined;

/**
 * The plotly.js bundle to inline into reports: the minified copy made by the build
 * (dist/assets/plotly.min.js) when running from dist/, else the package's own bundle.
 */
export function plotlySource(): string {
  if (cached !== undefined) return cached;
  const built = fileURLToPath(new URL("../assets/plotly.min.js", import.meta.url));
  if (existsSync(built)) {
    cached = readFileSync(built, "utf8");
  } else {
    const require = createRequire(import.meta.url);
    cached = readFileSync(require.resolve("plotly.js-dist/plotly.js"), "utf8");
  }
  return cached;
}
