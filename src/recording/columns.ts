import { InputError } from "../core/errors.js";

/**
 * The columns of our long tracks table, one row per object per frame. Required: track_id, x, y and
 * either t (s) or frame (with a frame rate). The rest are optional.
 */
export const TRACK_COLUMNS = [
  "track_id",
  "t",
  "frame",
  "x",
  "y",
  "vx",
  "vy",
  "ax",
  "ay",
  "lane",
  "length",
  "width",
  "kind",
] as const;

export type TrackColumn = (typeof TRACK_COLUMNS)[number];

/** Our column name → the column name in the user's file, for files that name things differently. */
export type ColumnMapping = Partial<Record<TrackColumn, string>>;

/** Our column → the file's column that provides it (only the ones present). */
export type ResolvedColumns = Partial<Record<TrackColumn, string>>;

/**
 * Match our columns to the file's columns. A column is looked up by its mapped name (or our name),
 * exactly first, then case-insensitively when that is unambiguous. A mapping entry that points at a
 * column the file does not have is an error even for optional columns (the user asked for it).
 */
export function resolveColumns(fileColumns: string[], mapping: ColumnMapping | undefined, file: string): ResolvedColumns {
  const known = new Set<string>(TRACK_COLUMNS);
  for (const key of Object.keys(mapping ?? {}))
    if (!known.has(key))
      throw new InputError(`mapping key "${key}" is not one of our columns; expected one of ${TRACK_COLUMNS.join(", ")}`, { file });
  const there = `the file has columns: ${fileColumns.map((c) => JSON.stringify(c)).join(", ")}`;
  const out: ResolvedColumns = {};
  for (const col of TRACK_COLUMNS) {
    const mapped = mapping?.[col];
    if (mapped !== undefined && typeof mapped !== "string")
      throw new InputError(`mapping.${col}=${JSON.stringify(mapped)} should be a column name (string)`, { file });
    const wanted = mapped ?? col;
    const found = findColumn(fileColumns, wanted);
    if (found === "ambiguous")
      throw new InputError(`column "${wanted}" matches several columns when case is ignored; map it exactly (${there})`, {
        file,
        column: wanted,
      });
    if (found !== undefined) out[col] = found;
    else if (mapped !== undefined)
      throw new InputError(`mapping.${col} names column "${mapped}", which the file does not have; ${there}`, { file, column: mapped });
  }
  const missing: string[] = [];
  for (const col of ["track_id", "x", "y"] as const) if (out[col] === undefined) missing.push(col);
  if (out.t === undefined && out.frame === undefined) missing.push("t (or frame)");
  if (missing.length > 0) {
    const names = missing.map((c) => `"${c}"`).join(", ");
    throw new InputError(
      `missing required column${missing.length > 1 ? "s" : ""} ${names}; ${there}. Give a mapping such as { mapping: { x: "<their column>" } }`,
      { file, column: missing[0] },
    );
  }
  return out;
}

function findColumn(fileColumns: string[], wanted: string): string | "ambiguous" | undefined {
  if (fileColumns.includes(wanted)) return wanted;
  const lower = wanted.toLowerCase();
  const hits = fileColumns.filter((c) => c.toLowerCase() === lower);
  if (hits.length > 1) return "ambiguous";
  return hits[0];
}
