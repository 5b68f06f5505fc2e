/**
 * roadsieve public API: a table of contents. Each line re-exports one stage's public table; see
 * DEVELOPERS.md for the pipeline these stages form.
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
export * from "./pipeline/index.js";
export * from "./catalogue/index.js";
export * from "./report/index.js";
export * from "./logical/index.js";
export * from "./compare/index.js";
