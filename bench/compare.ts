/**
 * Size and power of the catalogue comparison on generated recordings.
 *
 *   npm run bench -- compare [--pairs 20] [--vkm 30] [--flow 800] [--flow-b 1600] [--permutations 199] [--categories class|type-key]
 *
 * For each of --pairs seeded pairs: two recordings with the same generator settings and different
 * seeds (the null), and two with a planted change (flow per lane --flow vs --flow-b, the rest the
 * same). Counts how often each test rejects at 5 %: the asymptotic chi-square and G-test on the
 * category table, the chi-square by permutation of drives, and the energy-distance test on the
 * features (permutation of drives). Prints a readable log and, as the last line, one JSON object.
 */
import { compareCatalogues } from "../src/compare/compareCatalogues.js";
import { generatedSample } from "../test/compare-fixtures.js";

function arg(args: string[], name: string): string | undefined {
  const i = args.indexOf(name);
  return i >= 0 ? args[i + 1] : undefined;
}

export async function run(args: string[]): Promise<void> {
  const pairs = Number(arg(args, "--pairs") ?? 20);
  const vkm = Number(arg(args, "--vkm") ?? 30);
  const flow = Number(arg(args, "--flow") ?? 800);
  const flowB = Number(arg(args, "--flow-b") ?? 1600);
  const permutations = Number(arg(args, "--permutations") ?? 199);
  const categories = arg(args, "--categories") === "type-key" ? "type key" : "class";
  const t0 = performance.now();
  const study = (label: string, fb: number) => {
    const rejected = { chiSquare: 0, gTest: 0, drivePermutation: 0, energy: 0 };
    for (let k = 0; k < pairs; k++) {
      const a = generatedSample({ vehicleKm: vkm, flowPerLane: flow }, 1000 + 2 * k, "a", categories);
      const b = generatedSample({ vehicleKm: vkm, flowPerLane: fb }, 1001 + 2 * k, "b", categories);
      const c = compareCatalogues(a, b, { permutations, bootstrap: 99, seed: k });
      const f = c.frequency;
      if (f.chiSquare.p < 0.05) rejected.chiSquare++;
      if (f.gTest.p < 0.05) rejected.gTest++;
      if (f.permutation.p < 0.05) rejected.drivePermutation++;
      if (c.embedding!.p < 0.05) rejected.energy++;
      console.log(
        `${label} pair ${k}: ${a.categories.length} + ${b.categories.length} scenarios, ${f.categories.length} columns; p chi2 ${f.chiSquare.p.toFixed(3)}, G ${f.gTest.p.toFixed(3)}, drives ${f.permutation.p.toFixed(3)}, energy ${c.embedding!.p.toFixed(3)}`,
      );
    }
    return rejected;
  };
  const same = study("same settings", flow);
  const changed = study(`flow ${flow} vs ${flowB}`, flowB);
  const seconds = (performance.now() - t0) / 1000;
  console.log(`rejections at 5 % of ${pairs} pairs, same settings: ${JSON.stringify(same)}; planted change: ${JSON.stringify(changed)}; ${seconds.toFixed(0)} s`);
  console.log(JSON.stringify({ pairs, vkm, flow, flowB, permutations, categories, same, changed, seconds }));
}
