import type { Progress } from "../core/progress.js";
import { Rng } from "../core/rng.js";
import { generateTraffic, type GeneratedTraffic } from "./generateTraffic.js";
import type { TrafficOptions } from "./options.js";
import { writeGeneratedTraffic, type TrafficFileFormat } from "./writeGeneratedTraffic.js";

/** The recipe of the bundled sample recording (sample-data/orrowind): regenerating it reproduces the files byte for byte. */
export const SAMPLE_DATA_OPTIONS: Readonly<{
  seed: number;
  format: TrafficFileFormat;
  traffic: Readonly<Partial<TrafficOptions>>;
}> = Object.freeze({
  seed: 20260417,
  format: "parquet",
  traffic: Object.freeze({
    roadName: "Orrowind Motorway",
    recordingId: "orrowind-01",
    lanes: 3,
    laneWidth: 3.75,
    length: 1500,
    speedLimit: 130 / 3.6,
    vehicleKm: 350,
    frameRate: 25,
    flowPerLane: 800,
    truckShare: 0.15,
    positionNoiseSd: 0.1,
    writeVelocities: false,
    hardBrakingRate: 0.04,
    tightCutInRate: 0.04,
  }),
});

/** Generate the sample recording and write it to `dir` (the bundled copy lives in sample-data/orrowind). */
export async function writeSampleData(
  dir: string,
  progress?: Progress,
): Promise<{ files: string[]; traffic: GeneratedTraffic }> {
  const s = SAMPLE_DATA_OPTIONS;
  const traffic = generateTraffic({ ...s.traffic }, new Rng(s.seed), progress);
  const files = await writeGeneratedTraffic(dir, traffic, { format: s.format });
  return { files, traffic };
}
