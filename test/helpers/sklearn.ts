/**
 * Run a Python snippet under Debian's /usr/bin/python3 (which has python3-sklearn; plain `python3` on
 * PATH is a different interpreter without it) and parse the JSON it prints on its last line.
 *
 * Large inputs go through files: `writeF64(name, data)` writes raw little-endian float64 that the
 * snippet reads with `np.fromfile(path, dtype='<f8')`. The snippet gets the directory in `DIR`.
 */
import { execFileSync } from "node:child_process";
import { existsSync, mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";

export const PYTHON = "/usr/bin/python3";

let cached: string | null | undefined;
/** Why scikit-learn tests must skip, or null when /usr/bin/python3 with sklearn is there. */
export function sklearnMissing(): string | null {
  if (cached !== undefined) return cached;
  if (!existsSync(PYTHON)) return (cached = `${PYTHON} not found`);
  try {
    execFileSync(PYTHON, ["-c", "import sklearn, numpy"], { stdio: "pipe" });
    cached = null;
  } catch (e) {
    cached = `${PYTHON} cannot import sklearn/numpy: ${(e as Error).message.split("\n")[0]}`;
  }
  return cached;
}

export class PyWorkspace {
  readonly dir: string;
  constructor() {
    this.dir = mkdtempSync(join(tmpdir(), "roadsieve-py-"));
  }
  /** Write raw float64 (little-endian); returns the path. */
  writeF64(name: string, data: Float64Array): string {
    const p = join(this.dir, name);
    writeFileSync(p, new Uint8Array(data.buffer, data.byteOffset, data.byteLength));
    return p;
  }
  /** Run `code` (DIR is predefined) and return the JSON printed on its last stdout line. */
  run<T = unknown>(code: string, timeoutMs = 600_000): T {
    const prelude = `import json, sys\nimport numpy as np\nDIR = ${JSON.stringify(this.dir)}\n`;
    const out = execFileSync(PYTHON, ["-c", prelude + code], {
      encoding: "utf8",
      timeout: timeoutMs,
      maxBuffer: 1 << 30,
      env: { ...process.env, OMP_NUM_THREADS: process.env.OMP_NUM_THREADS ?? "2" },
    });
    const lines = out.trim().split("\n");
    return JSON.parse(lines[lines.length - 1]!) as T;
  }
  dispose(): void {
    rmSync(this.dir, { recursive: true, force: true });
  }
}

/** One-shot helper for small snippets. */
export function runPython<T = unknown>(code: string): T {
  const ws = new PyWorkspace();
  try {
    return ws.run<T>(code);
  } finally {
    ws.dispose();
  }
}
