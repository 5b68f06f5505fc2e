import { resolve } from "node:path";
import { parseArgs } from "node:util";
import { writeFileAtomic } from "../../core/io.js";
import { compareCatalogues, type CompareOptions } from "../../compare/compareCatalogues.js";
import { comparisonSummary } from "../../compare/comparisonSummary.js";
import { splitByCondition } from "../../compare/catalogueSample.js";
import { readPlanFolder } from "../../compare/readPlanFolder.js";
import { CONDITION_FIELDS, type ConditionField } from "../../recording/conditions.js";
import type { Command } from "../command.js";
import { UsageError, choiceOption, numberOption } from "../usageError.js";

const HELP = `roadsieve compare A B [options]
roadsieve compare DIR --by FIELD --groups X,Y [options]

Compare two catalogues (two plan folders written by roadsieve plan), or two condition groups of one
(--by a condition field or "recording", --groups the two values). Prints per category (the class when
measured, else the type key) the share in each with the difference and a bootstrap interval over
drives; a chi-square and a G-test of homogeneity of the category frequencies (asymptotic, and by
permutation of drives); an energy-distance permutation test on the features; which categories appear
in only one; the discovery curves at equal effort.

Catalogues made with a different tool version, scenario windows, embedding or type-key options or
feature set cannot be compared: exit 2 with what differs.

Options:
  --by FIELD           recording | ${CONDITION_FIELDS.join(" | ")}
  --groups X,Y         the two values of FIELD to compare
  --permutations N     permutations of the permutation tests          (default: 999)
  --bootstrap N        bootstrap resamples of the share intervals     (default: 999)
  --unit U             drive | scenario: what the permutations and the bootstrap move (default: drive)
  --weight W           km | hours: what a share is a share of         (default: km)
  --min-expected E     merge categories with expected counts below E  (default: 5)
  --no-embedding       skip the energy-distance test
  --seed N             seed of the permutations and resamples         (default: 1)
  --out FILE           also write the full comparison as JSON

Example:
  roadsieve compare plan-june plan-july --out june-vs-july.json
  roadsieve compare plan-q3 --by trafficDensity --groups light,dense
`;

export const compareCommand: Command = {
  name: "compare",
  summary: "compare two catalogues or two condition groups (shares, tests, discovery)",
  help: HELP,
  async run(argv) {
    const { values: v, positionals } = parseArgs({
      args: argv,
      options: {
        by: { type: "string" },
        groups: { type: "string" },
        permutations: { type: "string" },
        bootstrap: { type: "string" },
        unit: { type: "string" },
        weight: { type: "string" },
        "min-expected": { type: "string" },
        "no-embedding": { type: "boolean", default: false },
        seed: { type: "string" },
        out: { type: "string" },
      },
      strict: true,
      allowPositionals: true,
    });
    const options: CompareOptions = {
      permutations: numberOption("permutations", v.permutations, { integer: true, min: 1 }),
      bootstrap: numberOption("bootstrap", v.bootstrap, { integer: true, min: 1 }),
      unit: choiceOption("unit", v.unit, ["drive", "scenario"] as const),
      weightBy: choiceOption("weight", v.weight, ["km", "hours"] as const),
      minExpected: numberOption("min-expected", v["min-expected"], { min: 0 }),
      embeddingTest: !v["no-embedding"],
      seed: numberOption("seed", v.seed, { integer: true, min: 0 }),
    };
    let a;
    let b;
    if (v.by !== undefined || v.groups !== undefined) {
      if (positionals.length !== 1) throw new UsageError("with --by give one plan folder; roadsieve compare --help");
      if (v.by === undefined || v.groups === undefined) throw new UsageError("give --by and --groups together");
      const by = v.by as ConditionField | "recording";
      if (by !== "recording" && !(CONDITION_FIELDS as readonly string[]).includes(by))
        throw new UsageError(`--by=${JSON.stringify(v.by)} should be recording or one of ${CONDITION_FIELDS.join(", ")}`);
      const groups = v.groups.split(",").map((s) => s.trim());
      if (groups.length !== 2 || groups.some((g) => g === "")) throw new UsageError(`--groups=${JSON.stringify(v.groups)} should be two values separated by a comma`);
      const folder = await readPlanFolder(resolve(positionals[0]!), positionals[0]);
      [a, b] = splitByCondition(folder.sample, folder.recordings, by, groups[0]!, groups[1]!);
    } else {
      if (positionals.length !== 2) throw new UsageError("give two plan folders (or one with --by and --groups); roadsieve compare --help");
      a = (await readPlanFolder(resolve(positionals[0]!), positionals[0])).sample;
      b = (await readPlanFolder(resolve(positionals[1]!), positionals[1])).sample;
    }
    const c = compareCatalogues(a, b, options);
    process.stdout.write(`${comparisonSummary(c)}\n`);
    if (v.out) {
      const path = resolve(v.out);
      await writeFileAtomic(path, `${JSON.stringify(c, (_k, x: unknown) => (typeof x === "number" && !Number.isFinite(x) ? null : x), 2)}\n`);
      process.stdout.write(`wrote ${path}\n`);
    }
    return 0;
  },
};
