export { Rng } from "./rng.js";
export type { Matrix } from "./matrix.js";
export { zeros, fromRows, toRows, row, takeRows, sqDist, assertMatrix } from "./matrix.js";
export { InputError, formatInputError } from "./errors.js";
export type { InputLocation } from "./errors.js";
export type { Progress, ProgressEvent } from "./progress.js";
export { silentProgress, throttleProgress } from "./progress.js";
export { writeFileAtomic, sha256File, sha256Text } from "./io.js";
export { VERSION } from "./version.js";
