import { rename, rm } from "node:fs/promises";
import { basename, dirname, join } from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import { duckdbMessage, sqlString, withDuckDB } from "./duckdb.js";
import type { Recording } from "./types.js";

/** Columns written by {@link writeTracks}, in order, with their Parquet types. */
const OUT_COLUMNS: ReadonlyArray<[string, string]> = [
  ["track_id", "BIGINT"],
  ["t", "DOUBLE"],
  ["x", "DOUBLE"],
  ["y", "DOUBLE"],
  ["vx", "DOUBLE"],
  ["vy", "DOUBLE"],
  ["ax", "DOUBLE"],
  ["ay", "DOUBLE"],
  ["lane", "INTEGER"],
  ["length", "DOUBLE"],
  ["width", "DOUBLE"],
  ["kind", "VARCHAR"],
];

/**
 * Write a recording's tracks in our own long format (road frame, SI units, one row per track and
 * sample, tracks in the recording's order): CSV with a header, or Parquet. Numbers are written with
 * JavaScript's shortest round-trip representation, so reading the file back gives identical values.
 * The file is written under a temporary name and renamed.
 */
export async function writeTracks(recording: Recording, path: string, format: "csv" | "parquet"): Promise<void> {
  if (format !== "csv" && format !== "parquet") throw new InputError(`format=${JSON.stringify(format)} should be "csv" or "parquet"`);
  const csv = tracksCsv(recording);
  if (format === "csv") {
    await writeFileAtomic(path, csv);
    return;
  }
  const stamp = `${process.pid}.${Date.now().toString(36)}`;
  const tmpCsv = join(dirname(path), `.${basename(path)}.${stamp}.csv.tmp`);
  const tmpParquet = join(dirname(path), `.${basename(path)}.${stamp}.parquet.tmp`);
  try {
    await writeFileAtomic(tmpCsv, csv);
    const columns = `{${OUT_COLUMNS.map(([n, t]) => `${sqlString(n)}: ${sqlString(t)}`).join(", ")}}`;
    await withDuckDB(async (c) => {
      try {
        await c.run(
          `COPY (SELECT * FROM read_csv(${sqlString(tmpCsv)}, header = true, columns = ${columns})) TO ${sqlString(tmpParquet)} (FORMAT parquet)`,
        );
      } catch (e) {
        throw new InputError(`cannot write Parquet: ${duckdbMessage(e)}`, { file: path });
      }
    });
    await rename(tmpParquet, path);
  } finally {
    await rm(tmpCsv, { force: true });
    await rm(tmpParquet, { force: true });
  }
}

/** The tracks as CSV text in our format. */
export function tracksCsv(recording: Recording): string {
  const parts: string[] = [OUT_COLUMNS.map(([n]) => n).join(",") + "\n"];
  for (const tr of recording.tracks) {
    const lines: string[] = [];
    const tail = `${tr.length},${tr.width},${tr.kind}`;
    for (let i = 0; i < tr.t.length; i++)
      lines.push(
        `${tr.id},${tr.t[i]},${tr.x[i]},${tr.y[i]},${tr.vx[i]},${tr.vy[i]},${tr.ax[i]},${tr.ay[i]},${tr.lane[i]},${tail}\n`,
      );
    parts.push(lines.join(""));
  }
  return parts.join("");
}
