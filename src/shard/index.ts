/** Scenario shards: one recording's extraction as Parquet plus a manifest, and reading it back exactly. */
export { writeShard, SHARD_FORMAT_VERSION } from "./writeShard.js";
export type { WriteShardResult } from "./writeShard.js";
export { readShard, readShardManifest, optionDifference } from "./readShard.js";
export type { ReadShardOptions } from "./readShard.js";
export type { ShardManifest, ShardFile } from "./types.js";
export { encodeValue, decodeValue, canonicalJson } from "./encodeValue.js";
export { compactManeuvers } from "./compactManeuvers.js";
export { planInputs, failedJobs, EXPECTED_FILE, FAILED_DIR } from "./planInputs.js";
export type { PlanSource, ExpectedShards, FailedJob } from "./planInputs.js";
export { manifestName, safeName, MANIFEST_SUFFIX } from "./shardNames.js";
