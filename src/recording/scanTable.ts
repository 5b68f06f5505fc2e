/**
 * Scan a tracks file through DuckDB into typed columns, in file order, with each row's 1-based
 * position in the file. Structural problems (unreadable file, missing column, a value that is not a
 * number) throw InputError naming file, row, column and value.
 */
import type { DuckDBConnection } from "@duckdb/node-api";
import { InputError } from "../core/errors.js";
import { resolveColumns } from "./columns.js";
import type { ColumnMapping, ResolvedColumns, TrackColumn } from "./columns.js";
import { readCsvHeader } from "./csvHeader.js";
import { duckdbMessage, fetchDoubles, fetchRows, sqlIdent, sqlString, withDuckDB } from "./duckdb.js";
import { countLines } from "./countLines.js";
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
  /** Soft problems of the layout (unused or duplicate columns). */
  warnings: string[];
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
    const warnings: string[] = [];
    const what = format === "csv" ? "CSV" : "Parquet";
    let source: string;
    const types = new Map<string, string>();
    let fileColumns: string[];
    // Counted in parallel with the scan (CSV: newlines in the bytes, read by us; Parquet: the footer's
    // row count), to prove afterwards that the scan read every row.
    let expected: Promise<number>;
    if (format === "csv") {
      const header = await readCsvHeader(file, /\.tsv$/i.test(file));
      const seen = new Map<string, number>();
      const duckNames: string[] = [];
      const dups: string[] = [];
      header.names.forEach((n, i) => {
        const name = n === "" ? `(unnamed column ${i + 1})` : n;
        const k = seen.get(name) ?? 0;
        seen.set(name, k + 1);
        if (k > 0) dups.push(name);
        // DuckDB needs unique names; a duplicate gets a suffix and is never matched to our columns.
        duckNames.push(k > 0 ? `${name} (duplicate ${k + 1})` : name);
      });
      if (dups.length > 0)
        warnings.push(`duplicate column${dups.length > 1 ? "s" : ""} ${[...new Set(dups)].map((d) => JSON.stringify(d)).join(", ")} in the header: the first of each is used, the others are ignored`);
      const cols = `{${duckNames.map((n) => `${sqlString(n)}: 'VARCHAR'`).join(", ")}}`;
      source = `read_csv(${sqlString(file)}, header = true, auto_detect = false, delim = ${sqlString(header.delimiter)}, quote = '"', escape = '"', columns = ${cols})`;
      for (const n of duckNames) types.set(n, "VARCHAR");
      fileColumns = duckNames.filter((n) => !/ \(duplicate \d+\)$/.test(n));
      expected = countLines(file).then((l) => Math.max(0, l - 1));
    } else {
      source = `read_parquet(${sqlString(file)}, file_row_number = true)`;
      let described: Array<Record<string, unknown>>;
      try {
        described = await fetchRows(c, `DESCRIBE SELECT * FROM ${source}`);
      } catch (e) {
        throw new InputError(`cannot read as ${what}: ${duckdbMessage(e)}`, { file });
      }
      for (const r of described) types.set(String(r.column_name), String(r.column_type));
      fileColumns = [...types.keys()].filter((n) => n !== "file_row_number");
      expected = fetchRows(c, `SELECT CAST(sum(num_rows) AS DOUBLE) AS n FROM parquet_file_metadata(${sqlString(file)})`).then((r) => Number(r[0]?.n ?? 0));
    }
    expected.catch(() => {}); // awaited below
    const names = resolveColumns(fileColumns, mapping, file);
    const used = new Set(Object.values(names));
    const unused = fileColumns.filter((n) => !used.has(n));
    if (unused.length > 0)
      warnings.push(`column${unused.length > 1 ? "s" : ""} not used: ${unused.map((n) => JSON.stringify(n)).join(", ")} (not one of ${NUMERIC.join(", ")}, kind; map one with mapping if it is meant)`);

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
      throw readError(e, file, format, await stoppedAt(c, file, format, sql, source, undefined, await expected.catch(() => NaN)));
    }
    // A streamed result ends early, without an error, when DuckDB stops on a malformed line or a
    // corrupted page (node-api's stream cannot report it). So the count is checked against the
    // source; on any difference the same query runs materialized, which does throw DuckDB's error.
    const want = await expected;
    if (data.rows !== want) {
      let again: number;
      try {
        again = Number((await c.run(sql)).rowCount);
      } catch (e) {
        throw readError(e, file, format, await stoppedAt(c, file, format, sql, source, data.rows, want));
      }
      // CSV: blank lines and quoted line breaks make our newline count differ from the row count;
      // a complete materialized read that agrees with the stream settles it.
      if (again !== data.rows || format === "parquet")
        throw new InputError(`read ${data.rows} rows, but the file holds ${format === "csv" ? `${want} lines after the header` : `${want} rows (footer)`} and a second read gave ${again}; refusing to go on with part of the data`, { file });
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
    // Track ids must be exact: above 2^53 a double cannot tell neighbouring integers apart, so two
    // vehicles would silently become one.
    const ids = columns.track_id!;
    for (let i = 0; i < data.rows; i++)
      if (Math.abs(ids[i]!) > Number.MAX_SAFE_INTEGER) {
        const value = await rawValue(c, source, format, names.track_id!, row[i]!);
        throw new InputError(
          `track id is larger than 2^53 - 1 = ${Number.MAX_SAFE_INTEGER} and cannot be held exactly; different vehicles would merge. Renumber the tracks (e.g. dense_rank() over the ids)`,
          { file, row: row[i], column: names.track_id, value },
        );
      }
    return { file, rows: data.rows, row, columns, empty, names, unrecognisedKinds, warnings };
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

/**
 * A DuckDB read error as an InputError with the place: CSV errors carry their line ("CSV Error on
 * Line: N", 1-based, the header is line 1, so data row N - 1); Parquet errors get the row group the
 * scan stopped in.
 */
function readError(e: unknown, file: string, format: TracksFormat, where = ""): InputError {
  const full = e instanceof Error ? e.message : String(e);
  const first = duckdbMessage(e).replace(/^Invalid Input Error: /, "");
  if (format === "csv") {
    const line = /CSV Error on Line: (\d+)/.exec(full);
    const cols = /Expected Number of Columns: (\d+) Found: (\d+)/.exec(full);
    const original = /Original Line: (.*)/.exec(full)?.[1];
    if (line) {
      const n = Number(line[1]);
      let problem: string;
      if (cols) {
        const more = Number(cols[2]) > Number(cols[1]);
        problem = `line ${n} has ${cols[2]} fields, the header ${cols[1]}${more ? " (an extra field, or a decimal comma such as \"12,5\" in a comma-separated file: write 12.5)" : " (a field is missing)"}`;
      } else if (/unicode|UTF-8|utf8/i.test(full)) problem = `line ${n} is not valid UTF-8 text (save the file as UTF-8)`;
      else problem = `line ${n} cannot be read: ${first.replace(/^CSV Error on Line: \d+\s*/, "")}`;
      return new InputError(`${problem}${original ? `; the line reads ${JSON.stringify(original.slice(0, 120))}` : ""}`, { file, row: n - 1 });
    }
    if (/unicode|UTF-8|utf8/i.test(full)) return new InputError(`the file is not valid UTF-8 text: ${first}${where}`, { file });
  }
  return new InputError(`cannot read as ${format === "csv" ? "CSV" : "Parquet"}: ${first}${where}`, { file });
}

/**
 * Where a read failed. CSV errors carry their own line. For Parquet, each row group (from the
 * footer) is read again on its own, with the same columns, until one fails: that row group is named
 * (a failure DuckDB reports from one of its threads says nothing about where it was).
 */
async function stoppedAt(
  c: DuckDBConnection,
  file: string,
  format: TracksFormat,
  sql: string,
  source: string,
  rows: number | undefined,
  want: number,
): Promise<string> {
  const read = rows === undefined ? "" : `; the scan stopped after ${rows} of ${want} ${format === "csv" ? "data " : ""}rows`;
  if (format === "csv") return read;
  let groups: Array<Record<string, unknown>>;
  try {
    groups = await fetchRows(
      c,
      `SELECT row_group_id AS g, CAST(any_value(row_group_num_rows) AS DOUBLE) AS n FROM parquet_metadata(${sqlString(file)}) GROUP BY row_group_id ORDER BY row_group_id`,
    );
  } catch {
    return read; // the footer itself is unreadable: say what we know
  }
  const select = sql.slice(0, sql.lastIndexOf(` FROM ${source}`));
  let start = 0;
  for (const gr of groups) {
    const n = Number(gr.n);
    try {
      await c.run(`${select} FROM ${source} WHERE file_row_number >= ${start} AND file_row_number < ${start + n}`);
    } catch {
      return `${read}; row group ${Number(gr.g)} of ${groups.length} (rows ${start + 1}–${start + n}) cannot be read`;
    }
    start += n;
  }
  return read;
}
