import { fileURLToPath } from "node:url";

/** Path of the bundled sample tracks file (sample-data/orrowind/tracks.parquet in the package). */
export function sampleTracksPath(): string {
  // dist/cli/samplePath.js and src/cli/samplePath.ts are both two levels below the package root.
  return fileURLToPath(new URL("../../sample-data/orrowind/tracks.parquet", import.meta.url));
}
