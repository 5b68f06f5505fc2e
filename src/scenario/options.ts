import { InputError } from "../core/errors.js";

/** How drives are cut into windows. */
export type WindowSpec =
  | { mode: "fixed"; seconds: number }
  | { mode: "events"; minSeconds: number; maxSeconds: number; leadSeconds?: number };

/** Options of {@link buildScenarios}; defaults documented in docs/scenario-tensor.md. */
export interface ScenarioOptions {
  /**
   * Fixed windows of `seconds` (the last one of a drive absorbs a remainder shorter than half a
   * window), or windows cut `leadSeconds` (default 1 s) before each ego lane change and each scene
   * event, kept within [minSeconds, maxSeconds]. Default { mode: "fixed", seconds: 10 }.
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
  window: Required<Extract<WindowSpec, { mode: "fixed" }>> | Required<Extract<WindowSpec, { mode: "events" }>>;
  steps: number;
  range: number;
  maxInverseTtc: number;
  maxGapFactor: number;
}

export const SCENARIO_DEFAULTS: Readonly<ResolvedScenarioOptions> = Object.freeze({
  window: { mode: "fixed" as const, seconds: 10 },
  steps: 10,
  range: 100,
  maxInverseTtc: 10,
  maxGapFactor: 1.5,
});

export function resolveScenarioOptions(options: ScenarioOptions = {}): ResolvedScenarioOptions {
  const w = options.window ?? SCENARIO_DEFAULTS.window;
  let window: ResolvedScenarioOptions["window"];
  const mode = (w as { mode?: unknown }).mode;
  switch (w.mode) {
    case "fixed":
      if (!(w.seconds > 0) || !Number.isFinite(w.seconds)) throw new InputError(`window.seconds=${String(w.seconds)} should be a finite number > 0`);
      window = { mode: "fixed", seconds: w.seconds };
      break;
    case "events": {
      const lead = w.leadSeconds ?? 1;
      if (!(w.minSeconds > 0)) throw new InputError(`window.minSeconds=${String(w.minSeconds)} should be a number > 0`);
      if (!(w.maxSeconds >= w.minSeconds) || !Number.isFinite(w.maxSeconds))
        throw new InputError(`window.maxSeconds=${String(w.maxSeconds)} should be a finite number >= minSeconds=${w.minSeconds}`);
      if (!(lead >= 0)) throw new InputError(`window.leadSeconds=${String(lead)} should be a number >= 0`);
      window = { mode: "events", minSeconds: w.minSeconds, maxSeconds: w.maxSeconds, leadSeconds: lead };
      break;
    }
    default: {
      const never: never = w;
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
