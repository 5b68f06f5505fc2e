/**
 * Streaming extraction: recordings read and reduced to scenario rows one at a time per worker
 * thread, results in input order whatever the number of threads. (The queue commands, which load
 * BullMQ and a Redis client, live in src/queue/ and are used by the CLI only, so that importing the
 * library never loads them.)
 */
export { extractFile } from "./extractFile.js";
export type { ExtractedFile } from "./extractFile.js";
export { extractFiles, defaultWorkers } from "./extractFiles.js";
export { ExtractPool } from "./extractPool.js";
export { collectExtractions } from "./collectExtractions.js";
export { extractionOptions, portableReadOptions } from "./extractionOptions.js";
export type { PortableReadOptions } from "./extractionOptions.js";
