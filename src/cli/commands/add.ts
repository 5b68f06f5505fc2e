import { resolve } from "node:path";
import { parseArgs } from "node:util";
import { addRecordings } from "../../compare/addRecordings.js";
import { writeFileAtomic } from "../../core/io.js";
import type { Progress } from "../../core/progress.js";
import { readRecording } from "../../recording/readRecording.js";
import type { Recording } from "../../recording/types.js";
import type { Command } from "../command.js";
import { progressDisplay } from "../progressDisplay.js";
import { RECORDING_HELP, RECORDING_OPTIONS, recordingOptions } from "../recordingOptions.js";
import { UsageError, numberOption } from "../usageError.js";

const HELP = `roadsieve add PLAN_DIR TRACKS... [options]

Add a batch of recordings to a finished plan without refitting. The new recordings are cut and
embedded with the options stored in PLAN_DIR/model.json and put into the plan's clusters (as
roadsieve assign does); then, beside the plan's catalogue (PLAN_DIR/catalogue.duckdb):
  - per cluster the share in the catalogue, in the batch and in both together;
  - new candidates: the batch's novel scenarios (the model's rule: DBSCAN noise under the plan's eps),
    the share farther from their cluster than 95 % of its own scenarios (about 5 % when the batch is
    like the plan), and the categories (classes, else type keys) the catalogue never showed;
  - coverage of the categories before and after;
  - whether the batch is like the catalogue: chi-square, G-test, drive permutation, energy distance
    (as roadsieve compare).
The plan's files are not changed; --out writes everything as JSON. A model that does not match the
recordings' features, or a plan made with another tool version, is exit code 2.

Options:
${RECORDING_HELP}
  --out FILE           write the full result as JSON
  --list N             list at most N candidates                      (default: 15)
  --permutations N     permutations of the batch comparison           (default: 999)
  --seed N             seed of the permutations                       (default: 1)
  --quiet              no progress display

Example:
  roadsieve add plan-q3 recordings/day4/tracks.parquet --out plan-q3/day4-added.json
`;

const pct = (x: number): string => `${(100 * x).toFixed(1)} %`;

export const addCommand: Command = {
  name: "add",
  summary: "add recordings to a plan without refitting: updated shares, new candidates, coverage, batch test",
  help: HELP,
  async run(argv) {
    const { values, positionals } = parseArgs({
      args: argv,
      options: {
        ...RECORDING_OPTIONS,
        out: { type: "string" },
        list: { type: "string" },
        permutations: { type: "string" },
        seed: { type: "string" },
        quiet: { type: "boolean", default: false },
      },
      strict: true,
      allowPositionals: true,
    });
    if (positionals.length < 2) throw new UsageError("give the plan folder and at least one tracks file; roadsieve add --help");
    const [planDir, ...files] = positionals as [string, ...string[]];
    const listMax = numberOption("list", values.list, { integer: true, min: 0 }) ?? 15;
    const permutations = numberOption("permutations", values.permutations, { integer: true, min: 1 });
    const seed = numberOption("seed", values.seed, { integer: true, min: 0 });
    const readOptions = await recordingOptions(values);
    const display = progressDisplay(process.stderr, Boolean(values.quiet));
    const progress: Progress = display.progress;
    try {
      const recs: Recording[] = [];
      for (const f of files) recs.push(await readRecording(f, { ...readOptions, progress }));
      const r = await addRecordings(resolve(planDir), recs, { compare: { permutations, seed }, progress });
      display.done();
      const out = process.stdout;
      const batchKm = r.recordings.reduce((s, x) => s + x.km, 0);
      out.write(`${planDir}: k = ${r.model.k} clusters fitted on ${r.model.trainingScenarios} scenarios; novelty by ${r.model.novelty}\n`);
      out.write(`added ${r.assignments.length} scenarios (${batchKm.toFixed(1)} vehicle-km) from ${r.recordings.map((x) => x.id).join(", ")}\n\n`);
      const header = ["cluster", "catalogue", "batch", "together", "batch scenarios"];
      const rows = r.clusters.map((c) => [c.cluster < 0 ? "novel (noise)" : String(c.cluster), pct(c.catalogue.share), pct(c.batch.share), pct(c.updated.share), String(c.batch.scenarios)]);
      const width = header.map((h, j) => Math.max(h.length, ...rows.map((x) => x[j]!.length)));
      out.write(header.map((h, j) => (j === 0 ? h.padEnd(width[j]!) : h.padStart(width[j]!))).join("  ") + "\n");
      for (const x of rows) out.write(x.map((v, j) => (j === 0 ? v.padEnd(width[j]!) : v.padStart(width[j]!))).join("  ") + "\n");
      out.write(`\nNew candidates:\n`);
      out.write(`  ${r.novel.length} novel scenario(s) by the model's rule${r.novel.length ? ", most novel first:" : ""}\n`);
      for (const n of r.novel.slice(0, listMax)) out.write(`    ${n.scenarioId}  ${n.tStart.toFixed(1)}–${n.tEnd.toFixed(1)} s, nearest cluster ${n.nearestCluster}, novelty ${n.novelty.toFixed(2)}, ${n.category}\n`);
      const f = r.farFromClusters;
      out.write(`  ${f.scenarios} of ${r.assignments.length} (${pct(f.share)}) farther from their cluster than 95 % of its own scenarios (about ${pct(f.expectedShare)} for a batch like the plan)\n`);
      out.write(`  ${r.newCategories.length} ${r.categoryKind === "class" ? "class(es)" : "type key(s)"} the catalogue never showed${r.newCategories.length ? ":" : ""}\n`);
      for (const c of r.newCategories.slice(0, listMax)) out.write(`    ${c.category}  ${c.scenarios} scenario(s), ${c.km.toFixed(2)} km\n`);
      const b = r.coverage.before;
      const a = r.coverage.after;
      out.write(`\nCoverage of the ${r.categoryKind === "class" ? "classes" : "type keys"}: ${b.categories} → ${a.categories} seen, Chao1 ${b.chao1.toFixed(1)} → ${a.chao1.toFixed(1)}, chance the next scenario is a new one ${pct(b.unseenMass)} → ${pct(a.unseenMass)}\n`);
      const c = r.comparison;
      out.write(
        `Is the batch like the catalogue? chi-square p = ${c.frequency.chiSquare.p.toPrecision(3)}, G-test p = ${c.frequency.gTest.p.toPrecision(3)}, ` +
          `drive permutation p = ${c.frequency.permutation.p.toPrecision(3)}${c.embedding ? `, energy distance p = ${c.embedding.p.toPrecision(3)}` : ""} (docs/catalogue-over-time.md for the cautions)\n`,
      );
      if (values.out) {
        const path = resolve(values.out);
        await writeFileAtomic(path, `${JSON.stringify(r, (_k, x: unknown) => (typeof x === "number" && !Number.isFinite(x) ? null : x), 2)}\n`);
        out.write(`wrote ${path}\n`);
      }
      for (const w of [...r.warnings, ...c.warnings]) process.stderr.write(`warning: ${w}\n`);
      return 0;
    } finally {
      display.done();
    }
  },
};
