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
 * Run a query whose columns are all DOUBLE and never NULL, and copy them into Float64Arrays, chunk by
 * chunk from the materialized result (pushing into JS arrays or building row objects was ~3× slower
 * for a million rows). Callers turn NULL into NaN in SQL (`coalesce(…, 'NaN'::DOUBLE)`) and, where
 * they need to know, select a separate mask column saying which cells were NULL.
 *
 * Fast path: node-api's DOUBLE vector keeps its values in a Float64Array view of DuckDB's buffer
 * (`items`, not part of the typed API); when that view is there it is copied with one `set` per
 * chunk. Otherwise — a different node-api version — the public `getItem` is used. Both give the same
 * numbers (tested).
 */
export async function fetchDoubles(
  c: DuckDBConnection,
  sql: string,
  options: { fastPath?: boolean } = {},
): Promise<{ rows: number; columns: Float64Array[] }> {
  const fast = options.fastPath ?? true;
  const res: DuckDBMaterializedResult = await c.run(sql);
  const rows = res.rowCount;
  const ncol = res.columnCount;
  const columns = Array.from({ length: ncol }, () => new Float64Array(rows));
  let off = 0;
  for (let k = 0; k < res.chunkCount; k++) {
    const chunk = res.getChunk(k);
    const m = chunk.rowCount;
    for (let j = 0; j < ncol; j++) {
      const v = chunk.getColumnVector(j);
      const out = columns[j]!;
      const items = fast ? (v as unknown as { items?: unknown }).items : undefined;
      if (items instanceof Float64Array && items.length === m) {
        out.set(items, off);
        continue;
      }
      for (let i = 0; i < m; i++) {
        const item = v.getItem(i);
        if (typeof item !== "number")
          throw new TypeError(`internal: column ${j} of "${sql.slice(0, 80)}…" should be DOUBLE and never NULL, got ${String(item)}`);
        out[off + i] = item;
      }
    }
    off += m;
  }
  return { rows, columns };
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
