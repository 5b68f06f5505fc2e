import { writeFileAtomic } from "../core/io.js";
import type { PipelineResult } from "../pipeline/planCatalogue.js";
import { buildReport, type BuildReportOptions } from "./buildReport.js";
import { renderHtml } from "./html.js";

/**
 * Write the self-contained HTML report of a run to `path` (atomically; same result, same bytes).
 * The same page as writeOutputs' report.html, for scripts and notebooks that want only the report.
 */
export async function writeReport(result: PipelineResult, path: string, options: string | BuildReportOptions = {}): Promise<string> {
  await writeFileAtomic(path, renderHtml(buildReport(result, options)));
  return path;
}
