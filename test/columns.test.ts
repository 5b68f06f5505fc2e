/**
 * One unit-suffix rule for output columns in plan.csv, the catalogue tables and their Parquet
 * exports: a physical quantity ends in its SI unit (_s, _m, _mps, _mps2); km / hours are named by
 * their unit; shares, counts, ids and codes have none.
 */
import { describe, expect, it } from "vitest";
import { catalogueTables } from "../src/catalogue/catalogueTables.js";
import { Rng } from "../src/core/rng.js";
import { runPipeline } from "../src/pipeline/runPipeline.js";
import { PLAN_CSV_COLUMNS } from "../src/plan/planCsv.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";

/** Words that name a physical quantity; a column containing one must end in a unit. */
const QUANTITY = /(^|_)(t|ttc|thw|drac|decel|accel|speed|duration|displacement|gap|cross|start|end|seconds)(_|$)/;
const UNIT = /_(s|m|mps|mps2)$|(^|_)(km|hours)$/;
const UNITLESS_OK = new Set(["lane_start", "lane_end", "window_index", "share", "time_share", "rate_per_1000km", "rate_lower", "rate_upper", "rate_level"]);

function offenders(names: readonly string[]): string[] {
  return names.filter((n) => !UNITLESS_OK.has(n) && QUANTITY.test(n) && !UNIT.test(n));
}

describe("output column names", () => {
  it("plan.csv follows the unit-suffix rule", () => {
    expect(offenders(PLAN_CSV_COLUMNS)).toEqual([]);
    expect(PLAN_CSV_COLUMNS).toContain("min_ttc_s");
  });

  it("the catalogue tables (and so their Parquet exports) follow the same rule, with the same names as plan.csv", () => {
    const traffic = generateTraffic({ vehicleKm: 10, recordingId: "columns-test" }, new Rng(3));
    const r = runPipeline([traffic.recording], { seed: 1, map: "pca", k: 3 });
    const tables = catalogueTables(r).filter((t) => t.name !== "features");
    for (const t of tables) expect(offenders(t.columns.map((c) => c.name)), t.name).toEqual([]);
    const scenarios = tables.find((t) => t.name === "scenarios")!.columns.map((c) => c.name);
    const cases = tables.find((t) => t.name === "test_cases")!.columns.map((c) => c.name);
    // The same quantity has the same column name everywhere.
    for (const n of ["min_ttc_s", "min_thw_s", "max_decel_mps2"]) {
      expect(PLAN_CSV_COLUMNS).toContain(n);
      expect(scenarios).toContain(n);
      expect(cases).toContain(n);
    }
    expect(scenarios).toContain("t_start_s");
    expect(PLAN_CSV_COLUMNS).toContain("t_start_s");
  });
});
