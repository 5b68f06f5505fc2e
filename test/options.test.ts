/**
 * Every option a user can read about exists, and every option that exists is documented: the
 * flags in `roadsieve plan --help` against the CLI's parser and the pipeline options they set, and
 * the "## Options" tables of the module documents against each stage's resolved options.
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import { PIPELINE_CLI_OPTIONS, PIPELINE_HELP, pipelineOptions } from "../src/cli/commands/plan.js";
import { RECORDING_HELP, RECORDING_OPTIONS } from "../src/cli/recordingOptions.js";
import { DEFAULTS } from "../src/core/defaults.js";
import { resolveExposureOptions } from "../src/exposure/describeExposure.js";
import { resolveManeuverOptions } from "../src/maneuvers/options.js";
import { PIPELINE_DEFAULTS, resolvePipelineOptions } from "../src/pipeline/options.js";
import { resolveTestPlanOptions } from "../src/plan/options.js";
import { resolveScenarioOptions } from "../src/scenario/options.js";
import { resolveSceneOptions } from "../src/scene/options.js";

/** The --flags a help text names. */
const helpFlags = (help: string): string[] => [...help.matchAll(/^\s+--([a-z][a-z0-9-]*)/gm)].map((m) => m[1]!).sort();

/** Backticked names in the first column of the "## Options" table of a module document. */
function documentedOptions(doc: string): string[] {
  const text = readFileSync(new URL(`../docs/${doc}`, import.meta.url), "utf8");
  const start = text.search(/^## Options/m);
  expect(start, `${doc} has an "## Options" section`).toBeGreaterThanOrEqual(0);
  const rest = text.slice(start + 3);
  const end = rest.search(/^## /m);
  const section = end >= 0 ? rest.slice(0, end) : rest;
  const names: string[] = [];
  for (const line of section.split("\n")) {
    if (!line.startsWith("| `")) continue;
    for (const m of line.split("|")[1]!.matchAll(/`([A-Za-z][A-Za-z0-9]*)`/g)) names.push(m[1]!);
  }
  return names.sort();
}

// CLI flags that choose what is written or shown, not how the plan is computed (writeOutputs and the display take them).
const OUTPUT_FLAGS = ["out", "no-catalogue", "parquet", "openscenario", "quiet"];

// One value per pipeline flag, valid for its parser.
const SAMPLE: Record<string, string | boolean> = {
  seed: "9",
  k: "5",
  "k-range": "3..7",
  budget: "20",
  "target-share": "0.8",
  window: "8",
  "event-windows": "4..20",
  map: "pca",
  weight: "hours",
  eps: "0.5",
  "min-pts": "6",
  "no-dbscan": true,
  critical: "per-type",
  rare: "noise",
  classes: "following,cut-in",
  "max-k-per-class": "3",
  "min-share": "0.05",
  importance: "1",
};

describe("roadsieve plan --help against the options that exist", () => {
  it("names every flag the parser accepts, and accepts every flag it names", () => {
    const parsed = [...Object.keys(PIPELINE_CLI_OPTIONS), ...Object.keys(RECORDING_OPTIONS)].sort();
    expect(helpFlags(`${RECORDING_HELP}\n${PIPELINE_HELP}`)).toEqual(parsed);
  });

  it("every pipeline flag changes the resolved pipeline options; every output flag is declared as one", () => {
    const base = JSON.stringify(resolvePipelineOptions(pipelineOptions({})));
    for (const flag of Object.keys(PIPELINE_CLI_OPTIONS)) {
      if (OUTPUT_FLAGS.includes(flag)) continue;
      expect(SAMPLE[flag], `a sample value for --${flag}`).toBeDefined();
      const changed = JSON.stringify(resolvePipelineOptions(pipelineOptions({ [flag]: SAMPLE[flag] } as never)));
      expect(changed, `--${flag} reaches the resolved options`).not.toBe(base);
    }
    for (const f of OUTPUT_FLAGS) expect(Object.keys(PIPELINE_CLI_OPTIONS)).toContain(f);
  });

  it("states the defaults the pipeline resolves to", () => {
    const o = resolvePipelineOptions();
    expect(PIPELINE_HELP).toContain(`(default: ${o.seed})`);
    expect(PIPELINE_HELP).toContain(`(default: ${o.kRange[0]}..${o.kRange[1]})`);
    expect(PIPELINE_HELP).toMatch(new RegExp(`--map M .*\\(default: ${o.map}\\)`));
    expect(PIPELINE_HELP).toMatch(new RegExp(`--weight W .*\\(default: ${o.weightBy}\\)`));
  });
});

describe("module documents against the resolved options", () => {
  const cases: [string, string[]][] = [
    ["scene.md", Object.keys(resolveSceneOptions({}, 25))],
    ["maneuvers.md", Object.keys(resolveManeuverOptions({ laneMarkings: [0, 3.5, 7] }))],
    ["plan.md", Object.keys(resolveTestPlanOptions())],
    ["exposure.md", Object.keys(resolveExposureOptions({ drivesPerYear: 400, typicalDriveKm: 20 }))],
    ["scenario-tensor.md", Object.keys(resolveScenarioOptions())],
  ];
  for (const [doc, resolved] of cases)
    it(`${doc} documents exactly the options its stage resolves`, () => {
      expect(documentedOptions(doc)).toEqual([...resolved].sort());
    });
});

describe("one table of defaults", () => {
  it("the pipeline's defaults are the shared table's", () => {
    expect(PIPELINE_DEFAULTS.seed).toBe(DEFAULTS.seed);
    expect(PIPELINE_DEFAULTS.nInit).toBe(DEFAULTS.nInit);
    expect(PIPELINE_DEFAULTS.kRange).toEqual([...DEFAULTS.kRange]);
    expect(PIPELINE_DEFAULTS.map).toBe(DEFAULTS.map);
    expect(resolveExposureOptions().confidence).toBe(DEFAULTS.confidence);
  });
});
