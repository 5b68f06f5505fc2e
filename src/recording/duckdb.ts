/**
 * The one place that talks to DuckDB (@duckdb/node-api). Nothing here is exported from the package:
 * public types never mention DuckDB.
 */
import { DuckDBInstance } from "@duckdb/node-api";
import type { DuckDBConnection } from "@duckdb/node-api";

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
 * Run a query whose columns are all DOUBLE and never NULL, and copy them into Float64Arrays. The
 * result is streamed chunk by chunk (2048 rows each) instead of materialized: for a million rows that
 * halves the time, because DuckDB produces the next chunks while we copy and never holds the whole
 * result. Callers turn NULL into NaN in SQL (`coalesce(…, 'NaN'::DOUBLE)`) and, where they need to
 * know, select a separate flags column saying which cells were NULL.
 *
 * Fast path: node-api's DOUBLE vector keeps its values in a Float64Array view of DuckDB's buffer
 * (`items`, not part of the typed API); when that view is there it is copied with one `slice` per
 * chunk and column. Otherwise — a different node-api version — the public `getItem` is used. Both
 * give the same numbers (tested).
 */
export async function fetchDoubles(
  c: DuckDBConnection,
  sql: string,
  options: { fastPath?: boolean } = {},
): Promise<{ rows: number; columns: Float64Array[] }> {
  const fast = options.fastPath ?? true;
  const res = await c.stream(sql);
  const ncol = res.columnCount;
  const parts: Float64Array[][] = Array.from({ length: ncol }, () => []);
  let rows = 0;
  for (;;) {
    const chunk = await res.fetchChunk();
    if (!chunk || chunk.rowCount === 0) break;
    const m = chunk.rowCount;
    for (let j = 0; j < ncol; j++) {
      const v = chunk.getColumnVector(j);
      const items = fast ? (v as unknown as { items?: unknown }).items : undefined;
      let out: Float64Array;
      if (items instanceof Float64Array && items.length === m) out = items.slice();
      else {
        out = new Float64Array(m);
        for (let i = 0; i < m; i++) {
          const item = v.getItem(i);
          if (typeof item !== "number")
            throw new TypeError(`internal: column ${j} of "${sql.slice(0, 80)}…" should be DOUBLE and never NULL, got ${String(item)}`);
          out[i] = item;
        }
      }
      parts[j]!.push(out);
    }
    rows += m;
  }
  const columns = parts.map((list) => {
    if (list.length === 1) return list[0]!;
    const col = new Float64Array(rows);
    let off = 0;
    for (const p of list) {
      col.set(p, off);
      off += p.length;
    }
    return col;
  });
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
