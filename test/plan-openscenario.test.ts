import { spawnSync } from "node:child_process";
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, describe, expect, it } from "vitest";
import { InputError } from "../src/core/errors.js";
import { concreteScenarioXml, openDriveXml, scenarioExportFiles, writeExportFiles } from "../src/exports/index.js";
import { buildTestPlan } from "../src/plan/index.js";
import type { Plan } from "../src/plan/logicalTypes.js";
import type { Recording, Road, Track } from "../src/recording/types.js";
import { readOpenScenario } from "../src/resim/readOpenScenario.js";
import { simulateScenario } from "../src/resim/simulateScenario.js";
import { makeScenario, referencePython } from "./plan-fixtures.js";
import { ODR_XSD, OSC_XSD, xsdFailures } from "./helpers/xsd.js";

const tmp = mkdtempSync(join(tmpdir(), "roadsieve-osc-"));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

/** A straight track at constant speed, 25 Hz, fictional recording "orrowind-a", present from t0 to t1. */
function straight(id: number, x0: number, y: number, v: number, t0 = 0, t1 = 12, kind: Track["kind"] = "car"): Track {
  const n = Math.round((t1 - t0) * 25) + 1;
  const t = Float64Array.from({ length: n }, (_, i) => t0 + i / 25);
  return {
    id,
    recording: "orrowind-a",
    kind,
    length: kind === "truck" ? 12 : 4.6,
    width: kind === "truck" ? 2.5 : 1.9,
    t,
    x: t.map((ti) => x0 + v * ti),
    y: new Float64Array(n).fill(y),
    vx: new Float64Array(n).fill(v),
    vy: new Float64Array(n),
    ax: new Float64Array(n),
    ay: new Float64Array(n),
    lane: new Int32Array(n).fill(y > 3.75 ? 1 : 0),
  };
}

const road: Road = { name: "Orrowind Motorway", laneMarkings: [0, 3.75, 7.5, 11.25], frameRate: 25, speedLimit: 36.11, xRange: [0, 1500] };
// Ego (1) in the right lane at 30 m/s; 2 overtakes in the middle lane and only enters at 4 s (2 s into
// the window); 3 is a truck 40 m ahead that leaves at 6 s; 4 is 900 m away and must be left out.
const tracks = [straight(1, 0, 1.875, 30), straight(2, -30, 5.625, 36, 4, 12), straight(3, 40, 1.875, 25, 0, 6, "truck"), straight(4, 900, 1.875, 30)];
const scenario = makeScenario(0, { recording: "orrowind-a", egoTrack: 1, window: 0, tStart: 2, seconds: 8, km: 0.24 });

/** The parts of a schema-2 plan the exporter reads, from a cluster-view plan's test cases (fixtures only). */
function asPlan(v1: ReturnType<typeof buildTestPlan>, logicalScenarios: unknown[] = [], values: Record<string, number | null> = {}, logicalScenario = "LS-01"): Plan {
  const testCases = v1.testCases.map((tc) => ({ id: tc.id, logicalScenario, classId: "following", kind: "representative", scenarioIndex: tc.scenarioIndex, scenarioId: tc.scenarioId, source: tc.source, values, weight: 1, reasons: tc.reasons, eventId: null }));
  return { ...v1, logicalScenarios, testCases } as unknown as Plan;
}

function writeCase(name: string, xml: string): string {
  const file = join(tmp, name);
  writeFileSync(file, xml);
  writeFileSync(join(tmp, "road.xodr"), openDriveXml(road));
  return file;
}

describe("concrete OpenSCENARIO export", () => {
  const r = concreteScenarioXml({ scenario, tracks, frameRate: 25, roadFile: "road.xodr", name: "TC-0001" });

  it("includes the ego and the neighbours within range, in track-id order, byte-identical on rerun", () => {
    expect(r.actors).toEqual(["ego", "t2", "t3"]);
    expect(r.xml).toContain('<Vehicle name="truck-3" vehicleCategory="truck">');
    expect(r.xml).toContain('revMajor="1" revMinor="2"');
    expect(r.xml).toContain('<LogicFile filepath="road.xodr"/>');
    expect(concreteScenarioXml({ scenario, tracks, frameRate: 25, roadFile: "road.xodr", name: "TC-0001" }).xml).toBe(r.xml);
    // With the 1 s lead-in the file starts at 1 s: t2 enters at 4 s = 3 s simulation time; t3's last sample is at 6 s, so it is gone from 5.04 s on.
    expect(r.presence.t2).toEqual({ enter: 3, leave: null });
    expect(r.presence.t3).toEqual({ enter: null, leave: 5.04 });
  });

  it("validates against the official ASAM OpenSCENARIO 1.2 and OpenDRIVE 1.6.1 XSDs (shipped in standards/)", () => {
    const file = writeCase("tc.xosc", r.xml);
    // Source: the ASAM XSD files themselves (standards/README.md gives their provenance).
    expect(xsdFailures([file], OSC_XSD)).toEqual([]);
    expect(xsdFailures([join(tmp, "road.xodr")], ODR_XSD)).toEqual([]);
    // A drifted document is caught by the same check: children out of order.
    const broken = writeCase("broken.xosc", r.xml.replace("<CatalogLocations/>\n  <RoadNetwork>", "<RoadNetwork>").replace("</RoadNetwork>\n", "</RoadNetwork>\n  <CatalogLocations/>\n"));
    expect(xsdFailures([broken], OSC_XSD).length).toBeGreaterThan(0);
  });

  it("vertex times are whole frames at the recording's rate", () => {
    const times = [...r.xml.matchAll(/<Vertex time="([^"]+)"/g)].map((m) => Number(m[1]));
    // Ego: 8 s at 25 Hz = 201 vertices, 0 … 8 s.
    expect(times.slice(0, 201)).toEqual(Array.from({ length: 201 }, (_, k) => Number((k / 25).toFixed(6))));
  });

  it("reference point: a car of known length at a known centre is written and read back at the same centre within 1 mm", async () => {
    // A 4.6 m car whose centre is at (100, 5.6) heading 0.05 rad (a hand-built case). The written
    // position is the rear-axle middle; OpenSCENARIO 1.2 BoundingBox/Center gives the box centre
    // relative to it. Read back by the player and, independently, by lxml with that definition.
    const n = 251;
    const t = Float64Array.from({ length: n }, (_, i) => i / 25);
    const h = 0.05;
    const v = 30;
    const car: Track = { ...straight(7, 0, 0, 30), t, x: t.map((ti) => 100 + v * Math.cos(h) * ti), y: t.map((ti) => 5.6 + v * Math.sin(h) * ti), vx: new Float64Array(n).fill(v * Math.cos(h)), vy: new Float64Array(n).fill(v * Math.sin(h)) };
    const sc = makeScenario(0, { recording: "orrowind-a", egoTrack: 7, window: 0, tStart: 0, seconds: 10 });
    const xml = concreteScenarioXml({ scenario: sc, tracks: [car], frameRate: 25, roadFile: "road.xodr" }).xml;
    const file = writeCase("refpoint.xosc", xml);
    const run = simulateScenario(await readOpenScenario(file));
    const tr = run.recording.tracks[0]!;
    expect(Math.abs(tr.x[0]! - 100)).toBeLessThan(1e-3);
    expect(Math.abs(tr.y[0]! - 5.6)).toBeLessThan(1e-3);
    expect(Math.abs(tr.x[125]! - car.x[125]!)).toBeLessThan(1e-3);
    const py = referencePython();
    if (py) {
      const code = `import sys, math\nfrom lxml import etree\nd = etree.parse(sys.argv[1])\nc = d.find('.//BoundingBox/Center')\nw = d.find('.//Init//WorldPosition')\nx, y, hh, cx = float(w.get('x')), float(w.get('y')), float(w.get('h')), float(c.get('x'))\nprint(x + cx*math.cos(hh), y + cx*math.sin(hh))`;
      const out = spawnSync(py, ["-c", code, file], { encoding: "utf8" });
      expect(out.status, out.stderr).toBe(0);
      const [cx, cy] = out.stdout.trim().split(" ").map(Number);
      expect(Math.abs(cx! - 100)).toBeLessThan(1e-3);
      expect(Math.abs(cy! - 5.6)).toBeLessThan(1e-3);
    }
  });

  it("a late-arriving actor is absent before its entry time in the re-simulated run, and gone after it leaves", async () => {
    const file = writeCase("late.xosc", r.xml);
    const run = simulateScenario(await readOpenScenario(file));
    const t2 = run.recording.tracks.find((x) => x.id === 2)!;
    const t3 = run.recording.tracks.find((x) => x.id === 3)!;
    // Recording clock: the window starts at 2 s; t2's first recorded sample is at 4 s (generator input above).
    expect(t2.t[0]).toBeCloseTo(4, 9);
    expect(t2.x[0]).toBeCloseTo(-30 + 36 * 4, 1);
    expect(t3.t[t3.t.length - 1]).toBeCloseTo(6, 9);
    // The ego: 1 s lead-in + 8 s window + 1 s run-out at 25 Hz.
    expect(run.recording.tracks.find((x) => x.id === 1)!.t.length).toBe(251);
    // Absent before entry: no sample of t2 before 4 s although the run starts at 1 s.
    expect(run.recording.tracks.find((x) => x.id === 1)!.t[0]).toBeCloseTo(1, 9);
    expect([...t2.t].every((v) => v >= 4 - 1e-9)).toBe(true);
  });

  it("rejects a missing ego track and bad options", () => {
    expect(() => concreteScenarioXml({ scenario: { ...scenario, egoTrack: 99 }, tracks, frameRate: 25, roadFile: "r.xodr" })).toThrow(/ego track 99/);
    expect(() => concreteScenarioXml({ scenario, tracks, frameRate: 25, roadFile: "r.xodr" }, { vertexEvery: 0 })).toThrow(/vertexEvery=0/);
    expect(() => concreteScenarioXml({ scenario, tracks, frameRate: 25, roadFile: "r.xodr" }, { date: "yesterday" })).toThrow(/xsd:dateTime/);
  });

  it("scenarioExportFiles: one .xosc per test case and one road per recording, unexportable cases reported", async () => {
    const scenarios = [scenario, makeScenario(1, { recording: "orrowind-a", egoTrack: 77, window: 0, tStart: 0, seconds: 8, km: 0.1 })];
    const plan = buildTestPlan({ scenarios, labels: Int32Array.from([0, 1]), medoids: Int32Array.from([0, 1]), clusterMethod: "kmeans" });
    const rec: Recording = { id: "orrowind-a", source: "x", checksum: "", road, tracks, rejected: [], warnings: [] };
    const res = scenarioExportFiles(asPlan(plan), scenarios, [rec]);
    expect(res.files.map((f) => f.path)).toEqual(["orrowind-a.xodr", "TC-0001.xosc"]);
    expect(res.warnings.join(" ")).toMatch(/TC-0002: not exported: .*ego track 77 of recording "orrowind-a" is not among the 4 tracks/);
    const paths = await writeExportFiles(res.files, join(tmp, "plan"));
    expect(readFileSync(paths[1]!, "utf8")).toContain('<LogicFile filepath="orrowind-a.xodr"/>');
    expect(xsdFailures([paths[1]!], OSC_XSD)).toEqual([]);
  });
});

describe("player: bad input names file, element and line", () => {
  const good = concreteScenarioXml({ scenario, tracks, frameRate: 25, roadFile: "road.xodr", name: "TC-0001" }).xml;
  const lineOf = (xml: string, needle: string): number => xml.slice(0, xml.indexOf(needle)).split("\n").length;
  const expectError = async (file: string, re: RegExp): Promise<void> => {
    const e = await readOpenScenario(file).then(() => null, (x: unknown) => x);
    expect(e).toBeInstanceOf(InputError);
    expect((e as Error).message).toMatch(re);
  };

  it("malformed XML", async () => {
    const xml = good.replace("</Entities>", "</Entitie>");
    await expectError(writeCase("bad1.xosc", xml), new RegExp(`bad1\\.xosc: line ${lineOf(xml, "</Entitie>")}: malformed XML: end tag </Entitie> does not match <Entities>`));
  });
  it("another standard version", async () => {
    await expectError(writeCase("bad2.xosc", good.replace('revMinor="2"', 'revMinor="0"')), /bad2\.xosc: line 3, element <FileHeader>: OpenSCENARIO 1\.0 is not supported/);
  });
  it("missing road file", async () => {
    const xml = good.replace("road.xodr", "nowhere.xodr");
    await expectError(writeCase("bad3.xosc", xml), new RegExp(`bad3\\.xosc: line ${lineOf(xml, "<LogicFile")}, element <LogicFile>: the road file "nowhere.xodr" cannot be read`));
  });
  it("unsupported element", async () => {
    const xml = good.replace("<TeleportAction>", "<VisibilityAction graphics=\"true\" traffic=\"true\" sensors=\"true\"/></PrivateAction><PrivateAction><TeleportAction>");
    await expectError(writeCase("bad4.xosc", xml), new RegExp(`bad4\\.xosc: line ${lineOf(xml, "<VisibilityAction")}, element <VisibilityAction>: element not supported`));
  });
  it("malformed and unsupported road files", async () => {
    const file = writeCase("ok.xosc", good);
    writeFileSync(join(tmp, "road.xodr"), openDriveXml(road).replace('<line/>', '<arc curvature="0.001"/>'));
    await expectError(file, /road\.xodr: line 10, element <arc>: element not supported/);
    writeFileSync(join(tmp, "road.xodr"), openDriveXml(road).replace('revMinor="6"', 'revMinor="8"'));
    await expectError(file, /road\.xodr: line 3, element <header>: OpenDRIVE 1\.8 is not supported/);
  });
});

describe("plan-level exports and helpers", () => {
  it("a plan with logical scenarios gets a template, value sets and marginals per templated class, all schema-valid", async () => {
    const { handBuiltLogicalScenarios } = await import("./helpers/logicalFixtures.js");
    const scenarios = [scenario];
    const plan = buildTestPlan({ scenarios, labels: Int32Array.from([0]), medoids: Int32Array.from([0]), clusterMethod: "kmeans" });
    const logical = handBuiltLogicalScenarios().map((l) => ({ ...l, representative: { ...l.representative, recording: "orrowind-a" } }));
    const withLogical = asPlan(plan, [...logical, { ...logical[0]!, id: "LS-99", classId: "slow-traffic" }], { egoSpeed: 30, leaderSpeed: 28, gap: 25, leaderDecel: 4, brakeDuration: 3 }, "LS-03");
    const rec: Recording = { id: "orrowind-a", source: "x", checksum: "", road, tracks, rejected: [], warnings: [] };
    const res = scenarioExportFiles(withLogical, scenarios, [rec]);
    const logicalFiles = res.files.filter((f) => f.path.startsWith("logical/"));
    expect(logicalFiles.length).toBe(3 * logical.length);
    expect(res.warnings.join(" ")).toMatch(/LS-99: class "slow-traffic" has no template/);
    const braking = res.files.find((f) => f.path === "logical/LS-03.variations.xosc")!.text;
    expect(braking).toContain('<ParameterAssignment parameterRef="leaderDecel_mps2" value="4"/>');
    const paths = await writeExportFiles(res.files, join(tmp, "plan-logical"));
    expect(xsdFailures(paths.filter((p) => p.endsWith(".xosc")), OSC_XSD)).toEqual([]);
    // The template's road reference resolves from logical/ and the player runs it.
    const run = simulateScenario(await readOpenScenario(join(tmp, "plan-logical", "logical", "LS-03.xosc")));
    expect(run.recording.tracks.length).toBe(2);
  });

  it("expressions: ${…} with parameters, precedence and unary minus, as in ASAM OpenSCENARIO 1.2 section 9", async () => {
    const { evaluateValue } = await import("../src/resim/expression.js");
    const p = new Map([
      ["gap_m", "25"],
      ["v_mps", "30"],
    ]);
    // Worked by hand: 25 + (30 − 28) · 2 + 4.5 = 33.5; −25 − 4.5 = −29.5; 30 / 4 % 7 = 0.5.
    expect(evaluateValue("${$gap_m + ($v_mps - 28) * 2 + 4.5}", p)).toEqual({ value: "33.5" });
    expect(evaluateValue("${-$gap_m - 4.5}", p)).toEqual({ value: "-29.5" });
    expect(evaluateValue("${$v_mps / 4 % 7}", p)).toEqual({ value: "0.5" });
    expect(evaluateValue("$gap_m", p)).toEqual({ value: "25" });
    expect(evaluateValue("${$nope + 1}", p)).toMatchObject({ error: expect.stringMatching(/\$nope is not declared/) });
  });

  it("attachFidelity puts a fidelity block on the matching test cases and null on the others", async () => {
    const { attachFidelity } = await import("../src/resim/attachFidelity.js");
    const { fidelityCsv, FIDELITY_CSV_COLUMNS } = await import("../src/resim/fidelityTable.js");
    const row = {
      testCase: "TC-0001",
      role: "representative",
      logicalScenario: null,
      file: "openscenario/TC-0001.xosc",
      replay: { frames: 251, leaderAgreement: 1, speedMape: 0.1234567, speedMae: 0.02, sourceMinSpeed: 28, gapMape: 0.2, thwMape: 0.3, lateralMape: 0.05, minThwSource: 1.2, minThwResim: 1.21, minThwDiff: 0.01 },
      withinTargets: true,
      replayOutcome: { minTtc: null, minThw: 1.2, collision: false, collisionTime: null, collisionWith: null, collisionAhead: null },
      closedLoop: null,
      assignedBack: null,
      warnings: [],
    };
    const out = attachFidelity({ testCases: [{ id: "TC-0001" }, { id: "TC-0002" }] }, [row]);
    expect((out.testCases[0] as unknown as { fidelity: { replay: { speedMape: number } } }).fidelity.replay.speedMape).toBe(0.1235);
    expect((out.testCases[1] as unknown as { fidelity: unknown }).fidelity).toBeNull();
    const csv = fidelityCsv([row]).trim().split("\n");
    expect(csv[0]!.split(",")).toEqual([...FIDELITY_CSV_COLUMNS]);
    expect(csv[1]!.split(",").length).toBe(FIDELITY_CSV_COLUMNS.length);
  });
});
