/**
 * Normalised lateral profiles s(τ), τ ∈ [0, 1], s(0) = 0, s(1) = 1, that a lane change's lateral
 * movement may follow. The detector fits each to the positions and keeps the one with the smallest
 * residual (docs/maneuvers.md, "Boundaries"), so that start and end are not placed by one assumed shape.
 */
export type LaneChangeProfile = "minimum-jerk" | "constant-speed" | "sinusoidal";

export const LANE_CHANGE_PROFILES: readonly LaneChangeProfile[] = ["minimum-jerk", "constant-speed", "sinusoidal"];

/**
 * Minimum-jerk (quintic) profile 10τ³ − 15τ⁴ + 6τ⁵ (Flash & Hogan 1985; the usual lane-change model):
 * zero lateral speed and acceleration at both ends.
 */
export function minimumJerkShape(tau: number): number {
  if (tau <= 0) return 0;
  if (tau >= 1) return 1;
  const t3 = tau * tau * tau;
  return t3 * (10 + tau * (-15 + 6 * tau));
}

/** Constant lateral speed (a ramp): s = τ; the speed jumps at both ends (continuous lane-change models of microscopic simulators). */
export function constantSpeedShape(tau: number): number {
  return tau <= 0 ? 0 : tau >= 1 ? 1 : tau;
}

/**
 * Sinusoidal (cosine) profile (1 − cos πτ)/2: zero lateral speed at both ends but a jump of the
 * lateral acceleration (the half-cosine lane-change path, common practice in path planning).
 */
export function sinusoidalShape(tau: number): number {
  return tau <= 0 ? 0 : tau >= 1 ? 1 : 0.5 * (1 - Math.cos(Math.PI * tau));
}

export function profileShape(p: LaneChangeProfile): (tau: number) => number {
  return p === "minimum-jerk" ? minimumJerkShape : p === "constant-speed" ? constantSpeedShape : sinusoidalShape;
}
