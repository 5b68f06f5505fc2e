import { InputError } from "../core/errors.js";
import type { Road } from "../recording/types.js";
import { xmlEscape, xmlNumber } from "./xmlText.js";

/** ASAM OpenDRIVE version written (header revMajor.revMinor); validated against the shipped 1.6.1 XSD. */
export const OPENDRIVE_REV = { major: 1, minor: 6 } as const;

export interface OpenDriveOptions {
  /** Start and end of the road along x (m). Default: road.xRange; one of the two is needed. */
  xRange?: [number, number];
  /** Width of the painted lines (m; default 0.15, common practice for motorway lines). */
  markWidth?: number;
  /** Header date (free text in OpenDRIVE 1.6); fixed by default so reruns are byte-identical. */
  date?: string;
}

/**
 * The road description as an ASAM OpenDRIVE 1.6 road: one straight road (planView line) along the
 * road frame's x axis, the driving direction. The reference line runs along the leftmost marking, so
 * that every lane lies on its right side (negative lane ids), which is the driving direction of the
 * reference line in right-hand traffic (ASAM OpenDRIVE 1.6, 9.3 "lanes": right lanes run in the
 * direction of the reference line). World coordinates of the file equal roadsieve's road frame
 * (x along the carriageway, y to the left, markings at their road-frame offsets).
 *
 * Lane i of the road frame (0 = rightmost) is OpenDRIVE lane -(N − i); its width is the distance
 * between its two markings; a lane's roadMark describes its outer (right) border: solid white for the
 * right edge line, broken white between lanes; the centre lane's mark is the left edge line (solid).
 * The speed limit, when known, is written as the road type's speed and as every lane's speed (m/s).
 */
export function openDriveXml(road: Road, options: OpenDriveOptions = {}): string {
  const m = road.laneMarkings;
  if (m.length < 2) throw new InputError(`the road "${road.name}" has ${m.length} lane markings; OpenDRIVE lanes need at least 2`, { column: "laneMarkings" });
  const xr = options.xRange ?? road.xRange;
  if (!xr) throw new InputError(`the road "${road.name}" has no xRange; pass options.xRange (m) to write its OpenDRIVE length`, { column: "xRange" });
  const [x0, x1] = xr;
  if (!(x1 > x0) || !Number.isFinite(x0) || !Number.isFinite(x1)) throw new InputError(`xRange [${x0}, ${x1}] should be finite with start < end`, { column: "xRange" });
  const markWidth = options.markWidth ?? 0.15;
  const date = options.date ?? "1970-01-01T00:00:00";
  const n = m.length - 1;
  const top = m[n]!;
  const len = xmlNumber(x1 - x0);
  const speed = road.speedLimit;
  const out: string[] = [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<OpenDRIVE>`,
    `  <header revMajor="${OPENDRIVE_REV.major}" revMinor="${OPENDRIVE_REV.minor}" name="${xmlEscape(road.name)}" version="1" date="${xmlEscape(date)}" vendor="roadsieve"/>`,
    `  <road name="${xmlEscape(road.name)}" length="${len}" id="1" junction="-1" rule="RHT">`,
    `    <type s="0" type="motorway">${speed !== undefined ? `\n      <speed max="${xmlNumber(speed, 6)}" unit="m/s"/>\n    ` : ""}</type>`,
    `    <planView>`,
    `      <geometry s="0" x="${xmlNumber(x0)}" y="${xmlNumber(top)}" hdg="0" length="${len}">`,
    `        <line/>`,
    `      </geometry>`,
    `    </planView>`,
    `    <lanes>`,
    `      <laneSection s="0">`,
    `        <center>`,
    `          <lane id="0" type="none" level="false">`,
    `            <roadMark sOffset="0" type="solid" weight="standard" color="white" width="${xmlNumber(markWidth)}" laneChange="none"/>`,
    `          </lane>`,
    `        </center>`,
    `        <right>`,
  ];
  for (let k = 1; k <= n; k++) {
    const i = n - k; // road-frame lane index
    const width = m[i + 1]! - m[i]!;
    const rightEdge = i === 0;
    out.push(
      `          <lane id="-${k}" type="driving" level="false">`,
      `            <width sOffset="0" a="${xmlNumber(width)}" b="0" c="0" d="0"/>`,
      `            <roadMark sOffset="0" type="${rightEdge ? "solid" : "broken"}" weight="standard" color="white" width="${xmlNumber(markWidth)}" laneChange="${rightEdge ? "none" : "both"}"/>`,
    );
    if (speed !== undefined) out.push(`            <speed sOffset="0" max="${xmlNumber(speed, 6)}" unit="m/s"/>`);
    out.push(`          </lane>`);
  }
  out.push(`        </right>`, `      </laneSection>`, `    </lanes>`, `  </road>`, `</OpenDRIVE>`);
  return `${out.join("\n")}\n`;
}

/** Road-frame lane index (0 = rightmost) → OpenDRIVE lane id on the written road. */
export function openDriveLaneId(road: Road, lane: number): number {
  return -(road.laneMarkings.length - 1 - lane);
}
