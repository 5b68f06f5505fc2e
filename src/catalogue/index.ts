/** The catalogue database (DuckDB): writing it, querying it with SQL. */
export { writeCatalogue } from "./writeCatalogue.js";
export { catalogueTables, sqlName } from "./catalogueTables.js";
export { queryCatalogue } from "./queryCatalogue.js";
export type { CatalogueValue } from "./queryCatalogue.js";
export type { Table, TableColumn, ColumnType } from "./table.js";
