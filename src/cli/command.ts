/** One CLI command: its help text and what it does. Returns the process exit code. */
export interface Command {
  name: string;
  summary: string;
  /** Full help, shown by `roadsieve <name> --help`. */
  help: string;
  run(argv: string[]): Promise<number>;
}
