import { DuckDBInstance, type DuckDBAppender, type DuckDBConnection } from "@duckdb/node-api";
import { mkdir, rename, rm } from "node:fs/promises";
import { basename, dirname, join } from "node:path";
import type { Progress } from "../core/progress.js";
import { tableRows, type Table, type TableColumn } from "./table.js";

function appendValue(app: DuckDBAppender, col: TableColumn, v: number | string | boolean | null | undefined): void {
  if (v === null || v === undefined) {
    app.appendNull();
    return;
  }
  switch (col.type) {
    case "INTEGER":
      app.appendInteger(v as number);
      return;
    case "BIGINT":
      app.appendBigInt(BigInt(v as number));
      return;
    case "DOUBLE":
      app.appendDouble(v as number);
      return;
    case "VARCHAR":
      app.appendVarchar(String(v));
      return;
    case "BOOLEAN":
      app.appendBoolean(Boolean(v));
      return;
    default: {
      const never: never = col.type;
      throw new Error(`unknown column type ${String(never)}`);
    }
  }
}

async function storeTable(conn: DuckDBConnection, t: Table): Promise<void> {
  const n = tableRows(t);
  await conn.run(`CREATE TABLE "${t.name}" (${t.columns.map((c) => `"${c.name}" ${c.type}`).join(", ")})`);
  const app = await conn.createAppender(t.name);
  for (let i = 0; i < n; i++) {
    for (const c of t.columns) appendValue(app, c, c.values[i]);
    app.endRow();
  }
  app.closeSync();
}

/**
 * Write tables into a new DuckDB database file (atomically: built under a temporary name, then
 * renamed), and optionally export each table to Parquet beside it. The database can be opened from
 * a notebook or the duckdb shell and queried with SQL.
 */
export async function writeCatalogue(
  path: string,
  tables: Table[],
  options: { parquetDir?: string; progress?: Progress } = {},
): Promise<string[]> {
  await mkdir(dirname(path), { recursive: true });
  const tmp = join(dirname(path), `.${basename(path)}.${process.pid}.tmp`);
  await rm(tmp, { force: true });
  await rm(`${tmp}.wal`, { force: true });
  const written: string[] = [];
  const instance = await DuckDBInstance.create(tmp, { threads: "1" });
  const conn = await instance.connect();
  let ok = false;
  try {
    let k = 0;
    for (const t of tables) {
      options.progress?.({ stage: "catalogue", done: k++, total: tables.length, message: t.name });
      await storeTable(conn, t);
    }
    if (options.parquetDir) {
      await mkdir(options.parquetDir, { recursive: true });
      for (const t of tables) {
        const final = join(options.parquetDir, `${t.name}.parquet`);
        const part = join(options.parquetDir, `.${t.name}.parquet.tmp`);
        await conn.run(`COPY (SELECT * FROM "${t.name}") TO '${part.replace(/'/g, "''")}' (FORMAT parquet)`);
        await rename(part, final);
        written.push(final);
      }
    }
    await conn.run("CHECKPOINT");
    ok = true;
  } finally {
    conn.closeSync();
    instance.closeSync();
    if (!ok) {
      // Leave nothing half-written behind: the temporary database and any partial Parquet files.
      await rm(tmp, { force: true });
      await rm(`${tmp}.wal`, { force: true });
      if (options.parquetDir) for (const t of tables) await rm(join(options.parquetDir, `.${t.name}.parquet.tmp`), { force: true });
    }
  }
  await rm(`${tmp}.wal`, { force: true });
  await rename(tmp, path);
  written.unshift(path);
  options.progress?.({ stage: "catalogue", done: tables.length, total: tables.length });
  return written;
}
