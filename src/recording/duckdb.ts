/**
 * The one place that talks to DuckDB (@duckdb/node-api). Nothing here is exported from the package:
 * public types never mention DuckDB.
 */
import { DuckDBInstance } from "@duckdb/node-api";
import type { DuckDBConnection, DuckDBMaterializedResult } from "@duckdb/node-api";

/** Run `fn` with a fresh in-memory database; always closes it. */
export async function withDuckDB<T>(fn: (c: DuckDBConnection) => Promise<T>): Promise<T> {
  const instance = await DuckDBInstance.create(":memory:");
  let conn: DuckDBConnection | undefined;
  try {
    conn = await instance.connect();
    return await fn(conn);
  } finally {
    conn?.closeSync();
    instance.closeSync();
  }
}

/** A SQL string literal. */
export function sqlString(s: string): string {
  return `'${s.replace(/'/g, "''")}'`;
}

/** A quoted SQL identifier. */
export function sqlIdent(s: string): string {
  return `"${s.replace(/"/g, '""')}"`;
}

/**
 * Run a query whose columns are all DOUBLE and copy them into Float64Arrays, chunk by chunk from the
 * materialized result (pushing into JS arrays or building row objects was ~3× slower for a million
 * rows). NULL becomes NaN;
 * `nulls[j]` is set when column j had any NULL and then flags those rows with 1.
 */
export async function fetchDoubles(
  c: DuckDBConnection,
  sql: string,
): Promise<{ rows: number; columns: Float64Array[]; nulls: Array<Uint8Array | undefined> }> {
  const res: DuckDBMaterializedResult = await c.run(sql);
  const rows = res.rowCount;
  const ncol = res.columnCount;
  const columns = Array.from({ length: ncol }, () => new Float64Array(rows));
  const nulls: Array<Uint8Array | undefined> = new Array(ncol).fill(undefined);
  let off = 0;
  for (let k = 0; k < res.chunkCount; k++) {
    const chunk = res.getChunk(k);
    const m = chunk.rowCount;
    for (let j = 0; j < ncol; j++) {
      const v = chunk.getColumnVector(j);
      const out = columns[j]!;
      for (let i = 0; i < m; i++) {
        const item = v.getItem(i);
        if (typeof item === "number") out[off + i] = item;
        else if (item === null) {
          out[off + i] = NaN;
          (nulls[j] ??= new Uint8Array(rows))[off + i] = 1;
        } else throw new TypeError(`internal: column ${j} of "${sql.slice(0, 80)}…" is not DOUBLE`);
      }
    }
    off += m;
  }
  return { rows, columns, nulls };
}

/** Run a query and return its rows as plain JSON-like objects (for small results only). */
export async function fetchRows(c: DuckDBConnection, sql: string): Promise<Array<Record<string, unknown>>> {
  const reader = await c.runAndReadAll(sql);
  return reader.getRowObjectsJS() as Array<Record<string, unknown>>;
}

/** DuckDB's messages start with the error class ("IO Error: …"); keep the first line. */
export function duckdbMessage(e: unknown): string {
  const msg = e instanceof Error ? e.message : String(e);
  return msg.split("\n")[0]!.trim();
}
