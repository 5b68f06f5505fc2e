/**
 * Benchmark entry: `npm run bench -- <name> [options]` runs bench/<name>.ts against the built
 * library. Each benchmark prints a human-readable log and, as its last line, one JSON object with
 * its figures so that results can be collected by scripts.
 */
import { readdirSync } from "node:fs";
import { dirname, join } from "node:path";
import { fileURLToPath, pathToFileURL } from "node:url";

const here = dirname(fileURLToPath(import.meta.url));
const available = readdirSync(here)
  .filter((f) => f.endsWith(".ts") && f !== "main.ts" && !f.startsWith("_"))
  .map((f) => f.slice(0, -3))
  .sort();

const [name, ...rest] = process.argv.slice(2);
if (!name || name === "--help" || !available.includes(name)) {
  const msg = `usage: npm run bench -- <${available.join("|")}> [options]`;
  if (name && name !== "--help") {
    console.error(`unknown benchmark "${name}"; ${msg}`);
    process.exit(2);
  }
  console.log(msg);
  process.exit(0);
}
const mod = (await import(pathToFileURL(join(here, `${name}.ts`)).href)) as { run(args: string[]): Promise<void> };
await mod.run(rest);
