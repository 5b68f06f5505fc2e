/** The catalogue database (DuckDB): writing it, querying it with SQL. */
export { writeCatalogue } from "./writeCatalogue.js";
export { catalogueTables, sqlName, conditionColumn } from "./catalogueTables.js";
export { queryCatalogue } from "./queryCatalogue.js";
export type { CatalogueValue } from "./queryCatalogue.js";
export type { Table, TableColumn, ColumnType } from "./table.js";
export { breakdown } from "./breakdown.js";
export type { Breakdown, BreakdownBy, BreakdownGroup, BreakdownRow, BreakdownCategory } from "./breakdown.js";
export { scenarioCategories } from "./scenarioCategories.js";
export type { CategoryKind, CategorisedScenario } from "./scenarioCategories.js";
