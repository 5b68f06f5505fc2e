import { readFile } from "node:fs/promises";
import { InputError } from "../core/errors.js";
import { writeFileAtomic } from "../core/io.js";
import { validateMarkings } from "../kinematics/assignLanes.js";
import { validateConditions } from "./conditions.js";
import type { Road } from "./types.js";

const ROAD_FIELDS = ["name", "laneMarkings", "frameRate", "speedLimit", "xRange", "direction", "conditions"] as const;

/**
 * Read and validate a road description (JSON). Errors name the file and the field. Unknown fields are
 * ignored; when `warnings` is given, a line per unknown field is added to it (a typo in an optional
 * field would otherwise go unnoticed).
 */
export async function readRoad(path: string, warnings?: string[]): Promise<Road> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the road description: ${(e as Error).message}`, { file: path });
  }
  let parsed: unknown;
  try {
    parsed = JSON.parse(text);
  } catch (e) {
    throw new InputError(`road description is not valid JSON: ${(e as Error).message}`, { file: path });
  }
  return validateRoad(parsed, path, warnings);
}

/** Validate a road object (from JSON or from code); returns a clean copy with only known fields. */
export function validateRoad(value: unknown, file?: string, warnings?: string[]): Road {
  const where = (column: string, v?: unknown) => ({ file, column, value: v === undefined ? undefined : JSON.stringify(v) });
  if (typeof value !== "object" || value === null || Array.isArray(value))
    throw new InputError(`road description should be a JSON object with fields ${ROAD_FIELDS.join(", ")}`, { file });
  const o = value as Record<string, unknown>;
  if (typeof o.name !== "string") throw new InputError(`field "name" should be a string`, where("name", o.name));
  if (!Array.isArray(o.laneMarkings))
    throw new InputError(`field "laneMarkings" should be an array of lateral offsets (m), right edge first`, where("laneMarkings", o.laneMarkings));
  validateMarkings(o.laneMarkings as number[], file);
  if (typeof o.frameRate !== "number" || !(o.frameRate > 0) || !Number.isFinite(o.frameRate))
    throw new InputError(`field "frameRate" should be a finite number > 0 (Hz)`, where("frameRate", o.frameRate));
  const road: Road = { name: o.name, laneMarkings: [...(o.laneMarkings as number[])], frameRate: o.frameRate };
  if (o.speedLimit !== undefined) {
    if (typeof o.speedLimit !== "number" || !(o.speedLimit > 0) || !Number.isFinite(o.speedLimit))
      throw new InputError(`field "speedLimit" should be a finite number > 0 (m/s)`, where("speedLimit", o.speedLimit));
    road.speedLimit = o.speedLimit;
  }
  if (o.xRange !== undefined) {
    const r = o.xRange;
    if (!Array.isArray(r) || r.length !== 2 || !r.every((v) => typeof v === "number" && Number.isFinite(v)) || !(r[0] < r[1]))
      throw new InputError(`field "xRange" should be [start, end] in m with start < end`, where("xRange", r));
    road.xRange = [r[0] as number, r[1] as number];
  }
  if (o.direction !== undefined) {
    if (o.direction !== "+x" && o.direction !== "-x")
      throw new InputError(`field "direction" should be "+x" or "-x"`, where("direction", o.direction));
    road.direction = o.direction;
  }
  if (o.conditions !== undefined) road.conditions = validateConditions(o.conditions, file);
  if (warnings) {
    const known = new Set<string>(ROAD_FIELDS);
    for (const k of Object.keys(o))
      if (!known.has(k)) warnings.push(`${file ?? "road"}: unknown field "${k}" ignored (known: ${ROAD_FIELDS.join(", ")})`);
  }
  return road;
}

/**
 * The road in the road frame: for direction "-x" the markings are mirrored (y' = -y, so the order
 * reverses) and xRange becomes [-end, -start]. The result always has direction "+x".
 */
export function roadToRoadFrame(road: Road): Road {
  if (road.direction !== "-x") return { ...road, laneMarkings: [...road.laneMarkings], direction: "+x" };
  const out: Road = {
    ...road,
    laneMarkings: road.laneMarkings.map((m) => 0 - m).reverse(),
    direction: "+x",
  };
  if (road.xRange) out.xRange = [0 - road.xRange[1], 0 - road.xRange[0]];
  return out;
}

/** Write a road description as JSON (atomically). */
export async function writeRoad(road: Road, path: string): Promise<void> {
  const clean = validateRoad(road, path);
  await writeFileAtomic(path, JSON.stringify(clean, null, 2) + "\n");
}
