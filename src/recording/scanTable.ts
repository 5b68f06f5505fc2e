/**
 * Scan a tracks file through DuckDB into typed columns, in file order, with each row's 1-based
 * position in the file. Structural problems (unreadable file, missing column, a value that is not a
 * number) throw InputError naming file, row, column and value.
 */
import type { DuckDBConnection } from "@duckdb/node-api";
import { InputError } from "../core/errors.js";
import { resolveColumns } from "./columns.js";
import type { ColumnMapping, ResolvedColumns, TrackColumn } from "./columns.js";
import { duckdbMessage, fetchDoubles, fetchRows, sqlIdent, sqlString, withDuckDB } from "./duckdb.js";
import { KIND_EMPTY, KIND_NAMES, KIND_CODES, KIND_UNRECOGNISED } from "./kinds.js";

export type TracksFormat = "csv" | "parquet";

/** The scanned table: numeric columns (kind as codes), in file order. */
export interface RawTable {
  file: string;
  rows: number;
  /** 1-based data row in the file (CSV: the header is row 0; Parquet: row index in file order + 1). */
  row: Float64Array;
  columns: Partial<Record<TrackColumn, Float64Array>>;
  /** Per column, 1 where the cell was empty (NULL); absent when the column has no empty cell. */
  empty: Partial<Record<TrackColumn, Uint8Array>>;
  /** Our column → the file's column name. */
  names: ResolvedColumns;
  /** Distinct kind names that were not recognised (at most 20). */
  unrecognisedKinds: string[];
}

/** Which of our columns are scanned as numbers. */
const NUMERIC: readonly TrackColumn[] = ["track_id", "t", "frame", "x", "y", "vx", "vy", "ax", "ay", "lane", "length", "width"];

const NUMERIC_TYPES = /^(DOUBLE|FLOAT|REAL|DECIMAL.*|TINYINT|SMALLINT|INTEGER|BIGINT|HUGEINT|UTINYINT|USMALLINT|UINTEGER|UBIGINT|UHUGEINT)$/;

export function scanTable(
  file: string,
  format: TracksFormat,
  mapping: ColumnMapping | undefined,
): Promise<RawTable> {
  return withDuckDB(async (c) => {
    const source =
      format === "csv"
        ? `read_csv(${sqlString(file)}, header = true, all_varchar = true)`
        : `read_parquet(${sqlString(file)}, file_row_number = true)`;
    let described: Array<Record<string, unknown>>;
    try {
      described = await fetchRows(c, `DESCRIBE SELECT * FROM ${source}`);
    } catch (e) {
      throw new InputError(`cannot read as ${format === "csv" ? "CSV" : "Parquet"}: ${duckdbMessage(e)}`, { file });
    }
    const types = new Map<string, string>();
    for (const r of described) types.set(String(r.column_name), String(r.column_type));
    const fileColumns = [...types.keys()].filter((n) => !(format === "parquet" && n === "file_row_number"));
    const names = resolveColumns(fileColumns, mapping, file);

    // One SELECT: the row position, a flags column, every numeric column as DOUBLE (NULL → NaN, so
    // that the values can be copied in bulk) and kind as a code. Flags: bit j = the j-th scanned cell
    // is present but not a number; bit (16 + j) = it is empty (NULL).
    const scanned: TrackColumn[] = NUMERIC.filter((col) => names[col] !== undefined);
    const exprs: string[] = [];
    const flags: string[] = [];
    scanned.forEach((col, j) => {
      const name = names[col]!;
      const id = sqlIdent(name);
      const type = types.get(name)!;
      if (type === "VARCHAR") {
        exprs.push(`coalesce(TRY_CAST(${id} AS DOUBLE), 'NaN'::DOUBLE)`);
        flags.push(`CASE WHEN ${id} IS NOT NULL AND TRY_CAST(${id} AS DOUBLE) IS NULL THEN ${2 ** j} ELSE 0 END`);
      } else if (NUMERIC_TYPES.test(type)) {
        exprs.push(`coalesce(CAST(${id} AS DOUBLE), 'NaN'::DOUBLE)`);
      } else {
        throw new InputError(`column has type ${type}; expected numbers`, { file, column: name });
      }
      flags.push(`CASE WHEN ${id} IS NULL THEN ${2 ** (16 + j)} ELSE 0 END`);
    });
    const rowExpr = format === "csv" ? "CAST(row_number() OVER () AS DOUBLE)" : "CAST(file_row_number + 1 AS DOUBLE)";
    const flagExpr = `CAST(${flags.join(" + ")} AS DOUBLE)`;
    let kindExpr: string | undefined;
    if (names.kind !== undefined) {
      const k = `lower(trim(CAST(${sqlIdent(names.kind)} AS VARCHAR)))`;
      const cases = Object.entries(KIND_NAMES)
        .map(([n, kind]) => `WHEN ${sqlString(n)} THEN ${KIND_CODES.indexOf(kind)}`)
        .join(" ");
      kindExpr = `CAST(CASE WHEN ${sqlIdent(names.kind)} IS NULL THEN ${KIND_EMPTY} ELSE CASE ${k} ${cases} ELSE ${KIND_UNRECOGNISED} END END AS DOUBLE)`;
    }
    const sql = `SELECT ${[rowExpr, flagExpr, ...exprs, ...(kindExpr ? [kindExpr] : [])].join(", ")} FROM ${source}`;
    let data: Awaited<ReturnType<typeof fetchDoubles>>;
    try {
      data = await fetchDoubles(c, sql);
    } catch (e) {
      throw new InputError(`cannot read as ${format === "csv" ? "CSV" : "Parquet"}: ${duckdbMessage(e)}`, { file });
    }
    const [row, flag] = data.columns as [Float64Array, Float64Array];
    const base = 2; // index of the first value column
    // A value that is not a number is a structural error: report the first one in file order.
    let first = -1;
    let anyFlag = false;
    for (let i = 0; i < data.rows; i++) {
      const f = flag[i]!;
      if (f === 0) continue;
      const badBits = f % 65536;
      if (badBits !== 0 && (first < 0 || row[i]! < row[first]!)) first = i;
      anyFlag = true;
    }
    if (first >= 0) {
      const mask = flag[first]! % 65536;
      const j = scanned.findIndex((_, k) => Math.floor(mask / 2 ** k) % 2 === 1);
      const name = names[scanned[j]!]!;
      const value = await rawValue(c, source, format, name, row[first]!);
      throw new InputError(`value is not a number`, { file, row: row[first], column: name, value });
    }
    const columns: RawTable["columns"] = {};
    const empty: RawTable["empty"] = {};
    scanned.forEach((col, j) => {
      columns[col] = data.columns[base + j];
      if (!anyFlag) return;
      const bit = 2 ** (16 + j);
      let mark: Uint8Array | undefined;
      for (let i = 0; i < data.rows; i++)
        if (Math.floor(flag[i]! / bit) % 2 === 1) (mark ??= new Uint8Array(data.rows))[i] = 1;
      if (mark) empty[col] = mark;
    });
    let unrecognisedKinds: string[] = [];
    if (kindExpr) {
      const codes = data.columns[base + scanned.length]!;
      columns.kind = codes;
      if (codes.includes(KIND_UNRECOGNISED)) {
        const id = sqlIdent(names.kind!);
        const known = Object.keys(KIND_NAMES).map(sqlString).join(", ");
        const rows = await fetchRows(
          c,
          `SELECT DISTINCT CAST(${id} AS VARCHAR) AS k FROM ${source} WHERE ${id} IS NOT NULL AND lower(trim(CAST(${id} AS VARCHAR))) NOT IN (${known}) ORDER BY k LIMIT 20`,
        );
        unrecognisedKinds = rows.map((r) => String(r.k));
      }
    }
    return { file, rows: data.rows, row, columns, empty, names, unrecognisedKinds };
  });
}

/** The raw text of one cell, found by its row position (same ordering as the scan). */
async function rawValue(c: DuckDBConnection, source: string, format: TracksFormat, column: string, row: number): Promise<string> {
  const pos = format === "csv" ? "row_number() OVER ()" : "file_row_number + 1";
  const rows = await fetchRows(
    c,
    `SELECT CAST(v AS VARCHAR) AS v FROM (SELECT ${pos} AS r, ${sqlIdent(column)} AS v FROM ${source}) WHERE r = ${row}`,
  );
  return String(rows[0]?.v);
}
