import { renameDeprecated } from "../core/aliases.js";
import { InputError } from "../core/errors.js";

/**
 * How drives are cut into windows. Durations are in seconds and end in S, as every duration option
 * does (the 0.1 names seconds / minSeconds / maxSeconds / leadSeconds are still accepted).
 */
export type WindowSpec =
  | { mode: "fixed"; lengthS?: number; /** @deprecated use lengthS */ seconds?: number }
  | {
      mode: "events";
      minS?: number;
      maxS?: number;
      leadS?: number;
      /** @deprecated use minS */ minSeconds?: number;
      /** @deprecated use maxS */ maxSeconds?: number;
      /** @deprecated use leadS */ leadSeconds?: number;
    };

/** A window spec as resolved (new names only, defaults filled in). */
export type ResolvedWindow = { mode: "fixed"; lengthS: number } | { mode: "events"; minS: number; maxS: number; leadS: number };

/** Options of {@link buildScenarios}; defaults documented in docs/scenario-tensor.md. */
export interface ScenarioOptions {
  /**
   * Fixed windows of `lengthS` seconds (the last one of a drive absorbs a remainder shorter than
   * half a window), or windows cut `leadS` (default 1 s) before each ego lane change and each scene
   * event, kept within [minS, maxS]. Default { mode: "fixed", lengthS: 10 }.
   */
  window?: WindowSpec;
  /** Time steps of the tensor. Default 10. */
  steps?: number;
  /** Longitudinal gaps are clipped to ±range; an empty ahead/behind slot reads as ±range (m). Default 100. */
  range?: number;
  /** 1/TTC per actor is capped at this (1/s). Default 10. */
  maxInverseTtc?: number;
  /** A time step above maxGapFactor × the median frame interval ends a drive. Default 1.5. */
  maxGapFactor?: number;
}

export interface ResolvedScenarioOptions {
  window: ResolvedWindow;
  steps: number;
  range: number;
  maxInverseTtc: number;
  maxGapFactor: number;
}

export const SCENARIO_DEFAULTS: Readonly<ResolvedScenarioOptions> = Object.freeze({
  window: { mode: "fixed" as const, lengthS: 10 },
  steps: 10,
  range: 100,
  maxInverseTtc: 10,
  maxGapFactor: 1.5,
});

export function resolveScenarioOptions(options: ScenarioOptions = {}): ResolvedScenarioOptions {
  const given = options.window ?? SCENARIO_DEFAULTS.window;
  let window: ResolvedScenarioOptions["window"];
  const mode = (given as { mode?: unknown }).mode;
  switch (given.mode) {
    case "fixed": {
      const w = renameDeprecated(given, { seconds: "lengthS" }, "scenario window");
      const length = w.lengthS ?? 10;
      if (!(length > 0) || !Number.isFinite(length)) throw new InputError(`window.lengthS=${String(length)} should be a finite number > 0 (s)`);
      window = { mode: "fixed", lengthS: length };
      break;
    }
    case "events": {
      const w = renameDeprecated(given, { minSeconds: "minS", maxSeconds: "maxS", leadSeconds: "leadS" }, "scenario window");
      const lead = w.leadS ?? 1;
      const min = w.minS as number;
      const max = w.maxS as number;
      if (!(min > 0)) throw new InputError(`window.minS=${String(min)} should be a number > 0 (s)`);
      if (!(max >= min) || !Number.isFinite(max)) throw new InputError(`window.maxS=${String(max)} should be a finite number >= minS=${min}`);
      if (!(lead >= 0)) throw new InputError(`window.leadS=${String(lead)} should be a number >= 0 (s)`);
      window = { mode: "events", minS: min, maxS: max, leadS: lead };
      break;
    }
    default: {
      const never: never = given;
      throw new InputError(`window.mode=${JSON.stringify(mode)} should be "fixed" or "events" (got ${JSON.stringify(never)})`);
    }
  }
  const o: ResolvedScenarioOptions = {
    window,
    steps: options.steps ?? SCENARIO_DEFAULTS.steps,
    range: options.range ?? SCENARIO_DEFAULTS.range,
    maxInverseTtc: options.maxInverseTtc ?? SCENARIO_DEFAULTS.maxInverseTtc,
    maxGapFactor: options.maxGapFactor ?? SCENARIO_DEFAULTS.maxGapFactor,
  };
  if (!Number.isInteger(o.steps) || o.steps < 1 || o.steps > 1000) throw new InputError(`steps=${o.steps} should be an integer in [1, 1000]`);
  if (!(o.range > 0) || !Number.isFinite(o.range)) throw new InputError(`range=${o.range} should be a finite number > 0 (m)`);
  if (!(o.maxInverseTtc > 0) || !Number.isFinite(o.maxInverseTtc)) throw new InputError(`maxInverseTtc=${o.maxInverseTtc} should be a finite number > 0 (1/s)`);
  if (!(o.maxGapFactor >= 1)) throw new InputError(`maxGapFactor=${o.maxGapFactor} should be a number >= 1`);
  return o;
}
