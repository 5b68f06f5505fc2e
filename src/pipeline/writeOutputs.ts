import { join } from "node:path";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import { openOutputFolder, outputStep } from "../core/outputFolder.js";
import type { Manifest, ManifestInput } from "../core/outputFolder.js";
import type { Progress } from "../core/progress.js";
import { catalogueTables } from "../catalogue/catalogueTables.js";
import { writeCatalogue } from "../catalogue/writeCatalogue.js";
import { writePlan } from "../plan/writePlan.js";
import { saveClusteringModel } from "../cluster/clusteringModel.js";
import { buildReport } from "../report/buildReport.js";
import { renderHtml } from "../report/html.js";
import type { PipelineResult } from "./runPipeline.js";
import { scenarioExportFiles, writeExportFiles } from "../exports/writeScenarioExports.js";
import type { Recording } from "../recording/types.js";

export interface WriteOutputsOptions {
  /** Write catalogue.duckdb (default true). */
  catalogue?: boolean;
  /** Also export every catalogue table to DIR/catalogue/<table>.parquet (default false). */
  parquet?: boolean;
  /**
   * Also write one ASAM OpenSCENARIO 1.2 file per test case and one ASAM OpenDRIVE 1.6 road per
   * recording into DIR/openscenario/, from these
   * recordings (the ones the pipeline ran on). Default: not written.
   */
  openScenario?: readonly Recording[];
  title?: string;
  progress?: Progress;
}

/**
 * Write a run's outputs into `dir`: plan.json, plan.csv, model.json (the fitted clustering),
 * report.html and (by default) the catalogue database (and OpenSCENARIO files on request). Returns
 * the paths written and any warnings. Every file is written under a temporary name and renamed. Same
 * result, same bytes. To replace a folder as a whole (never a mix of two runs), write into
 * `openOutputFolder(out).dir` and `commit` it, as {@link writeOutputFolder} does.
 */
export async function writeOutputs(r: PipelineResult, dir: string, options: WriteOutputsOptions = {}): Promise<{ files: string[]; warnings: string[] }> {
  await outputStep("plan");
  const written = await writePlan(r.plan, dir);
  // The fitted clustering stage beside the plan, so that `roadsieve assign` (assignScenarios) can put
  // the scenarios of new recordings into this plan's clusters. The per-class model of the logical
  // scenarios is in the same file under its `logical` key (logicalModelFromJSON reads it).
  await outputStep("model");
  const modelPath = join(dir, "model.json");
  await saveClusteringModel(r.model, modelPath);
  written.push(modelPath);
  await outputStep("report");
  const warnings: string[] = [];
  options.progress?.({ stage: "report", done: 0, total: 1 });
  const html = renderHtml(buildReport(r, options.title));
  const reportPath = join(dir, "report.html");
  await writeFileAtomic(reportPath, html);
  written.push(reportPath);
  options.progress?.({ stage: "report", done: 1, total: 1 });
  if (options.openScenario) {
    await outputStep("openscenario");
    // Every text is built before the first file is written, so bad input leaves nothing half-exported.
    const osc = scenarioExportFiles(r.plan, r.scenarios.scenarios, options.openScenario);
    written.push(...(await writeExportFiles(osc.files, join(dir, "openscenario"))));
    warnings.push(...osc.warnings.map((w) => `OpenSCENARIO ${w}`));
  }
  if (options.catalogue !== false) {
    await outputStep("catalogue");
    const files = await writeCatalogue(join(dir, "catalogue.duckdb"), catalogueTables(r), {
      parquetDir: options.parquet ? join(dir, "catalogue") : undefined,
      progress: options.progress,
    });
    written.push(...files);
  }
  return { files: written, warnings };
}

/**
 * Write a run's outputs into `out` as a whole: into a staging folder beside it, then one swap, with
 * manifest.json (files, sizes, SHA-256, tool version, inputs) written last. A second run into the
 * same folder at the same time is refused (InputError naming the other run's pid).
 */
export async function writeOutputFolder(
  r: PipelineResult,
  out: string,
  inputs: readonly ManifestInput[],
  options: WriteOutputsOptions = {},
): Promise<{ files: string[]; warnings: string[]; manifest: Manifest }> {
  const folder = await openOutputFolder(out);
  try {
    const written = await writeOutputs(r, folder.dir, options);
    const manifest = await folder.commit(inputs);
    return { files: [...manifest.files.map((f) => join(folder.out, f.path)), join(folder.out, "manifest.json")], warnings: [...folder.warnings, ...written.warnings], manifest };
  } catch (e) {
    await folder.abort();
    throw e;
  }
}
