import { stat } from "node:fs/promises";
import { basename, dirname, extname, join, resolve } from "node:path";
import { InputError } from "../core/errors.js";
import { sha256File } from "../core/io.js";
import type { Progress } from "../core/progress.js";
import type { DeriveMotionOptions } from "../kinematics/deriveMotion.js";
import { buildTracks } from "./buildTracks.js";
import type { LaneSource, OnBadTrack } from "./buildTracks.js";
import type { ColumnMapping } from "./columns.js";
import { readRoad, roadToRoadFrame, validateRoad } from "./readRoad.js";
import { resolvePlausibility } from "./plausibility.js";
import type { PlausibilityOptions } from "./plausibility.js";
import { scanTable } from "./scanTable.js";
import type { TracksFormat } from "./scanTable.js";
import { unitFactors } from "./units.js";
import type { UnitMapping } from "./units.js";
import type { Recording, Road } from "./types.js";

/** Options of {@link readRecording}. */
export interface ReadRecordingOptions {
  /** The road: an object, or the path of a road JSON. Default: "road.json" beside the tracks file. */
  road?: Road | string;
  /** Our column → the file's column name, for files that name columns differently. */
  mapping?: ColumnMapping;
  /** Units of the file (converted to SI). Default: m, s, m/s, m/s². */
  units?: UnitMapping;
  /**
   * Recording id. Default: the tracks file's name without extension, or, when that is "tracks",
   * the name of the directory holding it (one recording per directory).
   */
  id?: string;
  /**
   * What a track that fails validation (empty or non-finite t/x/y, time going backwards, duplicate
   * time, a lone sample whose speed cannot be derived) does: "fail" throws an InputError naming the
   * first such row; "reject" leaves the track out, lists it in Recording.rejected with reason and row,
   * and adds a warning line. Default "fail".
   */
  onBadTrack?: OnBadTrack;
  /**
   * Where lane indices come from: "markings" assigns them from road.laneMarkings (a lane column in
   * the file is then only compared, with a warning when it disagrees); "file" uses the file's lane
   * column as-is (integers, 0 = rightmost lane, -1 = outside). Default "markings".
   */
  lanes?: LaneSource;
  /**
   * Sort each track's rows by time instead of requiring them to come in time order in the file.
   * Duplicate times are still errors. Default false.
   */
  sortWithinTracks?: boolean;
  /** File format. Default: from the extension (.csv, .tsv, .txt → CSV; .parquet, .pq → Parquet). */
  format?: TracksFormat;
  /** Smoothing used where speed or acceleration is derived from positions. */
  motion?: DeriveMotionOptions;
  /** Plausibility bounds, and checks accepted on purpose (docs/recording.md, "Plausibility"). */
  plausibility?: PlausibilityOptions;
  progress?: Progress;
}

const DEFAULTS = { onBadTrack: "fail" as OnBadTrack, lanes: "markings" as LaneSource, sortWithinTracks: false };

/**
 * Read a recording: a long tracks table (CSV or Parquet, one row per object per frame) plus a road
 * description. Columns and units are mapped to ours, every value is validated, missing speeds and
 * accelerations are derived, lanes assigned, and everything is turned into the road frame. See
 * docs/recording.md for the format.
 */
export async function readRecording(tracksPath: string, options: ReadRecordingOptions = {}): Promise<Recording> {
  const o = { ...DEFAULTS, ...definedOnly(options) };
  if (o.onBadTrack !== "reject" && o.onBadTrack !== "fail")
    throw new InputError(`onBadTrack=${JSON.stringify(o.onBadTrack)} should be "reject" or "fail"`);
  if (o.lanes !== "markings" && o.lanes !== "file")
    throw new InputError(`lanes=${JSON.stringify(o.lanes)} should be "markings" or "file"`);
  if (typeof o.sortWithinTracks !== "boolean")
    throw new InputError(`sortWithinTracks=${JSON.stringify(o.sortWithinTracks)} should be true or false`);
  const units = unitFactors(o.units);
  const plausibility = resolvePlausibility(o.plausibility);
  const format = o.format ?? formatFromPath(tracksPath);
  if (format !== "csv" && format !== "parquet")
    throw new InputError(`format=${JSON.stringify(format)} should be "csv" or "parquet"`);
  const progress = o.progress;

  const warnings: string[] = [];
  // The tracks file first: a missing file is that, not a missing road description beside it.
  try {
    const s = await stat(tracksPath);
    if (!s.isFile()) throw new Error("not a file");
  } catch (e) {
    const code = (e as NodeJS.ErrnoException).code;
    throw new InputError(code === "ENOENT" ? `the tracks file does not exist` : `cannot read the tracks file: ${(e as Error).message}`, { file: tracksPath });
  }
  const road = await resolveRoad(tracksPath, o.road, warnings);

  progress?.({ stage: "read", done: 0, total: 1, message: `reading ${tracksPath}` });
  // Hash the bytes while DuckDB scans the file on its own threads.
  const checksumPromise = sha256File(tracksPath);
  checksumPromise.catch(() => {}); // awaited below; avoid an unhandled rejection if the scan throws first
  const raw = await scanTable(tracksPath, format, o.mapping);
  const checksum = await checksumPromise;
  if (o.lanes === "file" && raw.names.lane === undefined)
    throw new InputError(`lanes: "file" needs a lane column; the file has none (map it with mapping.lane)`, { file: tracksPath });
  progress?.({ stage: "read", done: 1, total: 1, message: `${raw.rows} rows` });
  const roadFrame = roadToRoadFrame(road);
  const id = o.id ?? defaultId(tracksPath);
  const built = buildTracks(raw, {
    recording: id,
    road,
    roadFrame,
    units,
    onBadTrack: o.onBadTrack,
    lanes: o.lanes,
    sortWithinTracks: o.sortWithinTracks,
    motion: o.motion ?? {},
    plausibility,
    progress,
  });
  return {
    id,
    source: tracksPath,
    checksum,
    road: roadFrame,
    tracks: built.tracks,
    rejected: built.rejected,
    warnings: [...warnings, ...raw.warnings, ...built.warnings],
  };
}

async function resolveRoad(tracksPath: string, road: Road | string | undefined, warnings: string[]): Promise<Road> {
  if (typeof road === "string") return readRoad(road, warnings);
  if (road !== undefined) return validateRoad(road, "road option", warnings);
  const beside = join(dirname(tracksPath), "road.json");
  try {
    await stat(beside);
  } catch {
    throw new InputError(`no road description: expected ${beside} beside the tracks file, or give one (CLI --road FILE, API { road })`, { file: tracksPath });
  }
  return readRoad(beside, warnings);
}

function formatFromPath(path: string): TracksFormat {
  const ext = extname(path).toLowerCase();
  if (ext === ".csv" || ext === ".tsv" || ext === ".txt") return "csv";
  if (ext === ".parquet" || ext === ".pq") return "parquet";
  throw new InputError(`cannot tell the format from the extension "${ext}"; expected .csv or .parquet, or give the format (CLI --format, API { format })`, {
    file: path,
  });
}

/** Default recording id: file stem, or the directory name when the stem is the generic "tracks". */
export function defaultId(tracksPath: string): string {
  const stem = basename(tracksPath, extname(tracksPath));
  if (stem.toLowerCase() !== "tracks") return stem;
  return basename(dirname(resolve(tracksPath)));
}

function definedOnly<T extends object>(o: T): Partial<T> {
  const r: Partial<T> = {};
  for (const k of Object.keys(o) as Array<keyof T>) if (o[k] !== undefined) r[k] = o[k];
  return r;
}
