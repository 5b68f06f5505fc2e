import { describe, expect, it } from "vitest";
import { fetchDoubles, withDuckDB } from "../src/recording/duckdb.js";

describe("fetchDoubles", () => {
  it("copies several chunks of DOUBLE columns exactly, with the bulk path and with the public getItem path", async () => {
    // 5000 rows = 3 result chunks of at most 2048 rows (DuckDB's vector size).
    const n = 5000;
    const sql = `SELECT CAST(i AS DOUBLE) AS a, CAST(i AS DOUBLE) * 0.1::DOUBLE AS b,
        CASE WHEN i % 7 = 0 THEN 'NaN'::DOUBLE WHEN i % 11 = 0 THEN 'inf'::DOUBLE ELSE -CAST(i AS DOUBLE) / 3.0::DOUBLE END AS c
      FROM range(${n}) r(i) ORDER BY i`;
    const [fast, slow] = await withDuckDB(async (c) => [await fetchDoubles(c, sql), await fetchDoubles(c, sql, { fastPath: false })]);
    // Expected values computed in JavaScript with the same IEEE-754 double arithmetic.
    const a = Float64Array.from({ length: n }, (_, i) => i);
    const b = a.map((i) => i * 0.1);
    const cc = a.map((i) => (i % 7 === 0 ? NaN : i % 11 === 0 ? Infinity : -i / 3.0));
    for (const r of [fast, slow]) {
      expect(r.rows).toBe(n);
      expect(Array.from(r.columns[0]!)).toEqual(Array.from(a));
      expect(Array.from(r.columns[1]!)).toEqual(Array.from(b));
      expect(Array.from(r.columns[2]!)).toEqual(Array.from(cc));
    }
  });

  it("refuses NULL on the getItem path (callers must coalesce)", async () => {
    await expect(
      withDuckDB((c) => fetchDoubles(c, "SELECT CAST(NULL AS DOUBLE) AS x", { fastPath: false })),
    ).rejects.toThrow(/should be DOUBLE and never NULL/);
  });
});
