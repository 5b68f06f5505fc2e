#!/usr/bin/env node
/**
 * The roadsieve command line. Exit codes: 0 success, 1 an unexpected failure (a bug: please report
 * it with the stack trace), 2 bad input or usage with a one-line reason.
 */
import { InputError } from "../core/errors.js";
import { VERSION } from "../core/version.js";
import type { Command } from "./command.js";
import { addCommand } from "./commands/add.js";
import { assignCommand } from "./commands/assign.js";
import { checkCommand } from "./commands/check.js";
import { compareCommand } from "./commands/compare.js";
import { diffPlansCommand } from "./commands/diffPlans.js";
import { demoCommand } from "./commands/demo.js";
import { extractCommand } from "./commands/extract.js";
import { generateCommand } from "./commands/generate.js";
import { planCommand } from "./commands/plan.js";
import { resimCommand } from "./commands/resim.js";
import { submitCommand, workerCommand } from "./commands/queue.js";
import { UsageError } from "./usageError.js";

const COMMANDS: Command[] = [demoCommand, planCommand, assignCommand, addCommand, extractCommand, submitCommand, workerCommand, checkCommand, generateCommand, compareCommand, diffPlansCommand, resimCommand];

function mainHelp(): string {
  const width = Math.max(...COMMANDS.map((c) => c.name.length));
  return `roadsieve ${VERSION}: recorded highway traffic in, an exposure-weighted scenario test plan out.

Usage: roadsieve <command> [options]      (roadsieve <command> --help for its options)

Commands:
${COMMANDS.map((c) => `  ${c.name.padEnd(width)}  ${c.summary}`).join("\n")}

Exit codes: 0 done, 2 bad input or usage (one line says which file, row, column, value), 1 a bug.
`;
}

export async function main(argv: string[]): Promise<number> {
  const [name, ...rest] = argv;
  if (name === undefined || name === "--help" || name === "-h" || name === "help") {
    const target = name === "help" ? COMMANDS.find((c) => c.name === rest[0]) : undefined;
    process.stdout.write(target ? target.help : mainHelp());
    return 0;
  }
  if (name === "--version" || name === "-v") {
    process.stdout.write(`${VERSION}\n`);
    return 0;
  }
  const cmd = COMMANDS.find((c) => c.name === name);
  if (!cmd) {
    process.stderr.write(`roadsieve: unknown command "${name}"; commands: ${COMMANDS.map((c) => c.name).join(", ")} (roadsieve --help)\n`);
    return 2;
  }
  if (rest.includes("--help") || rest.includes("-h")) {
    process.stdout.write(cmd.help);
    return 0;
  }
  try {
    return await cmd.run(joinNegativeValues(rest));
  } catch (e) {
    if (e instanceof InputError || e instanceof UsageError || isParseArgsError(e)) {
      process.stderr.write(`\nroadsieve ${cmd.name}: ${(e as Error).message.split("\n")[0]}\n`);
      return 2;
    }
    throw e;
  }
}

/**
 * "--budget -1": node's parseArgs takes "-1" for an option and reports "argument is ambiguous";
 * joining a negative number to the option before it lets the option's own check name the problem.
 */
function joinNegativeValues(argv: string[]): string[] {
  const out: string[] = [];
  for (let i = 0; i < argv.length; i++) {
    const a = argv[i]!;
    const next = argv[i + 1];
    if (a.startsWith("--") && !a.includes("=") && next !== undefined && /^-(\d|\.\d|Infinity)/.test(next)) {
      out.push(`${a}=${next}`);
      i++;
    } else out.push(a);
  }
  return out;
}

function isParseArgsError(e: unknown): boolean {
  const code = (e as { code?: string } | null)?.code;
  return typeof code === "string" && code.startsWith("ERR_PARSE_ARGS");
}

main(process.argv.slice(2)).then(
  (code) => {
    process.exitCode = code;
  },
  (e: unknown) => {
    process.stderr.write(`roadsieve: unexpected failure (please report it): ${(e as Error).stack ?? String(e)}\n`);
    process.exitCode = 1;
  },
);
