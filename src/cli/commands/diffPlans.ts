import { resolve } from "node:path";
import { parseArgs } from "node:util";
import { writeFileAtomic } from "../../core/io.js";
import { planDiffSummary } from "../../compare/comparisonSummary.js";
import { diffPlanFiles } from "../../compare/readPlanFolder.js";
import type { Command } from "../command.js";
import { UsageError } from "../usageError.js";

const HELP = `roadsieve diff-plans OLD NEW [--out FILE]

Difference between two plan versions (plan folders or plan.json files): test cases added, dropped
and kept with the change of the share each stands for, and the same for logical scenarios when both
plans have them. Test-case ids are matched as they are.

Options:
  --out FILE   also write the diff as JSON
`;

export const diffPlansCommand: Command = {
  name: "diff-plans",
  summary: "test cases (and logical scenarios) added, dropped and kept between two plans",
  help: HELP,
  async run(argv) {
    const { values: v, positionals } = parseArgs({ args: argv, options: { out: { type: "string" } }, strict: true, allowPositionals: true });
    if (positionals.length !== 2) throw new UsageError("give two plans: roadsieve diff-plans OLD NEW");
    const d = await diffPlanFiles(resolve(positionals[0]!), resolve(positionals[1]!));
    process.stdout.write(`${planDiffSummary(d)}\n`);
    if (v.out) {
      const path = resolve(v.out);
      await writeFileAtomic(path, `${JSON.stringify(d, null, 2)}\n`);
      process.stdout.write(`wrote ${path}\n`);
    }
    return 0;
  },
};
