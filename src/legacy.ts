/**
 * Deprecated: the flat names of roadsieve 0.1 (`rs.readRecording`, `rs.kmeans`, `rs.erfc`, the
 * generator's internals …), kept for one version so that existing notebooks keep working. They will
 * be removed in 0.3. Use the curated top level (`rs.read`, `rs.run`, `rs.plan`, `rs.show`,
 * `rs.write`, `rs.query`), the stage namespaces (`rs.cluster.kmeans`, `rs.coverage.chao1`, …) and
 * `roadsieve/synth` for the generator instead; DEVELOPERS.md lists the mapping.
 */
export * from "./core/index.js";
export type * from "./recording/types.js";
export * from "./kinematics/index.js";
export * from "./recording/index.js";
export type * from "./synth/types.js";
export * from "./synth/index.js";
export * from "./maneuvers/labels.js";
export * from "./scene/slots.js";
export type * from "./scenario/types.js";
export * from "./maneuvers/index.js";
export * from "./scene/index.js";
export * from "./scenario/index.js";
export * from "./embed/index.js";
export * from "./cluster/index.js";
export * from "./exposure/index.js";
export * from "./coverage/index.js";
export * from "./plan/index.js";
export * from "./exports/index.js";
export * from "./resim/index.js";
export * from "./pipeline/index.js";
export * from "./shard/index.js";
export * from "./extract/index.js";
export * from "./catalogue/index.js";
export * from "./report/index.js";
export * from "./logical/index.js";
