/** A command-line mistake (unknown option, bad value): exit code 2 with this one-line message. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = "UsageError";
  }
}

/** Parse a number option; the message names the option, the value and what was expected. */
export function numberOption(name: string, raw: string | undefined, check: { integer?: boolean; min?: number; max?: number } = {}): number | undefined {
  if (raw === undefined) return undefined;
  const v = Number(raw);
  const what = check.integer ? "an integer" : "a number";
  const range =
    check.min !== undefined && check.max !== undefined ? ` in [${check.min}, ${check.max}]` : check.min !== undefined ? ` >= ${check.min}` : check.max !== undefined ? ` <= ${check.max}` : "";
  if (raw.trim() === "" || !Number.isFinite(v) || (check.integer && !Number.isInteger(v)) || (check.min !== undefined && v < check.min) || (check.max !== undefined && v > check.max))
    throw new UsageError(`--${name}=${JSON.stringify(raw)} should be ${what}${range}`);
  return v;
}

/** Parse "A..B" (inclusive integer range). */
export function rangeOption(name: string, raw: string | undefined, min: number): [number, number] | undefined {
  if (raw === undefined) return undefined;
  const m = /^(\d+)\.\.(\d+)$/.exec(raw.trim());
  if (!m) throw new UsageError(`--${name}=${JSON.stringify(raw)} should look like 2..16`);
  const a = Number(m[1]);
  const b = Number(m[2]);
  if (a < min || b < a) throw new UsageError(`--${name}=${JSON.stringify(raw)} should satisfy ${min} <= A <= B`);
  return [a, b];
}

/** Parse a choice among literal values. */
export function choiceOption<T extends string>(name: string, raw: string | undefined, choices: readonly T[]): T | undefined {
  if (raw === undefined) return undefined;
  if (!(choices as readonly string[]).includes(raw)) throw new UsageError(`--${name}=${JSON.stringify(raw)} should be one of ${choices.join(", ")}`);
  return raw as T;
}
