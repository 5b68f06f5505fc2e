import { mkdtempSync, readFileSync, existsSync, readdirSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { describe, expect, it } from "vitest";
import { queryCatalogue } from "../src/catalogue/queryCatalogue.js";
import { writeCatalogue } from "../src/catalogue/writeCatalogue.js";
import { sqlName } from "../src/catalogue/catalogueTables.js";
import { InputError } from "../src/core/errors.js";

const dir = mkdtempSync(join(tmpdir(), "roadsieve-cat-"));
const table = {
  name: "scenarios",
  columns: [
    { name: "idx", type: "INTEGER" as const, values: [0, 1, 2] },
    { name: "window", type: "INTEGER" as const, values: [5, 6, 7] }, // a reserved SQL word as a column name
    { name: "min_ttc", type: "DOUBLE" as const, values: [1.25, null, 0.5] },
    { name: "type_key", type: "VARCHAR" as const, values: ["LK|K", "LCL|A", "it's"] },
    { name: "critical", type: "BOOLEAN" as const, values: [false, null, true] },
    { name: "track", type: "BIGINT" as const, values: [9007199254740991, 2, 3] },
  ],
};

describe("writeCatalogue / queryCatalogue", () => {
  it("round-trips values, NULLs, quotes and reserved words through DuckDB and SQL", async () => {
    const path = join(dir, "a.duckdb");
    await writeCatalogue(path, [table], { parquetDir: join(dir, "pq") });
    const rows = await queryCatalogue(path, 'SELECT idx, "window", min_ttc, type_key, critical, track FROM scenarios ORDER BY idx');
    expect(rows).toEqual([
      { idx: 0, window: 5, min_ttc: 1.25, type_key: "LK|K", critical: false, track: 9007199254740991 },
      { idx: 1, window: 6, min_ttc: null, type_key: "LCL|A", critical: null, track: 2 },
      { idx: 2, window: 7, min_ttc: 0.5, type_key: "it's", critical: true, track: 3 },
    ]);
    const agg = await queryCatalogue(path, "SELECT count(*) AS n, avg(min_ttc) AS m FROM scenarios WHERE min_ttc IS NOT NULL");
    expect(agg).toEqual([{ n: 2, m: 0.875 }]);
    expect(existsSync(join(dir, "pq", "scenarios.parquet"))).toBe(true);
    expect(readdirSync(dir).filter((f) => f.endsWith(".tmp"))).toEqual([]);
  });

  it("writes the same Parquet bytes twice", async () => {
    await writeCatalogue(join(dir, "b.duckdb"), [table], { parquetDir: join(dir, "pq2") });
    expect(readFileSync(join(dir, "pq2", "scenarios.parquet")).equals(readFileSync(join(dir, "pq", "scenarios.parquet")))).toBe(true);
  });

  it("rejects a ragged table and leaves no database or temporary file behind", async () => {
    const ragged = { name: "t", columns: [{ name: "a", type: "DOUBLE" as const, values: [1, 2] }, { name: "b", type: "DOUBLE" as const, values: [1] }] };
    await expect(writeCatalogue(join(dir, "c.duckdb"), [ragged])).rejects.toThrow("table t: column b has 1 rows, expected 2");
    expect(existsSync(join(dir, "c.duckdb"))).toBe(false);
    expect(readdirSync(dir).filter((f) => f.endsWith(".tmp"))).toEqual([]);
  });

  it("reports a bad query or a missing database as an InputError naming the file", async () => {
    await expect(queryCatalogue(join(dir, "a.duckdb"), "SELECT nope FROM scenarios")).rejects.toThrow(InputError);
    await expect(queryCatalogue(join(dir, "missing.duckdb"), "SELECT 1")).rejects.toThrow(/missing\.duckdb/);
  });

  it("sqlName turns feature names into plain identifiers", () => {
    expect(sqlName("ego.speed.mean")).toBe("ego_speed_mean");
    expect(sqlName("1/TTC max")).toBe("f_1_TTC_max");
  });
});
