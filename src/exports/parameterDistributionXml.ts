import { OPENSCENARIO_REV } from "./concreteScenarioXml.js";
import type { LogicalScenarioLike, TestCaseLike } from "./logicalScenarioShape.js";
import { ABSENT_GAP, TEMPLATE_INPUTS, parameterName } from "./logicalTemplateXml.js";
import { xmlEscape as esc, xmlNumber as num } from "./xmlText.js";

function header(description: string, date: string): string[] {
  return [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<OpenSCENARIO>`,
    `  <FileHeader author="roadsieve" date="${esc(date)}" description="${esc(description)}" revMajor="${OPENSCENARIO_REV.major}" revMinor="${OPENSCENARIO_REV.minor}"/>`,
    `  <ParameterValueDistribution>`,
  ];
}

function inputsOf(ls: LogicalScenarioLike): { input: string; name: string }[] {
  return (TEMPLATE_INPUTS[ls.classId] ?? []).map((input) => {
    const p = ls.parameters.find((q) => q.name === input);
    return { input, name: parameterName(input, p?.unit ?? defaultUnit(input)) };
  });
}

function defaultUnit(input: string): string {
  if (/Speed$/.test(input)) return "m/s";
  if (/Decel$/.test(input)) return "m/s²";
  if (/Duration$/.test(input)) return "s";
  return "m";
}

/**
 * The plan's concrete test cases of one logical scenario as deterministic value sets (ASAM
 * OpenSCENARIO 1.2 ParameterValueDistribution / Deterministic / ValueSetDistribution): each set is one
 * test case's values together, so the dependence between the parameters is kept. A value the test
 * case does not have (null) is left out of its set, so the template's default applies; a null gap to
 * a target-lane vehicle means "none" and is written as ABSENT_GAP.
 */
export function variationsXml(ls: LogicalScenarioLike, testCases: readonly TestCaseLike[], templateFile: string, date = "1970-01-01T00:00:00"): { xml: string; sets: number } {
  const inputs = inputsOf(ls);
  const mine = testCases.filter((tc) => tc.logicalScenario === ls.id);
  const lines = [...header(`${ls.id}: the plan's ${mine.length} concrete test cases as value sets`, date), `    <ScenarioFile filepath="${esc(templateFile)}"/>`, `    <Deterministic>`, `      <DeterministicMultiParameterDistribution>`, `        <ValueSetDistribution>`];
  let sets = 0;
  for (const tc of mine) {
    const assigns: string[] = [];
    for (const { input, name } of inputs) {
      let v = tc.values[input];
      if ((v === null || v === undefined) && /Gap(Ahead|Behind)$/.test(input)) v = ABSENT_GAP;
      if (v === null || v === undefined || !Number.isFinite(v)) continue;
      assigns.push(`            <ParameterAssignment parameterRef="${esc(name)}" value="${num(v, 6)}"/>`);
    }
    if (ls.classId === "cut-in" && typeof tc.values.cutterRelSpeed === "number")
      assigns.push(`            <ParameterAssignment parameterRef="cutInTriggerRule" value="${tc.values.cutterRelSpeed < 0 ? "lessOrEqual" : "greaterOrEqual"}"/>`);
    if (assigns.length === 0) continue;
    lines.push(`          <ParameterValueSet>`, ...assigns, `          </ParameterValueSet>`);
    sets++;
  }
  if (sets === 0) lines.push(`          <ParameterValueSet>`, `            <ParameterAssignment parameterRef="${esc(inputs[0]!.name)}" value="${num(ls.representative.values[inputs[0]!.input] ?? ls.parameters[0]?.p50 ?? 0, 6)}"/>`, `          </ParameterValueSet>`);
  lines.push(`        </ValueSetDistribution>`, `      </DeterministicMultiParameterDistribution>`, `    </Deterministic>`, `  </ParameterValueDistribution>`, `</OpenSCENARIO>`);
  return { xml: `${lines.join("\n")}\n`, sets: Math.max(1, sets) };
}

/**
 * The fitted marginals as stochastic distributions (Stochastic / StochasticDistribution / Histogram,
 * one bin per histogram bin with its weight). OpenSCENARIO 1.2 draws the parameters of a Stochastic
 * distribution independently, so the dependence (the plan's Gaussian copula) is not carried here; the
 * value sets of {@link variationsXml} keep it.
 */
export function marginalsXml(ls: LogicalScenarioLike, templateFile: string, options: { runs?: number; seed?: number; date?: string } = {}): { xml: string; parameters: string[] } {
  const inputs = inputsOf(ls);
  const lines = [...header(`${ls.id}: fitted marginal distributions of the template's parameters (independent draws)`, options.date ?? "1970-01-01T00:00:00"), `    <ScenarioFile filepath="${esc(templateFile)}"/>`, `    <Stochastic numberOfTestRuns="${options.runs ?? 100}" randomSeed="${options.seed ?? 1}">`];
  const written: string[] = [];
  for (const { input, name } of inputs) {
    const p = ls.parameters.find((q) => q.name === input);
    if (!p || p.histogram.weights.length === 0) continue;
    const total = p.histogram.weights.reduce((a, b) => a + b, 0);
    if (!(total > 0)) continue;
    lines.push(`      <StochasticDistribution parameterName="${esc(name)}">`, `        <Histogram>`);
    p.histogram.weights.forEach((w, i) => {
      lines.push(`          <Bin weight="${num(w / total, 6)}">`, `            <Range lowerLimit="${num(p.histogram.edges[i]!, 6)}" upperLimit="${num(p.histogram.edges[i + 1]!, 6)}"/>`, `          </Bin>`);
    });
    lines.push(`        </Histogram>`, `      </StochasticDistribution>`);
    written.push(name);
  }
  if (written.length === 0) {
    // A Stochastic element needs one distribution: the ego speed range as a uniform-weight bin.
    const p = ls.parameters.find((q) => q.name === "egoSpeed");
    const lo = p?.min ?? 20;
    const hi = p && p.max > lo ? p.max : lo + 1;
    lines.push(`      <StochasticDistribution parameterName="${esc(inputs[0]!.name)}">`, `        <Histogram>`, `          <Bin weight="1">`, `            <Range lowerLimit="${num(lo, 6)}" upperLimit="${num(hi, 6)}"/>`, `          </Bin>`, `        </Histogram>`, `      </StochasticDistribution>`);
    written.push(inputs[0]!.name);
  }
  lines.push(`    </Stochastic>`, `  </ParameterValueDistribution>`, `</OpenSCENARIO>`);
  return { xml: `${lines.join("\n")}\n`, parameters: written };
}
