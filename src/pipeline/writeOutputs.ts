import { join } from "node:path";
import { writeFileAtomic } from "../core/io.js";
import type { Progress } from "../core/progress.js";
import { catalogueTables } from "../catalogue/catalogueTables.js";
import { writeCatalogue } from "../catalogue/writeCatalogue.js";
import { writePlan } from "../plan/writePlan.js";
import { saveClusteringModel } from "../cluster/clusteringModel.js";
import { buildReport } from "../report/buildReport.js";
import { renderHtml } from "../report/html.js";
import type { PipelineResult } from "./runPipeline.js";
import { writeOpenScenarioFiles } from "../plan/openScenario.js";
import type { Recording } from "../recording/types.js";

export interface WriteOutputsOptions {
  /** Write catalogue.duckdb (default true). */
  catalogue?: boolean;
  /** Also export every catalogue table to DIR/catalogue/<table>.parquet (default false). */
  parquet?: boolean;
  /**
   * Also write one ASAM OpenSCENARIO 1.x file per test case into DIR/openscenario/, from these
   * recordings (the ones the pipeline ran on). Default: not written.
   */
  openScenario?: readonly Recording[];
  title?: string;
  progress?: Progress;
}

/**
 * Write a run's outputs into `dir`: plan.json, plan.csv, model.json (the fitted clustering), report.html and (by default) the catalogue
 * database (and OpenSCENARIO files on request). Returns the paths written and any warnings. Every file is written under a temporary name and renamed. Same result, same bytes.
 */
export async function writeOutputs(r: PipelineResult, dir: string, options: WriteOutputsOptions = {}): Promise<{ files: string[]; warnings: string[] }> {
  const written = await writePlan(r.plan, dir);
  // The fitted clustering stage beside the plan, so that `roadsieve assign` (assignScenarios) can put
  // the scenarios of new recordings into this plan's clusters. The per-class model of the logical
  // scenarios is in the same file under its `logical` key (logicalModelFromJSON reads it).
  const modelPath = join(dir, "model.json");
  await saveClusteringModel(r.model, modelPath);
  written.push(modelPath);
  const warnings: string[] = [];
  options.progress?.({ stage: "report", done: 0, total: 1 });
  const html = renderHtml(buildReport(r, options.title));
  const reportPath = join(dir, "report.html");
  await writeFileAtomic(reportPath, html);
  written.push(reportPath);
  options.progress?.({ stage: "report", done: 1, total: 1 });
  if (options.openScenario) {
    const byId = new Map(options.openScenario.map((rec) => [rec.id, rec.tracks]));
    const osc = await writeOpenScenarioFiles(r.plan.exploration, r.scenarios.scenarios, (id) => {
      const tracks = byId.get(id);
      if (!tracks) throw new RangeError(`recording "${id}" was not passed to writeOutputs; pass the recordings the pipeline ran on`);
      return tracks;
    }, join(dir, "openscenario"));
    written.push(...osc.paths);
    warnings.push(...osc.warnings.map((w) => `OpenSCENARIO ${w}`));
  }
  if (options.catalogue !== false) {
    const files = await writeCatalogue(join(dir, "catalogue.duckdb"), catalogueTables(r), {
      parquetDir: options.parquet ? join(dir, "catalogue") : undefined,
      progress: options.progress,
    });
    written.push(...files);
  }
  return { files: written, warnings };
}
