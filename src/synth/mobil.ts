/**
 * MOBIL lane-change criterion ("Minimizing Overall Braking Induced by Lane changes"; Kesting, Treiber &
 * Helbing, "General lane-changing model MOBIL for car-following models", Transportation Research
 * Record 1999, 2007). Accelerations are those of the car-following model before (a) and after (ã) the
 * prospective change, for the changer c, the new follower n in the target lane and the old follower o.
 */
export interface MobilAccelerations {
  /** Changer now and after the change. With European rules these are the keep-right ("eur") values. */
  c: number;
  cNew: number;
  /** New follower (target lane) now and after the change; 0/0 when there is none. */
  n: number;
  nNew: number;
  /** Old follower (own lane) now and after the change; 0/0 when there is none. */
  o: number;
  oNew: number;
}

export interface MobilParams {
  /** Politeness p. */
  politeness: number;
  /** Threshold Δa_th (m/s²). */
  threshold: number;
  /** Safe braking limit b_safe (m/s², positive). */
  safeDecel: number;
  /** Asymmetric (keep-right) variant when true, symmetric otherwise. */
  keepRight: boolean;
  /** Bias Δa_bias towards the right lane (m/s²), asymmetric variant only. */
  bias: number;
}

export type LaneChangeDirection = "left" | "right";

/**
 * Incentive minus the threshold the criterion compares it with; the change is wanted when this is > 0.
 * Symmetric:   ã_c − a_c + p (ã_n − a_n + ã_o − a_o) − Δa_th.
 * Asymmetric (European rules; passing on the right is forbidden, so a_c/ã_c should be the "eur" values):
 *   to the left:  ã_c − a_c + p (ã_n − a_n) − (Δa_th + Δa_bias)
 *   to the right: ã_c − a_c + p (ã_o − a_o) − (Δa_th − Δa_bias)
 */
export function mobilIncentive(acc: MobilAccelerations, p: MobilParams, direction: LaneChangeDirection): number {
  const own = acc.cNew - acc.c;
  if (!p.keepRight) return own + p.politeness * (acc.nNew - acc.n + acc.oNew - acc.o) - p.threshold;
  switch (direction) {
    case "left":
      return own + p.politeness * (acc.nNew - acc.n) - (p.threshold + p.bias);
    case "right":
      return own + p.politeness * (acc.oNew - acc.o) - (p.threshold - p.bias);
    default: {
      const never: never = direction;
      throw new Error(`unknown direction ${String(never)}`);
    }
  }
}

/** Safety criterion: the new follower (and the changer itself) must not have to brake harder than b_safe. */
export function mobilIsSafe(acc: MobilAccelerations, p: MobilParams): boolean {
  return acc.nNew >= -p.safeDecel && acc.cNew >= -p.safeDecel;
}
