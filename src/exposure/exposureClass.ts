/**
 * ISO 26262-3 exposure classes as an aid for hazard analysis and risk assessment.
 *
 * The thresholds are quoted FROM MEMORY of ISO 26262-3:2018, Annex B:
 * - Table B.2 (exposure by duration, share of average operating time): E1 not specified,
 *   E2 < 1 %, E3 1 % … 10 %, E4 > 10 %. E0 ("incredible") and E1 are not given by duration.
 * - Table B.3 (exposure by frequency), paraphrased: E1 less often than once a year for the great
 *   majority of drivers, E2 a few times a year for the great majority of drivers, E3 once a month
 *   or more often for an average driver, E4 during almost every drive on average.
 * The tool only offers these readings next to the recorded figures. The class that counts is decided
 * by the responsible safety process (hazard analysis and risk assessment), not by this code.
 */
import { InputError } from "../core/errors.js";

export type DurationClass = "E2" | "E3" | "E4";
export type FrequencyClass = "E1" | "E2" | "E3" | "E4";

export const EXPOSURE_AID_NOTE =
  "aid for hazard analysis only (ISO 26262-3 Annex B thresholds quoted from memory); not a classification decided by this tool";

/** Paraphrased Table B.3 wording per class. */
export const FREQUENCY_WORDING: Readonly<Record<FrequencyClass, string>> = {
  E1: "less often than once a year for the great majority of drivers",
  E2: "a few times a year for the great majority of drivers",
  E3: "once a month or more often for an average driver",
  E4: "during almost every drive on average",
};

/** Exposure class by share of operating time (Table B.2, from memory): E2 < 1 %, E3 1–10 %, E4 > 10 %. */
export function exposureClassByTimeShare(timeShare: number): DurationClass {
  if (!(timeShare >= 0 && timeShare <= 1 + 1e-12)) throw new InputError(`timeShare=${timeShare} should be a fraction in [0, 1]`);
  if (timeShare < 0.01) return "E2";
  if (timeShare <= 0.1) return "E3";
  return "E4";
}

export interface FrequencyBasis {
  /** Probability that one drive contains the situation at least once. */
  probabilityPerDrive: number;
  /** Expected occurrences per drive. */
  occurrencesPerDrive: number;
  /** Drives per year of an average driver, when the caller knows it; enables E1–E3. */
  drivesPerYear?: number;
  /** probabilityPerDrive at or above which the situation counts as "almost every drive" (default 0.9). */
  almostEveryDrive?: number;
}

export interface FrequencyReading {
  class: FrequencyClass | null;
  /** Table B.3 wording of the class, or why no class could be read. */
  wording: string;
  /** How the reading was made, with the numbers. */
  basis: string;
}

/**
 * Frequency reading in the words of Table B.3. "Almost every drive" is read as a per-drive
 * probability of at least `almostEveryDrive` (our reading, default 0.9); E1–E3 need the number of
 * drives a year, turned into expected occurrences a year (≥ 12 → E3, ≥ 1 → E2, < 1 → E1).
 */
export function exposureClassByFrequency(b: FrequencyBasis): FrequencyReading {
  const every = b.almostEveryDrive ?? 0.9;
  const p = b.probabilityPerDrive;
  const pct = (v: number): string => `${(100 * v).toPrecision(3)} %`;
  if (!(p >= 0 && p <= 1)) throw new InputError(`probabilityPerDrive=${p} should be in [0, 1]`);
  if (p >= every)
    return { class: "E4", wording: FREQUENCY_WORDING.E4, basis: `present in ${pct(p)} of drives (>= ${pct(every)})` };
  if (b.drivesPerYear === undefined)
    return {
      class: null,
      wording: "not readable without the number of drives per year",
      basis: `present in ${pct(p)} of drives; expected ${b.occurrencesPerDrive.toPrecision(3)} occurrences per drive`,
    };
  const perYear = b.occurrencesPerDrive * b.drivesPerYear;
  const cls: FrequencyClass = perYear >= 12 ? "E3" : perYear >= 1 ? "E2" : "E1";
  return {
    class: cls,
    wording: FREQUENCY_WORDING[cls],
    basis: `about ${perYear.toPrecision(3)} occurrences a year at ${b.drivesPerYear} drives a year`,
  };
}
