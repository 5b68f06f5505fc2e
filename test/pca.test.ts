import { describe, expect, it } from "vitest";
import { pca, pcaTransform } from "../src/embed/index.js";
import { symmetricEigen } from "../src/embed/_symEigen.js";
import { InputError } from "../src/core/errors.js";
import { Rng } from "../src/core/rng.js";
import { loadIris } from "./helpers/iris.js";
import { makeBlobs } from "./helpers/blobs.js";
import { PyWorkspace, sklearnMissing } from "./helpers/sklearn.js";

const missing = sklearnMissing();
if (missing) console.warn(`skipping scikit-learn comparisons: ${missing}`);
const iris = loadIris().X;

describe("pca", () => {
  it("pca(iris, 2) explains 92.46 % and 5.31 % of the variance", () => {
    // Iris PCA explained_variance_ratio_ [0.92461872, 0.05306648] (scikit-learn PCA docs/examples; from memory),
    // explained_variance_ [4.22824171, 0.24267075] (same source, from memory).
    const p = pca(iris, 2);
    expect(p.explainedVarianceRatio[0]).toBeCloseTo(0.92461872, 7);
    expect(p.explainedVarianceRatio[1]).toBeCloseTo(0.05306648, 7);
    expect(p.explainedVariance[0]).toBeCloseTo(4.22824171, 7);
    expect(p.explainedVariance[1]).toBeCloseTo(0.24267075, 7);
  });

  it.skipIf(missing !== null)("pca equals scikit-learn PCA (scores with signs, components, variances) on Iris and on 32-d blobs", () => {
    const { X: B } = makeBlobs(3000, 32, 6, { seed: 3 });
    const ws = new PyWorkspace();
    try {
      ws.writeF64("I.bin", iris.data);
      ws.writeF64("B.bin", B.data);
      type Out = { scores: number[]; comps: number[]; var: number[]; ratio: number[]; mean: number[] };
      const sk = ws.run<Record<string, Out>>(`
from sklearn.decomposition import PCA
out = {}
for name, d, c in [('I', 4, 3), ('B', 32, 5)]:
    X = np.fromfile(DIR + '/' + name + '.bin').reshape(-1, d)
    p = PCA(n_components=c, svd_solver='full').fit(X)
    out[name] = {'scores': p.transform(X).ravel().tolist(), 'comps': p.components_.ravel().tolist(),
                 'var': p.explained_variance_.tolist(), 'ratio': p.explained_variance_ratio_.tolist(), 'mean': p.mean_.tolist()}
print(json.dumps(out))
`);
      for (const [name, X, c] of [["I", iris, 3], ["B", B, 5]] as const) {
        const p = pca(X, c);
        const s = sk[name]!;
        const scale = Math.max(...s.scores.map(Math.abs));
        for (let i = 0; i < s.scores.length; i++) expect(Math.abs(p.scores.data[i]! - s.scores[i]!)).toBeLessThan(1e-9 * scale);
        for (let i = 0; i < s.comps.length; i++) expect(p.components.data[i]).toBeCloseTo(s.comps[i]!, 9);
        for (let j = 0; j < c; j++) {
          expect(Math.abs(p.explainedVariance[j]! - s.var[j]!) / s.var[j]!).toBeLessThan(1e-10);
          expect(p.explainedVarianceRatio[j]).toBeCloseTo(s.ratio[j]!, 12);
        }
        for (let t = 0; t < X.cols; t++) expect(p.mean[t]).toBeCloseTo(s.mean[t]!, 12);
      }
    } finally {
      ws.dispose();
    }
  });

  it("pcaTransform of the training rows gives the scores; components are orthonormal", () => {
    const p = pca(iris, 4);
    const again = pcaTransform(p, iris);
    for (let i = 0; i < again.data.length; i++) expect(again.data[i]).toBeCloseTo(p.scores.data[i]!, 12);
    for (let a = 0; a < 4; a++)
      for (let b = 0; b < 4; b++) {
        let s = 0;
        for (let t = 0; t < 4; t++) s += p.components.data[a * 4 + t]! * p.components.data[b * 4 + t]!;
        expect(s).toBeCloseTo(a === b ? 1 : 0, 12);
      }
    const total = p.explainedVarianceRatio.reduce((x, y) => x + y, 0);
    expect(total).toBeCloseTo(1, 12);
  });

  it("symmetricEigen solves A v = λ v for random symmetric matrices (definition check)", () => {
    const rng = new Rng(4);
    for (const n of [1, 2, 7, 40]) {
      const A = new Float64Array(n * n);
      for (let i = 0; i < n; i++)
        for (let j = i; j < n; j++) {
          const v = rng.normal();
          A[i * n + j] = v;
          A[j * n + i] = v;
        }
      const { values, vectors } = symmetricEigen(A, n);
      for (let r = 0; r < n; r++) {
        if (r > 0) expect(values[r]!).toBeLessThanOrEqual(values[r - 1]!);
        for (let i = 0; i < n; i++) {
          let s = 0;
          for (let k = 0; k < n; k++) s += A[i * n + k]! * vectors[r * n + k]!;
          expect(s).toBeCloseTo(values[r]! * vectors[r * n + i]!, 10);
        }
      }
    }
  });

  it("pca rejects bad nComponents with the allowed range", () => {
    expect(() => pca(iris, 5)).toThrow(InputError);
    expect(() => pca(iris, 5)).toThrow("nComponents=5 should be an integer in [1, min(n_samples, n_features)=4]");
  });
});
