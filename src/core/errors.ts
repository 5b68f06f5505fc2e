/** Where a bad value sits. Every field that is known is filled; messages quote all of them. */
export interface InputLocation {
  file?: string;
  /** 1-based data row (the header is row 0), or undefined when the problem is not row-specific. */
  row?: number;
  column?: string;
  value?: unknown;
}

/**
 * Bad user input: a file, option or value that cannot be used. The CLI turns it into exit code 2
 * with its one-line message; library callers can read the location fields.
 */
export class InputError extends Error {
  readonly file?: string;
  readonly row?: number;
  readonly column?: string;
  readonly value?: unknown;
  constructor(problem: string, where: InputLocation = {}) {
    super(formatInputError(problem, where));
    this.name = "InputError";
    this.file = where.file;
    this.row = where.row;
    this.column = where.column;
    this.value = where.value;
  }
}

export function formatInputError(problem: string, where: InputLocation): string {
  const parts: string[] = [];
  if (where.file !== undefined) parts.push(where.file);
  if (where.row !== undefined) parts.push(`row ${where.row}`);
  if (where.column !== undefined) parts.push(`column "${where.column}"`);
  if ("value" in where && where.value !== undefined) parts.push(`value ${JSON.stringify(String(where.value))}`);
  return parts.length > 0 ? `${parts.join(", ")}: ${problem}` : problem;
}
