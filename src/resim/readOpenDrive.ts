import { readFile } from "node:fs/promises";
import { InputError } from "../core/errors.js";
import type { Road } from "../recording/types.js";
import { parseXml, xmlInputError, type XmlElement } from "./parseXml.js";

/** The road as the player uses it: markings in the road frame plus where the road starts. */
export interface PlayerRoad {
  road: Road;
  /** x of the road's start (s = 0) and its length (m). */
  x0: number;
  length: number;
  /** OpenDRIVE road id. */
  id: string;
  /** Number of lanes (OpenDRIVE ids -1 … -lanes, -1 leftmost). */
  lanes: number;
}

function child(el: XmlElement, name: string, file: string): XmlElement {
  const c = el.children.filter((k) => k.name === name);
  if (c.length !== 1) throw xmlInputError(`expected exactly one <${name}>, found ${c.length}`, file, el.line, el.name);
  return c[0]!;
}

function only(el: XmlElement, allowed: readonly string[], file: string): void {
  for (const c of el.children) if (!allowed.includes(c.name)) throw xmlInputError(`element not supported by roadsieve's player inside <${el.name}>`, file, c.line, c.name);
}

function numAttr(el: XmlElement, name: string, file: string): number {
  const v = el.attrs[name];
  const x = Number(v);
  if (v === undefined || v.trim() === "" || !Number.isFinite(x)) throw xmlInputError(`attribute ${name}="${v ?? ""}" should be a number`, file, el.line, el.name);
  return x;
}

/**
 * Read the subset of ASAM OpenDRIVE 1.6 that roadsieve writes (exports/openDriveXml.ts): one straight
 * road (a single planView line with hdg 0), one lane section with right lanes of constant width, a
 * centre lane, road marks and speeds. Anything else is an InputError naming file, element and line.
 */
export function readOpenDriveText(text: string, file: string, frameRate: number): PlayerRoad {
  const root = parseXml(text, file);
  if (root.name !== "OpenDRIVE") throw xmlInputError(`root element should be <OpenDRIVE>`, file, root.line, root.name);
  only(root, ["header", "road"], file);
  const header = child(root, "header", file);
  if (header.attrs.revMajor !== "1" || header.attrs.revMinor !== "6")
    throw xmlInputError(`OpenDRIVE ${header.attrs.revMajor ?? "?"}.${header.attrs.revMinor ?? "?"} is not supported; the player reads OpenDRIVE 1.6`, file, header.line, "header");
  only(header, [], file);
  const road = child(root, "road", file);
  only(road, ["type", "planView", "lanes"], file);
  let speedLimit: number | undefined;
  for (const t of road.children.filter((c) => c.name === "type")) {
    only(t, ["speed"], file);
    const sp = t.children[0];
    if (sp) {
      if (sp.attrs.unit !== "m/s") throw xmlInputError(`speed unit "${sp.attrs.unit ?? ""}" not supported (m/s)`, file, sp.line, "speed");
      speedLimit = numAttr(sp, "max", file);
    }
  }
  const pv = child(road, "planView", file);
  only(pv, ["geometry"], file);
  const g = child(pv, "geometry", file);
  only(g, ["line"], file);
  if (numAttr(g, "hdg", file) !== 0 || numAttr(g, "s", file) !== 0) throw xmlInputError(`only a straight line at s=0 with hdg=0 is supported`, file, g.line, "geometry");
  const x0 = numAttr(g, "x", file);
  const top = numAttr(g, "y", file);
  const length = numAttr(g, "length", file);
  const lanes = child(road, "lanes", file);
  only(lanes, ["laneSection"], file);
  const sec = child(lanes, "laneSection", file);
  only(sec, ["center", "right"], file);
  const right = child(sec, "right", file);
  only(right, ["lane"], file);
  const widths: number[] = [];
  right.children.forEach((lane, k) => {
    if (lane.attrs.id !== `-${k + 1}`) throw xmlInputError(`right lanes should be numbered -1, -2, … in order; found id="${lane.attrs.id ?? ""}"`, file, lane.line, "lane");
    only(lane, ["width", "roadMark", "speed"], file);
    const w = child(lane, "width", file);
    if (numAttr(w, "b", file) !== 0 || numAttr(w, "c", file) !== 0 || numAttr(w, "d", file) !== 0) throw xmlInputError(`only constant lane widths (b=c=d=0) are supported`, file, w.line, "width");
    widths.push(numAttr(w, "a", file));
  });
  if (widths.length === 0) throw xmlInputError(`the road has no right lanes`, file, right.line, "right");
  const markings = [top];
  for (const w of widths) markings.push(markings[markings.length - 1]! - w);
  markings.reverse();
  const r: Road = { name: road.attrs.name ?? "road", laneMarkings: markings, frameRate, xRange: [x0, x0 + length] };
  if (speedLimit !== undefined) r.speedLimit = speedLimit;
  return { road: r, x0, length, id: road.attrs.id ?? "", lanes: widths.length };
}

export async function readOpenDrive(path: string, frameRate: number): Promise<PlayerRoad> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the road file: ${(e as Error).message}`, { file: path });
  }
  return readOpenDriveText(text, path, frameRate);
}
