import { readFileSync } from "node:fs";
import { fileURLToPath } from "node:url";
import type { Matrix } from "../../src/core/matrix.js";

/** scikit-learn's copy of Iris (load_iris; the UCI file differs in two rows), 150 × 4, plus species 0/1/2. */
export function loadIris(): { X: Matrix; species: Int32Array } {
  const text = readFileSync(fileURLToPath(new URL("../fixtures/iris.csv", import.meta.url)), "utf8");
  const lines = text.trim().split("\n").slice(1);
  const X = { data: new Float64Array(lines.length * 4), rows: lines.length, cols: 4 };
  const species = new Int32Array(lines.length);
  lines.forEach((line, i) => {
    const v = line.split(",").map(Number);
    for (let j = 0; j < 4; j++) X.data[i * 4 + j] = v[j]!;
    species[i] = v[4]!;
  });
  return { X, species };
}
