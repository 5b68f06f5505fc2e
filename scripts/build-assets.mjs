// Build step after tsc: a minified copy of plotly.js for the self-contained HTML report, so that
// reports carry ~4.8 MB of plotting code instead of the 10 MB unminified bundle.
import { transformSync } from "esbuild";
import { mkdirSync, readFileSync, renameSync, writeFileSync } from "node:fs";
import { createRequire } from "node:module";

const require = createRequire(import.meta.url);
const src = readFileSync(require.resolve("plotly.js-dist/plotly.js"), "utf8");
const out = transformSync(src, { minify: true, legalComments: "inline", target: "es2019" }).code;
mkdirSync("dist/assets", { recursive: true });
writeFileSync("dist/assets/.plotly.min.js.tmp", out);
renameSync("dist/assets/.plotly.min.js.tmp", "dist/assets/plotly.min.js");
console.log(`dist/assets/plotly.min.js: ${(out.length / 1e6).toFixed(2)} MB`);
