/**
 * `npm run bench -- cluster [--quick] [--skip-dbscan32]`: roadsieve's clustering engine against
 * scikit-learn (Debian's /usr/bin/python3, same data, same initial centres, timed inside Python around
 * fit only) and the JavaScript references (ml-kmeans, density-clustering), all in one run so the
 * ratios compare like with like. Prints a readable log; the last line is one JSON object.
 *
 * Data: seeded Gaussian blobs (make_blobs recipe: centres uniform in [-10, 10]^d, unit variance),
 * d = 32 and 64 centres for k-means (k = 64), 10 centres for DBSCAN.
 */
import { execFileSync } from "node:child_process";
import { mkdtempSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { kmeans as mlKmeans } from "ml-kmeans";
import DensityClustering from "density-clustering";
import { dbscan, kmeans, kmeansPlusPlus, map2d, medoids, suggestEps } from "../src/index.js";
import type { Matrix } from "../src/index.js";
import { makeBlobs } from "../test/helpers/blobs.js";

const PY = "/usr/bin/python3";

interface Figures {
  [key: string]: number | string | boolean | null | Figures;
}

function ms(t0: number): number {
  return Math.round((performance.now() - t0) * 10) / 10;
}

function rssMB(): number {
  return Math.round(process.resourceUsage().maxRSS / 1024);
}

function toRows(X: Matrix): number[][] {
  const out: number[][] = [];
  for (let i = 0; i < X.rows; i++) out.push(Array.from(X.data.subarray(i * X.cols, (i + 1) * X.cols)));
  return out;
}

class Py {
  readonly dir = mkdtempSync(join(tmpdir(), "roadsieve-bench-"));
  write(name: string, a: Float64Array): string {
    const p = join(this.dir, name);
    writeFileSync(p, new Uint8Array(a.buffer, a.byteOffset, a.byteLength));
    return p;
  }
  run<T>(code: string): T {
    // OPENBLAS_CORETYPE/L2_SIZE are unset for this subprocess only: they slow a current numpy
    // (see the machine notes); the BLAS kernel in use is reported.
    const env = { ...process.env };
    delete env.OPENBLAS_CORETYPE;
    delete env.OPENBLAS_L2_SIZE;
    const out = execFileSync(PY, ["-c", `import json, time\nimport numpy as np\nDIR = ${JSON.stringify(this.dir)}\n${code}`], {
      encoding: "utf8",
      env,
      maxBuffer: 1 << 28,
    });
    const lines = out.trim().split("\n");
    return JSON.parse(lines[lines.length - 1]!) as T;
  }
  dispose(): void {
    rmSync(this.dir, { recursive: true, force: true });
  }
}

function sklearnAvailable(): string | null {
  try {
    execFileSync(PY, ["-c", "import sklearn"], { stdio: "pipe" });
    return null;
  } catch (e) {
    return `${PY} with sklearn unavailable: ${(e as Error).message.split("\n")[0]}`;
  }
}

function mismatches(a: ArrayLike<number>, b: ArrayLike<number>): number {
  let c = 0;
  for (let i = 0; i < a.length; i++) if (a[i] !== b[i]) c++;
  return c;
}

async function kmeansCase(
  n: number,
  py: Py | null,
  opts: { mlFull: boolean; afterFit?: (X: Matrix, labels: Int32Array) => void },
  log: (s: string) => void,
): Promise<Figures> {
  const d = 32;
  const k = 64;
  let t = performance.now();
  // Rows in a SharedArrayBuffer (as `shareMatrix` makes them) so the worker threads read them in place.
  const { X } = makeBlobs(n, d, k, { seed: 1, shared: true });
  log(`\n== k-means n=${n} d=${d} k=${k} (data generated in ${ms(t)} ms, in a SharedArrayBuffer)`);
  t = performance.now();
  const init = kmeansPlusPlus(X, k, { seed: 1, sampleSize: 20_000 });
  log(`k-means++ seeding on a 20,000-row sample: ${ms(t)} ms (not part of the timed fits; every fit starts from these centres)`);
  const f: Figures = { n, d, k };
  // JIT warm-up (scikit-learn's loops are compiled ahead of time): a short fit on the first 60,000
  // rows (above MIN_ROWS_FOR_THREADS, so it also starts and warms the worker pool, which k-means keeps).
  t = performance.now();
  const warm = Math.min(n, 60_000);
  kmeans({ data: X.data.subarray(0, warm * d), rows: warm, cols: d }, k, { init, maxIter: 3 });
  log(`warm-up fit on ${warm} rows: ${ms(t)} ms (not timed)`);
  t = performance.now();
  const r = kmeans(X, k, { init });
  const tOurs = ms(t);
  f.roadsieveMs = tOurs;
  f.roadsieveThreads = r.threads;
  f.iterations = r.iterations;
  f.inertia = r.inertia;
  f.distanceEvaluationsPerRowIteration = Math.round((r.distanceEvaluations / (n * k * r.iterations)) * 1e4) / 1e4;
  log(`roadsieve kmeans (hamerly, ${r.threads} threads): ${tOurs} ms, ${r.iterations} iterations, inertia ${r.inertia}`);
  t = performance.now();
  const r1 = kmeans(X, k, { init, threads: 1 });
  f.roadsieveOneThreadMs = ms(t);
  f.sameResultOneThread = mismatches(r1.labels, r.labels) === 0 && r1.inertia === r.inertia;
  log(`roadsieve kmeans, 1 thread: ${f.roadsieveOneThreadMs} ms (identical result: ${f.sameResultOneThread})`);
  f.peakRssAfterFitMB = rssMB();
  log(`peak memory after roadsieve's fits (maxRSS, includes the ${Math.round((n * d * 8) / 2 ** 20)} MB data): ${f.peakRssAfterFitMB} MB`);
  opts.afterFit?.(X, r.labels);
  if (py) {
    py.write("X.bin", X.data);
    py.write("C.bin", init.data);
    const sk = py.run<Record<string, number | number[] | string>>(`
from sklearn.cluster import KMeans
import threadpoolctl
X = np.fromfile(DIR + '/X.bin').reshape(${n}, ${d}); C = np.fromfile(DIR + '/C.bin').reshape(${k}, ${d})
out = {}
for alg in ['lloyd', 'elkan']:
    t = time.perf_counter(); km = KMeans(n_clusters=${k}, init=C, n_init=1, algorithm=alg).fit(X); out[alg + 'Ms'] = (time.perf_counter() - t) * 1000
    out[alg + 'Iter'] = int(km.n_iter_); out[alg + 'Inertia'] = float(km.inertia_)
    if alg == 'lloyd': np.asarray(km.labels_, dtype='<f8').tofile(DIR + '/L.bin')
info = threadpoolctl.threadpool_info()
out['blas'] = ';'.join(i.get('internal_api', '') + ':' + str(i.get('architecture', '')) + ':' + str(i.get('num_threads')) for i in info)
print(json.dumps(out))
`);
    const { readFileSync } = await import("node:fs");
    const buf = readFileSync(join(py.dir, "L.bin"));
    const skLabels = new Float64Array(buf.buffer, buf.byteOffset, n);
    const best = Math.min(sk.lloydMs as number, sk.elkanMs as number);
    f.sklearnLloydMs = Math.round(sk.lloydMs as number);
    f.sklearnElkanMs = Math.round(sk.elkanMs as number);
    f.sklearnIterations = sk.lloydIter as number;
    f.sklearnBlas = sk.blas as string;
    f.labelMismatchesVsSklearn = mismatches(r.labels, skLabels);
    f.inertiaRelDiffVsSklearn = Math.abs(r.inertia - (sk.lloydInertia as number)) / (sk.lloydInertia as number);
    f.ratioVsSklearnBest = Math.round((tOurs / best) * 1000) / 1000;
    log(
      `scikit-learn 1.2 KMeans lloyd: ${f.sklearnLloydMs} ms, elkan: ${f.sklearnElkanMs} ms (${sk.lloydIter}/${sk.elkanIter} iterations; BLAS ${sk.blas})`,
    );
    log(
      `  same labels: ${f.labelMismatchesVsSklearn} mismatches; inertia rel. diff ${f.inertiaRelDiffVsSklearn}; roadsieve / sklearn best = ${f.ratioVsSklearnBest}×`,
    );
  }
  // ml-kmeans works on number[][]; conversion is not timed.
  const rows = toRows(X);
  const initRows = toRows(init);
  if (opts.mlFull) {
    t = performance.now();
    const ml = mlKmeans(rows, k, { initialization: initRows, maxIterations: 1000, tolerance: 1e-6 });
    f.mlKmeansMs = ms(t);
    f.mlKmeansIterations = ml.iterations;
    f.mlKmeansPerIterationMs = Math.round((f.mlKmeansMs as number) / ml.iterations);
    log(`ml-kmeans full fit: ${f.mlKmeansMs} ms, ${ml.iterations} iterations (${f.mlKmeansPerIterationMs} ms/iteration)`);
  } else {
    t = performance.now();
    mlKmeans(rows, k, { initialization: initRows, maxIterations: 1 });
    f.mlKmeansPerIterationMs = ms(t);
    log(`ml-kmeans one iteration only (a full fit at this size is too slow to wait for): ${f.mlKmeansPerIterationMs} ms`);
  }
  f.roadsievePerIterationMs = Math.round((tOurs / r.iterations) * 10) / 10;
  f.ratioMlKmeansPerIterationVsRoadsieve = Math.round(((f.mlKmeansPerIterationMs as number) / (f.roadsievePerIterationMs as number)) * 10) / 10;
  log(`per iteration: roadsieve ${f.roadsievePerIterationMs} ms vs ml-kmeans ${f.mlKmeansPerIterationMs} ms (${f.ratioMlKmeansPerIterationVsRoadsieve}× faster)`);
  rows.length = 0;
  return f;
}

async function main(args: string[]): Promise<void> {
  const quick = args.includes("--quick");
  const skip32 = args.includes("--skip-dbscan32");
  const log = (s: string): void => console.log(s);
  const pyMissing = sklearnAvailable();
  if (pyMissing) log(`scikit-learn comparisons skipped: ${pyMissing}`);
  const py = pyMissing ? null : new Py();
  const out: Figures = { benchmark: "cluster", quick, node: process.version, cores: (await import("node:os")).availableParallelism() };
  const nSmall = quick ? 20_000 : 100_000;
  const nLarge = quick ? 100_000 : 1_000_000;
  try {
    out.kmeansSmall = await kmeansCase(nSmall, py, { mlFull: true }, log);
    out.kmeansLarge = await kmeansCase(
      nLarge,
      py,
      {
        mlFull: false,
        afterFit: (X, labels) => {
          // Medoids of all 64 clusters of the large clustering, then its 2-D PCA map.
          let t = performance.now();
          const m = medoids(X, labels);
          const f: Figures = { n: nLarge, k: 64, ms: ms(t), fullSumsEvaluated: m.evaluated.reduce((a, b) => a + b, 0) };
          f.peakRssMB = rssMB();
          log(`medoids of all 64 clusters: ${f.ms} ms (${f.fullSumsEvaluated} full distance sums for ${nLarge} rows); maxRSS ${f.peakRssMB} MB`);
          out.medoids = f;
          t = performance.now();
          map2d(X, { method: "pca" });
          out.pcaMapMs = ms(t);
          log(`2-D PCA map of ${nLarge} rows: ${out.pcaMapMs} ms`);
        },
      },
      log,
    );

    // 2-D UMAP map of 100k rows.
    {
      const { X } = makeBlobs(100_000, 32, 64, { seed: 2 });
      const t = performance.now();
      const m = map2d(X, { method: "umap", seed: 1 });
      out.umapMap = { n: 100_000, fittedOn: m.fittedOn, ms: ms(t) };
      log(`\n== 2-D UMAP map of 100,000 rows (fitted on ${m.fittedOn}): ${ms(t)} ms`);
    }

    // DBSCAN.
    const dbCases: [number, number][] = [[quick ? 20_000 : 100_000, 8]];
    if (!skip32) dbCases.push([quick ? 20_000 : 100_000, 32]);
    const dbOut: Figures = {};
    for (const [n, d] of dbCases) {
      const { X } = makeBlobs(n, d, 10, { seed: 1 });
      const se = suggestEps(X, { minPts: 5, sampleSize: 2000, seed: 1 });
      const eps = se.eps;
      let t = performance.now();
      const r = dbscan(X, { eps, minPts: 5 });
      const f: Figures = { n, d, eps, minPts: 5, roadsieveMs: ms(t), clusters: r.nClusters, noise: r.nNoise };
      log(`\n== DBSCAN n=${n} d=${d} eps=${eps.toFixed(4)} (suggestEps knee) minPts=5: roadsieve ${f.roadsieveMs} ms, ${r.nClusters} clusters, ${r.nNoise} noise`);
      if (py) {
        py.write("B.bin", X.data);
        const sk = py.run<{ ms: number; labels: number[] }>(`
from sklearn.cluster import DBSCAN
X = np.fromfile(DIR + '/B.bin').reshape(${n}, ${d})
t = time.perf_counter(); db = DBSCAN(eps=${eps}, min_samples=5).fit(X); ms = (time.perf_counter() - t) * 1000
print(json.dumps({'ms': ms, 'labels': db.labels_.tolist()}))
`);
        f.sklearnMs = Math.round(sk.ms);
        f.labelMismatchesVsSklearn = mismatches(r.labels, sk.labels);
        f.ratioVsSklearn = Math.round(((f.roadsieveMs as number) / sk.ms) * 1000) / 1000;
        log(`scikit-learn DBSCAN: ${f.sklearnMs} ms; label mismatches ${f.labelMismatchesVsSklearn}; roadsieve / sklearn = ${f.ratioVsSklearn}×`);
      }
      dbOut[`d${d}`] = f;
    }
    {
      const n = 5000;
      const d = 8;
      const { X } = makeBlobs(n, d, 10, { seed: 1 });
      const eps = suggestEps(X, { minPts: 5, seed: 1 }).eps;
      let t = performance.now();
      const r = dbscan(X, { eps, minPts: 5 });
      const ours = ms(t);
      const rows = toRows(X);
      t = performance.now();
      const dc = new DensityClustering.DBSCAN().run(rows, eps, 5);
      const theirs = ms(t);
      dbOut.densityClustering5k = {
        n,
        d,
        eps,
        roadsieveMs: ours,
        densityClusteringMs: theirs,
        ratioDensityClusteringVsRoadsieve: Math.round((theirs / ours) * 10) / 10,
        sameClusterCount: dc.length === r.nClusters,
      };
      log(`\n== DBSCAN n=5000 d=8 vs density-clustering (super-quadratic, so only 5k): roadsieve ${ours} ms, density-clustering ${theirs} ms`);
    }
    out.dbscan = dbOut;
    out.peakRssMB = rssMB();
    log(`\npeak memory of the whole run (maxRSS): ${out.peakRssMB} MB`);
  } finally {
    py?.dispose();
  }
  console.log(JSON.stringify(out));
}

export async function run(args: string[]): Promise<void> {
  await main(args);
}
