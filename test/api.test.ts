/**
 * The public API: a short curated top level for the notebook path, one namespace per stage, the
 * generator on its own entry point, the 0.1 flat names still there (deprecated), and stage defaults
 * that equal the pipeline's.
 */
import { readFileSync } from "node:fs";
import { describe, expect, it } from "vitest";
import * as rs from "../src/index.js";
import * as synth from "../src/synth/index.js";
import { makeBlobs } from "./helpers/blobs.js";

describe("the top level", () => {
  it("is the notebook path: read, run, extract, plan, show, write, query, writeReport", () => {
    expect(rs.read).toBe(rs.recording.readRecording);
    expect(rs.run).toBe(rs.pipeline.runPipeline);
    expect(rs.extract).toBe(rs.pipeline.extractRecording);
    expect(rs.plan).toBe(rs.pipeline.planCatalogue);
    expect(rs.show).toBe(rs.report.show);
    expect(rs.write).toBe(rs.pipeline.writeOutputs);
    expect(rs.query).toBe(rs.catalogue.queryCatalogue);
    expect(rs.writeReport).toBe(rs.report.writeReport);
  });

  it("has one namespace per stage (rs.cluster.kmeans, rs.coverage.chao1, …) and no generator in them", () => {
    expect(typeof rs.cluster.kmeans).toBe("function");
    expect(typeof rs.coverage.chao1).toBe("function");
    expect(typeof rs.embed.pca).toBe("function");
    expect(typeof rs.scene.buildScenes).toBe("function");
    expect(typeof rs.testPlan.buildTestPlan).toBe("function");
    expect(typeof rs.report.criticalityFigure).toBe("function");
    expect("synth" in rs).toBe(false);
    for (const ns of [rs.core, rs.recording, rs.kinematics, rs.maneuvers, rs.scene, rs.scenario, rs.embed, rs.cluster, rs.exposure, rs.coverage, rs.testPlan, rs.pipeline, rs.catalogue, rs.report])
      expect(Object.keys(ns).some((k) => /^(generateTraffic|idmAcceleration|mobilIncentive)$/.test(k))).toBe(false);
  });

  it("keeps the 0.1 flat names as aliases of the namespaced ones (deprecated, one version)", () => {
    expect(rs.readRecording).toBe(rs.read);
    expect(rs.kmeans).toBe(rs.cluster.kmeans);
    expect(rs.chao1).toBe(rs.coverage.chao1);
    expect(rs.generateTraffic).toBe(synth.generateTraffic);
  });

  it("puts the generator on its own entry point, roadsieve/synth, also for Node10 type resolution (tslab)", () => {
    const pkg = JSON.parse(readFileSync(new URL("../package.json", import.meta.url), "utf8")) as {
      exports: Record<string, { types: string; import: string; default: string } | string>;
      typesVersions: Record<string, Record<string, string[]>>;
    };
    const entry = pkg.exports["./synth"] as { types: string; import: string };
    expect(entry.import).toBe("./dist/synth/index.js");
    expect(entry.types).toBe("./dist/synth/index.d.ts");
    expect(pkg.typesVersions["*"]!.synth).toEqual(["dist/synth/index.d.ts"]);
    expect(typeof synth.generateTraffic).toBe("function");
  });
});

describe("stage defaults equal the pipeline's (one table)", () => {
  const { X } = makeBlobs(300, 4, 3, { seed: 2 });
  const o = rs.pipeline.resolvePipelineOptions();

  it("kmeans without options restarts nInit times from the shared seed, as the pipeline does", () => {
    const a = rs.cluster.kmeans(X, 3);
    const b = rs.cluster.kmeans(X, 3, { seed: o.seed, nInit: o.nInit });
    expect(Array.from(a.labels)).toEqual(Array.from(b.labels));
    expect(a.inertia).toBe(b.inertia);
  });

  it("sweepK tries the pipeline's k range by default", () => {
    const r = rs.cluster.sweepK(X, { silhouetteSampleSize: 300 });
    expect(r.rows.map((x) => x.k)).toEqual(Array.from({ length: o.kRange[1] - o.kRange[0] + 1 }, (_, i) => o.kRange[0] + i));
  });

  it("map2d draws the pipeline's map by default", () => {
    expect(rs.embed.map2d(X, { sampleSize: 300 }).method).toBe(o.map);
  });

  it("silhouette is a number like the other indices", () => {
    const km = rs.cluster.kmeans(X, 3);
    expect(typeof rs.cluster.silhouette(X, km.labels)).toBe("number");
    expect(rs.cluster.silhouette(X, km.labels)).toBe(rs.cluster.silhouetteDetail(X, km.labels).score);
  });
});
