/**
 * Broken inputs, table-driven: each case is built here from generated data (nothing large is
 * committed), run through the command line, and has its expected exit code and message pattern.
 * Ground truth is the generator's own file (its row count) and the corruption each case applies.
 */
import { spawn } from "node:child_process";
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync, copyFileSync } from "node:fs";
import { tmpdir } from "node:os";
import { join } from "node:path";
import { afterAll, beforeAll, describe, expect, it } from "vitest";
import { Rng } from "../src/core/rng.js";
import { fetchDoubles, sqlString, withDuckDB } from "../src/recording/duckdb.js";
import { generateTraffic } from "../src/synth/generateTraffic.js";
import { writeGeneratedTraffic } from "../src/synth/writeGeneratedTraffic.js";
import { SAMPLE_DATA_OPTIONS } from "../src/synth/sampleData.js";

const root = join(import.meta.dirname, "..");

interface Run {
  code: number | null;
  stdout: string;
  stderr: string;
}

function cli(args: string[], env: Record<string, string> = {}): Promise<Run> {
  return new Promise((resolve) => {
    const p = spawn(process.execPath, ["--import", "tsx", join(root, "src/cli/main.ts"), ...args], { cwd: root, env: { ...process.env, ...env } });
    let stdout = "";
    let stderr = "";
    p.stdout.on("data", (d) => (stdout += d));
    p.stderr.on("data", (d) => (stderr += d));
    p.on("close", (code) => resolve({ code, stdout, stderr }));
  });
}

/** Run jobs at most `k` at a time (the machine has 2 cores). */
async function pool<T>(jobs: Array<() => Promise<T>>, k: number): Promise<T[]> {
  const out: T[] = new Array(jobs.length);
  let next = 0;
  await Promise.all(
    Array.from({ length: k }, async () => {
      while (next < jobs.length) {
        const i = next++;
        out[i] = await jobs[i]!();
      }
    }),
  );
  return out;
}

interface Case {
  name: string;
  /** Arguments after the command; FILE is replaced by the case's file. */
  args: (file: string) => string[];
  /** Builds the case's file from the good CSV lines / files; returns its path. */
  build: () => string;
  code: number;
  /** Pattern for the one stderr line (exit 2) or for stdout (exit 0). */
  message: RegExp;
}

let dir = "";
let goodCsv = "";
let goodParquet = "";
let lines: string[] = [];
let dataRows = 0;
const results = new Map<string, Run>();

/** Write a case folder with road.json beside the tracks file. */
function caseFile(name: string, content: string | Buffer, road?: object): string {
  const d = join(dir, "cases", name);
  mkdirSync(d, { recursive: true });
  const roadJson = road ?? JSON.parse(readFileSync(join(dir, "good", "road.json"), "utf8"));
  writeFileSync(join(d, "road.json"), JSON.stringify(roadJson));
  const ext = Buffer.isBuffer(content) && content.subarray(0, 4).toString() === "PAR1" ? "parquet" : "csv";
  const f = join(d, `tracks.${ext}`);
  writeFileSync(f, content);
  return f;
}

const csvOf = (ls: string[]) => `${ls.join("\n")}\n`;
/** Replace data row `row` (1-based; the header is row 0) by f(line). */
const editRow = (row: number, f: (l: string) => string) => csvOf(lines.map((l, i) => (i === row ? f(l) : l)));
const late = () => Math.floor(dataRows * 0.86);
/** Change the named column of one CSV line (columns as in the generator's header). */
const field = (l: string, name: string, f: (v: string) => string) => {
  const k = lines[0]!.split(",").indexOf(name);
  if (k < 0) throw new Error(`the generated file has no column ${name}`);
  return l.split(",").map((v, i) => (i === k ? f(v) : v)).join(",");
};
/** Row groups whose column chunks overlap the scrambled bytes (from the intact file's footer). */
let scrambledGroups: number[] = [];
const SCRAMBLE = { at: 0, bytes: 20_000 };
/** 20 kB of seeded random bytes written over a file at 80 % of its length (the footer stays intact). */
function scramble(good: Buffer, where?: { at: number; bytes: number }): Buffer {
  const b = Buffer.from(good);
  const at = where?.at ?? Math.floor(b.length * 0.8);
  const bytes = where?.bytes ?? Math.min(20_000, b.length - 100 - at);
  const rng = new Rng(11);
  for (let i = at; i < at + bytes; i++) b[i] = Math.floor(rng.float() * 256);
  return b;
}
const road = () => JSON.parse(readFileSync(join(dir, "good", "road.json"), "utf8")) as Record<string, unknown>;

const cases: Case[] = [
  // Silent truncation (issue 10, point 1): a malformed line 80 % into the file.
  { name: "csv-extra-field-late", build: () => caseFile("extra-late", editRow(late(), (l) => `${l},x`)), args: (f) => ["check", f], code: 2, message: /row \d+: line \d+ has 9 fields, the header 8 \(an extra field, or a decimal comma/ },
  { name: "csv-decimal-comma-late", build: () => caseFile("comma-late", editRow(late(), (l) => field(l, "y", (v) => v.replace(".", ",")))), args: (f) => ["check", f], code: 2, message: /line \d+ has 9 fields.*decimal comma such as "12,5"/ },
  {
    name: "csv-invalid-utf8-late",
    build: () => {
      const text = Buffer.from(editRow(late(), (l) => field(l, "kind", () => "c\u0001r")));
      text[text.indexOf(1)] = 0xff; // a lone 0xFF byte is never valid UTF-8 (RFC 3629)
      return caseFile("utf8-late", text);
    },
    args: (f) => ["check", f],
    code: 2,
    message: /line \d+ is not valid UTF-8 text/,
  },
  { name: "csv-bad-line-early", build: () => caseFile("extra-early", editRow(10, (l) => `${l},x`)), args: (f) => ["check", f], code: 2, message: /row 10: line 11 has 9 fields, the header 8/ },
  { name: "csv-missing-field-last-line", build: () => caseFile("short-last", editRow(dataRows, (l) => l.split(",").slice(0, 5).join(","))), args: (f) => ["check", f], code: 2, message: /has 5 fields, the header 8 \(a field is missing\)/ },
  { name: "csv-empty-file", build: () => caseFile("empty", ""), args: (f) => ["check", f], code: 2, message: /the file is empty \(0 bytes\)/ },
  { name: "csv-header-only", build: () => caseFile("header-only", csvOf(lines.slice(0, 1))), args: (f) => ["check", f], code: 2, message: /the file has no data rows/ },
  { name: "missing-file", build: () => join(dir, "cases", "nowhere", "tracks.csv"), args: (f) => ["check", f], code: 2, message: /tracks\.csv: the tracks file does not exist/ },
  { name: "csv-missing-column", build: () => caseFile("no-y", csvOf(lines.map((l) => l.split(",").filter((_, i) => i !== 3).join(",")))), args: (f) => ["check", f], code: 2, message: /missing required column "y"/ },
  { name: "csv-huge-track-id", build: () => caseFile("big-id", editRow(late(), (l) => field(l, "track_id", () => "9007199254740993"))), args: (f) => ["check", f], code: 2, message: /value "9007199254740993": track id is larger than 2\^53 - 1/ },
  {
    name: "csv-duplicate-column (warning)",
    build: () => caseFile("dup", csvOf(lines.map((l, i) => (i === 0 ? `${l},x` : `${l},0`)))),
    args: (f) => ["check", f],
    code: 0,
    message: /warning: duplicate column "x" in the header: the first of each is used/,
  },
  { name: "csv-extra-column (warning)", build: () => caseFile("extra-col", csvOf(lines.map((l, i) => (i === 0 ? `${l},comment` : `${l},ok`)))), args: (f) => ["check", f], code: 0, message: /warning: column not used: "comment"/ },
  {
    name: "csv-time-backwards-hint",
    build: () => caseFile("unsorted", csvOf([lines[0]!, lines[2]!, lines[1]!, ...lines.slice(3)])),
    args: (f) => ["check", f],
    code: 2,
    message: /time goes backwards.*CLI --sort-rows/,
  },
  { name: "csv-time-backwards --sort-rows", build: () => caseFile("unsorted2", csvOf([lines[0]!, lines[2]!, lines[1]!, ...lines.slice(3)])), args: (f) => ["check", f, "--sort-rows"], code: 0, message: /0 rejected/ },
  // Parquet corrupted late: 20 kB scrambled at 80 % of the file, with row groups of 2048 rows.
  {
    name: "parquet-scrambled-late",
    build: () => {
      return caseFile("pq-scrambled", scramble(readFileSync(goodParquet), SCRAMBLE));
    },
    args: (f) => ["check", f],
    code: 2,
    message: /cannot read as Parquet: .*; row group \d+ of \d+ \(rows \d+–\d+\) cannot be read/,
  },
  {
    name: "parquet-scrambled-late-one-row-group",
    build: () => caseFile("pq-one", scramble(readFileSync(join(dir, "good-one", "tracks.parquet")))),
    args: (f) => ["check", f],
    code: 2,
    message: /cannot read as Parquet: .*; the scan stopped after \d+ of \d+ rows; row group 0 of 1 \(rows 1–\d+\) cannot be read/,
  },
  { name: "parquet-not-parquet", build: () => caseFile("pq-text", Buffer.from("PAR1 this is not parquet")), args: (f) => ["check", f], code: 2, message: /cannot read as Parquet/ },
  // Plausibility (point 3).
  { name: "frame-rate-1e9", build: () => caseFile("fr-huge", csvOf(lines), { ...road(), frameRate: 1e9 }), args: (f) => ["check", f], code: 2, message: /column "frameRate": implausible \(frame-rate\): the road's frameRate 1\.000e\+9 Hz is outside 1\.\.1000 Hz.*--accept frame-rate/ },
  {
    name: "frame-rate-1e9 --accept frame-rate: memory bounded before allocation",
    build: () => caseFile("fr-huge2", csvOf(lines), { ...road(), frameRate: 1e9 }),
    args: (f) => ["check", f, "--accept", "frame-rate"],
    code: 2,
    // ~30 s of recording at 1e9 Hz is ~3e10 frames, ~400 GiB for the frame clock: far past 24 GiB / 4.
    message: /times from 0 s to \d+(\.\d+)? s at 1000000000 Hz make \d\.\d+e\+10 frames .* more than this machine can hold/,
  },
  { name: "frame-rate-0.001", build: () => caseFile("fr-tiny", csvOf(lines), { ...road(), frameRate: 0.001 }), args: (f) => ["check", f], code: 2, message: /implausible \(frame-rate\): the road's frameRate 0\.001 Hz/ },
  {
    name: "times-in-ms-read-as-s",
    build: () => caseFile("ms", csvOf(lines.map((l, i) => (i === 0 ? l : field(l, "t", (v) => String(Math.round(Number(v) * 1000))))))),
    args: (f) => ["check", f],
    code: 2,
    message: /implausible \(frame-rate\): the median time step is 40 s.*are the times in milliseconds \(units\.time: "ms"\)\?/,
  },
  { name: "x-1e300", build: () => caseFile("x-huge", editRow(late(), (l) => field(l, "x", () => "1e300"))), args: (f) => ["check", f], code: 2, message: /column "x", value "1\.000e\+300": implausible \(position\): x = 1\.000e\+300 m lies outside road\.xRange/ },
  { name: "jump-500m", build: () => caseFile("jump", editRow(late(), (l) => field(l, "x", (v) => String(Number(v) + 500)))), args: (f) => ["check", f], code: 2, message: /implausible \(jump\): jump of 50\d\.\d+ m in 0\.04 s from row \d+/ },
  { name: "y-100m-off-road", build: () => caseFile("y-off", editRow(late(), (l) => field(l, "y", (v) => String(Number(v) + 100)))), args: (f) => ["check", f], code: 2, message: /column "y".*implausible \(position\): y = 10\d\.\d+ m lies more than 15 m outside/ },
  { name: "y-off-road --accept position,jump", build: () => caseFile("y-off2", editRow(late(), (l) => field(l, "y", (v) => String(Number(v) + 100)))), args: (f) => ["check", f, "--accept", "position,jump,speed"], code: 0, message: /warning: implausible \(position, accepted\)/ },
  {
    name: "against-the-direction",
    build: () => caseFile("mirrored", csvOf(lines.map((l, i) => (i === 0 ? l : field(l, "x", (v) => String(1500 - Number(v))))))),
    args: (f) => ["check", f],
    code: 2,
    message: /implausible \(direction\): \d+ of \d+ tracks move towards smaller x: the driving direction is probably "-x"/,
  },
  {
    name: "speed-column-in-km/h",
    build: () => {
      // vx from the positions (slope over ±5 samples of the same track, m/s) written in km/h
      // (× 3.6 = 18/5, by definition of km/h).
      const rows = lines.slice(1).map((l) => l.split(","));
      const out = [`${lines[0]},vx`];
      rows.forEach((r, i) => {
        let a = i;
        let b = i;
        while (a > i - 5 && a > 0 && rows[a - 1]![0] === r[0]) a--;
        while (b < i + 5 && b < rows.length - 1 && rows[b + 1]![0] === r[0]) b++;
        const v = b > a ? (Number(rows[b]![2]) - Number(rows[a]![2])) / (Number(rows[b]![1]) - Number(rows[a]![1])) : 30;
        out.push(`${lines[i + 1]},${(v * 3.6).toFixed(3)}`);
      });
      return caseFile("kmh", csvOf(out));
    },
    args: (f) => ["check", f],
    code: 2,
    message: /column "vx".*implausible \(speed\): speed \d+(\.\d+)? m\/s is more than 100 m\/s; the positions imply 3\.\d+ times less: are these speeds in km\/h \(units\.speed: "km\/h"\)\?/,
  },
  // Messages and options (point 4).
  { name: "--budget -1", build: () => goodCsv, args: (f) => ["plan", f, "--budget", "-1", "--out", join(dir, "o-budget")], code: 2, message: /--budget="-1" should be an integer >= 1/ },
  { name: "--accept unknown", build: () => goodCsv, args: (f) => ["check", f, "--accept", "speedy"], code: 2, message: /--accept: "speedy" is not a check/ },
  { name: "--id with two files", build: () => goodCsv, args: (f) => ["check", f, f, "--id", "a"], code: 2, message: /--id names one recording; give it with exactly one tracks file \(got 2\)/ },
  { name: "--id renames", build: () => goodCsv, args: (f) => ["check", f, "--id", "day-7"], code: 0, message: /recording "day-7"/ },
  {
    name: "--out is a file",
    build: () => {
      writeFileSync(join(dir, "a-file"), "x");
      return goodCsv;
    },
    args: (f) => ["plan", f, "--out", join(dir, "a-file")],
    code: 2,
    message: /a-file: --out is a file, not a folder/,
  },
  { name: "--out under a file", build: () => goodCsv, args: (f) => ["plan", f, "--out", join(dir, "a-file", "sub")], code: 2, message: /--out cannot be used: ENOTDIR|--out: cannot create the folder holding it: .*(ENOTDIR|EEXIST)/ },
  {
    name: "--out holds someone else's files",
    build: () => {
      mkdirSync(join(dir, "mine"), { recursive: true });
      writeFileSync(join(dir, "mine", "thesis.tex"), "x");
      return goodCsv;
    },
    args: (f) => ["plan", f, "--out", join(dir, "mine")],
    code: 2,
    message: /--out already holds files that are not a roadsieve result \("thesis\.tex"\)/,
  },
];

beforeAll(async () => {
  dir = mkdtempSync(join(tmpdir(), "roadsieve-badinput-"));
  // The command line's `generate --vehicle-km 30 --seed 7` (the sample's traffic settings): ~29,000
  // rows, so that 80 % into the file is many 2048-row chunks and several of DuckDB's buffers in.
  const traffic = generateTraffic({ ...SAMPLE_DATA_OPTIONS.traffic, vehicleKm: 30 }, new Rng(7));
  await writeGeneratedTraffic(join(dir, "good"), traffic, { format: "csv" });
  await writeGeneratedTraffic(join(dir, "good-one"), traffic, { format: "parquet" });
  goodCsv = join(dir, "good", "tracks.csv");
  lines = readFileSync(goodCsv, "utf8").trimEnd().split("\n");
  dataRows = lines.length - 1;
  goodParquet = join(dir, "good-pq", "tracks.parquet");
  mkdirSync(join(dir, "good-pq"));
  copyFileSync(join(dir, "good", "road.json"), join(dir, "good-pq", "road.json"));
  await withDuckDB((c) => c.run(`COPY (SELECT * FROM read_csv(${sqlString(goodCsv)})) TO ${sqlString(goodParquet)} (FORMAT parquet, ROW_GROUP_SIZE 2048)`));
  const size = readFileSync(goodParquet).length;
  SCRAMBLE.at = Math.floor(size * 0.8);
  SCRAMBLE.bytes = Math.min(20_000, size - 64 - SCRAMBLE.at);
  // parquet_metadata lists each column chunk's byte range (dictionary or first data page + its
  // compressed size): the row groups touched by the scramble are the ones to be named.
  scrambledGroups = await withDuckDB(async (c) => {
    const r = await c.runAndReadAll(
      `SELECT DISTINCT row_group_id FROM parquet_metadata(${sqlString(goodParquet)})
       WHERE coalesce(dictionary_page_offset, data_page_offset) < ${SCRAMBLE.at + SCRAMBLE.bytes}
         AND coalesce(dictionary_page_offset, data_page_offset) + total_compressed_size > ${SCRAMBLE.at} ORDER BY 1`,
    );
    return r.getRowsJS().map((row) => Number(row[0]));
  });
  const files = cases.map((c) => c.build());
  const runs = await pool(
    cases.map((c, i) => () => cli([...c.args(files[i]!), "--quiet"])),
    3,
  );
  cases.forEach((c, i) => results.set(c.name, runs[i]!));
}, 300_000);

afterAll(() => rmSync(dir, { recursive: true, force: true }));

describe("broken inputs: exit code and message", () => {
  it("the generated base file is valid and large enough for late corruption", async () => {
    expect(dataRows).toBeGreaterThan(25_000);
    const r = await cli(["check", goodCsv, "--quiet"]);
    expect(r.code).toBe(0);
    expect(r.stdout).toContain(`${dataRows.toLocaleString("en")} rows`);
  });

  it("DuckDB's stream alone ends early without an error (the trap the row-count check closes)", async () => {
    // Streamed through the reader's own helper, the scrambled single-row-group Parquet file ends
    // early and silently: fewer rows than its footer holds, no exception.
    const f = join(dir, "cases", "pq-one", "tracks.parquet");
    const { rows, footer } = await withDuckDB(async (c) => {
      const d = await fetchDoubles(c, `SELECT ${["track_id", "t", "x", "y", "lane", "length", "width"].map((n) => `CAST(${n} AS DOUBLE)`).join(", ")}, CAST(length(kind) AS DOUBLE) FROM read_parquet(${sqlString(f)}, file_row_number = true)`);
      const m = await c.runAndReadAll(`SELECT CAST(sum(num_rows) AS DOUBLE) FROM parquet_file_metadata(${sqlString(f)})`);
      return { rows: d.rows, footer: Number(m.getRowsJS()[0]![0]) };
    });
    expect(footer).toBe(dataRows);
    expect(rows).toBeLessThan(dataRows);
  });

  for (const c of cases)
    it(`${c.name} → exit ${c.code}`, () => {
      const r = results.get(c.name)!;
      if (c.code === 2) {
        const errLines = r.stderr.split("\n").filter((l) => l.trim() !== "");
        expect({ code: r.code, lines: errLines.length }).toEqual({ code: 2, lines: 1 });
        expect(errLines[0]).toMatch(/^roadsieve (check|plan): /);
        expect(errLines[0]).toMatch(c.message);
        expect(r.stderr).not.toMatch(/\n\s+at /); // no stack trace
      } else {
        expect(r.code, r.stderr).toBe(0);
        expect(r.stdout).toMatch(c.message);
      }
    });

  it("the Parquet case names a row group that the scrambled bytes really hit (footer ground truth)", () => {
    const r = results.get("parquet-scrambled-late")!;
    const g = Number(/row group (\d+) of/.exec(r.stderr)?.[1]);
    expect(scrambledGroups.length).toBeGreaterThan(0);
    expect(scrambledGroups).toContain(g);
    expect(g).toBeGreaterThan(0); // late in the file: not the first group
  });

  it("a failed --out check happens before any work (no progress, no output folder)", () => {
    const r = results.get("--out is a file")!;
    expect(r.stdout).toBe("");
    expect(readFileSync(join(dir, "a-file"), "utf8")).toBe("x");
  });
});
