import { DuckDBInstance } from "@duckdb/node-api";
import { InputError } from "../core/errors.js";
import { existsSync } from "node:fs";

/** A value read back from the catalogue, in plain JavaScript types. */
export type CatalogueValue = number | string | boolean | null;

/**
 * Run one SQL query against a catalogue database (read-only) and return the rows as plain objects.
 * BIGINT values are returned as numbers (exact up to 2^53). For notebooks and scripts:
 *   await queryCatalogue("out/catalogue.duckdb", "SELECT type_key, count(*) n FROM scenarios GROUP BY 1 ORDER BY n DESC")
 */
export async function queryCatalogue(path: string, sql: string): Promise<Record<string, CatalogueValue>[]> {
  if (!existsSync(path)) throw new InputError("no catalogue database at this path; run roadsieve plan (or writeOutputs) first", { file: path });
  const instance = await DuckDBInstance.create(path, { access_mode: "READ_ONLY" });
  const conn = await instance.connect();
  try {
    const reader = await conn.runAndReadAll(sql);
    const rows = reader.getRowObjectsJS() as Record<string, unknown>[];
    return rows.map((r) => {
      const o: Record<string, CatalogueValue> = {};
      for (const [k, v] of Object.entries(r)) o[k] = typeof v === "bigint" ? Number(v) : v === undefined ? null : (v as CatalogueValue);
      return o;
    });
  } catch (e) {
    throw new InputError(`the query failed: ${(e as Error).message.split("\n")[0]}`, { file: path });
  } finally {
    conn.closeSync();
    instance.closeSync();
  }
}
