import { spawnSync } from "node:child_process";
import { existsSync, mkdtempSync, readFileSync, readdirSync, rmSync, writeFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";

const root = join(import.meta.dirname, "..");
function cli(args: string[]): { code: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, encoding: "utf8", timeout: 300_000 });
  return { code: r.status, stdout: r.stdout, stderr: r.stderr };
}

let dir = "";
let tracks = "";
let out = "";
beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "roadsieve-resim-cli-"));
  const traffic = generateTraffic({ vehicleKm: 10, recordingId: "resim-cli", hardBrakingRate: 0.2 }, new Rng(4));
  await writeGeneratedTraffic(join(dir, "rec"), traffic, { format: "csv" });
  tracks = join(dir, "rec", "tracks.csv");
  out = join(dir, "plan");
  const r = cli(["plan", tracks, "--out", out, "--budget", "4", "--rare", "none", "--critical", "per-type", "--openscenario", "--no-catalogue", "--quiet", "--map", "pca"]);
  expect(r.code, r.stderr).toBe(0);
});
afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("roadsieve resim", () => {
  it("re-simulates the plan folder and writes the fidelity table, runs and report", () => {
    const r = cli(["resim", out, tracks, "--quiet"]);
    expect(r.code, r.stderr).toBe(0);
    expect(r.stdout).toMatch(/test cases re-simulated/);
    const files = readdirSync(join(out, "resim"));
    for (const f of ["fidelity.csv", "fidelity.json", "fidelity.html"]) expect(files).toContain(f);
    const n = readdirSync(join(out, "openscenario")).filter((f) => /^TC-[0-9a-f]+\.xosc$/.test(f)).length;
    expect(readFileSync(join(out, "resim", "fidelity.csv"), "utf8").trim().split("\n").length).toBe(n + 1);
    expect(files.filter((f) => f.endsWith(".closed-loop.csv")).length).toBe(n);
  });

  it("bad input: exit 2 with file, element and line, and the previous results are left as they were", () => {
    const before = readFileSync(join(out, "resim", "fidelity.csv"), "utf8");
    const first = readdirSync(join(out, "openscenario")).filter((f) => f.endsWith(".xosc")).sort()[0]!;
    const path = join(out, "openscenario", first);
    const good = readFileSync(path, "utf8");
    // An element the player does not support.
    writeFileSync(path, good.replace("<TeleportAction>", '<VisibilityAction graphics="true" traffic="true" sensors="true"/></PrivateAction><PrivateAction><TeleportAction>'));
    let r = cli(["resim", out, tracks, "--quiet"]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split("\n")).toHaveLength(1);
    expect(r.stderr).toMatch(new RegExp(`${first.replace(".", "\\.")}: line \\d+, element <VisibilityAction>: element not supported`));
    // A road file that is not there.
    writeFileSync(path, good.replace(/<LogicFile filepath="[^"]+"\/>/, '<LogicFile filepath="missing.xodr"/>'));
    r = cli(["resim", out, tracks, "--quiet"]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/element <LogicFile>: the road file "missing\.xodr" cannot be read/);
    // Malformed XML and another version.
    writeFileSync(path, good.replace("</Storyboard>", ""));
    expect(cli(["resim", out, tracks, "--quiet"]).stderr).toMatch(/line \d+: malformed XML/);
    writeFileSync(path, good.replace('revMinor="2"', 'revMinor="3"'));
    expect(cli(["resim", out, tracks, "--quiet"]).stderr).toMatch(/element <FileHeader>: OpenSCENARIO 1\.3 is not supported/);
    writeFileSync(path, good);
    expect(readFileSync(join(out, "resim", "fidelity.csv"), "utf8")).toBe(before);
    expect(readdirSync(out).filter((f) => f.startsWith(".resim"))).toEqual([]);
    expect(existsSync(join(out, "resim", "fidelity.json"))).toBe(true);
  });
});
