/** A column-oriented table ready to be stored in the catalogue database. */
export type ColumnType = "INTEGER" | "BIGINT" | "DOUBLE" | "VARCHAR" | "BOOLEAN";

export interface TableColumn {
  name: string;
  type: ColumnType;
  /** One value per row; null for SQL NULL. */
  values: ArrayLike<number | string | boolean | null>;
}

export interface Table {
  name: string;
  columns: TableColumn[];
}

/** Check that all columns have the same number of rows and names are unique SQL identifiers. */
export function tableRows(t: Table): number {
  const n = t.columns.length > 0 ? t.columns[0]!.values.length : 0;
  const seen = new Set<string>();
  for (const c of t.columns) {
    if (c.values.length !== n) throw new RangeError(`table ${t.name}: column ${c.name} has ${c.values.length} rows, expected ${n}`);
    if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(c.name)) throw new RangeError(`table ${t.name}: column name "${c.name}" is not a plain SQL identifier`);
    if (seen.has(c.name)) throw new RangeError(`table ${t.name}: duplicate column "${c.name}"`);
    seen.add(c.name);
  }
  return n;
}
