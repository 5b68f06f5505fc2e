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
 * (`items`, not part of the typed API); when that view is there it is copied with one `set` per
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
  let capacity = 1 << 16;
  let columns = Array.from({ length: ncol }, () => new Float64Array(capacity));
  let rows = 0;
  for (;;) {
    const chunk = await res.fetchChunk();
    if (!chunk || chunk.rowCount === 0) break;
    const m = chunk.rowCount;
    if (rows + m > capacity) {
      // Grow by doubling: amortized one extra copy per value.
      while (rows + m > capacity) capacity *= 2;
      columns = columns.map((old) => {
        const grown = new Float64Array(capacity);
        grown.set(old.subarray(0, rows));
        return grown;
      });
    }
    for (let j = 0; j < ncol; j++) {
      const v = chunk.getColumnVector(j);
      const out = columns[j]!;
      const items = fast ? (v as unknown as { items?: unknown }).items : undefined;
      if (items instanceof Float64Array && items.length === m) {
        out.set(items, rows);
        continue;
      }
      for (let i = 0; i < m; i++) {
        const item = v.getItem(i);
        if (typeof item !== "number")
          throw new TypeError(`internal: column ${j} of "${sql.slice(0, 80)}…" should be DOUBLE and never NULL, got ${String(item)}`);
        out[rows + i] = item;
      }
    }
    rows += m;
  }
  // Views on the rows read (no copy; the spare capacity is freed with the columns, which callers only
  // keep while building tracks).
  return { rows, columns: columns.map((col) => col.subarray(0, rows)) };
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
