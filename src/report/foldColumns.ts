import { cellText, type ReportTable } from "./html.js";

export interface FoldOptions {
  /** Column that names a row (kept, used to list the exceptions). Default 0. */
  idColumn?: number;
  /** Fold a column when its most common value fills at least this share of the rows. Default 0.8. */
  minShare?: number;
  /** … and at most this many rows differ (they are listed by name). Default 12. */
  maxExceptions?: number;
  /** Tables with fewer rows are left as they are. Default 6. */
  minRows?: number;
}

/**
 * Fold columns that repeat one value for most rows into one sentence above the table ("per 1000 km:
 * 2.86 [0.07, 15.93] for 212 of 218 rows; TC-0001: 1106.68 …"), so that the reader sees what
 * differs instead of 200 copies of the same figure. Columns that vary stay.
 */
export function foldRepeatedColumns(table: ReportTable, options: FoldOptions = {}): ReportTable {
  const idColumn = options.idColumn ?? 0;
  const minShare = options.minShare ?? 0.8;
  const maxExceptions = options.maxExceptions ?? 12;
  const minRows = options.minRows ?? 6;
  const n = table.rows.length;
  if (n < minRows) return table;
  const keep: number[] = [];
  const notes: string[] = [...(table.notes ?? [])];
  for (let c = 0; c < table.columns.length; c++) {
    if (c === idColumn) {
      keep.push(c);
      continue;
    }
    const counts = new Map<string, number>();
    for (const r of table.rows) {
      const v = cellText(r[c]!);
      counts.set(v, (counts.get(v) ?? 0) + 1);
    }
    let mode = "";
    let modeN = 0;
    for (const [v, k] of counts)
      if (k > modeN) {
        mode = v;
        modeN = k;
      }
    const others = n - modeN;
    if (modeN / n < minShare || others > maxExceptions) {
      keep.push(c);
      continue;
    }
    const name = table.columns[c]!;
    if (others === 0) notes.push(`${name}: ${mode === "" ? "(empty)" : mode} for all ${n} rows.`);
    else {
      const ex = table.rows.filter((r) => cellText(r[c]!) !== mode).map((r) => `${cellText(r[idColumn]!)}: ${cellText(r[c]!)}`);
      notes.push(`${name}: ${mode === "" ? "(empty)" : mode} for ${modeN} of ${n} rows; the others: ${ex.join("; ")}.`);
    }
  }
  if (keep.length === table.columns.length) return table;
  return { ...table, columns: keep.map((c) => table.columns[c]!), rows: table.rows.map((r) => keep.map((c) => r[c]!)), notes };
}
