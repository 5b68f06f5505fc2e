/**
 * Intelligent Driver Model (Treiber, Hennecke & Helbing, "Congested traffic states in empirical
 * observations and microscopic simulations", Phys. Rev. E 62, 2000):
 *   a = a_max [1 − (v/v0)^δ − (s* / s)²],   s* = s0 + v T + v Δv / (2 √(a_max b)),
 * with Δv = v − v_leader (approach rate) and s the bumper-to-bumper gap.
 */
export interface IdmParams {
  /** Desired speed v0 (m/s). */
  desiredSpeed: number;
  /** Desired time gap T (s). */
  timeGap: number;
  /** Minimum standstill gap s0 (m). */
  minGap: number;
  /** Maximum acceleration a_max (m/s²). */
  maxAccel: number;
  /** Comfortable deceleration b (m/s², positive). */
  comfortDecel: number;
  /** Acceleration exponent δ. */
  exponent: number;
}

/** (v/v0)^δ, with the common δ = 4 computed by multiplication (hot path). */
function speedTerm(p: IdmParams, v: number): number {
  const r = v / p.desiredSpeed;
  if (p.exponent === 4) {
    const r2 = r * r;
    return r2 * r2;
  }
  return Math.pow(r, p.exponent);
}

/** Free-road IDM acceleration (no leader). */
export function idmFreeAcceleration(p: IdmParams, v: number): number {
  return p.maxAccel * (1 - speedTerm(p, v));
}

/** Desired dynamic gap s*(v, Δv); the interaction term never lets it drop below s0. */
export function idmDesiredGap(p: IdmParams, v: number, dv: number): number {
  return p.minGap + Math.max(0, v * p.timeGap + (v * dv) / (2 * Math.sqrt(p.maxAccel * p.comfortDecel)));
}

/**
 * IDM acceleration behind a leader at bumper-to-bumper gap `gap` (m) with approach rate dv = v − v_leader.
 * A non-positive gap returns -Infinity so that the caller applies its physical braking limit.
 */
export function idmAcceleration(p: IdmParams, v: number, gap: number, dv: number): number {
  if (gap <= 0) return -Infinity;
  const ratio = idmDesiredGap(p, v, dv) / gap;
  return p.maxAccel * (1 - speedTerm(p, v) - ratio * ratio);
}

/**
 * Equilibrium gap of the IDM at speed v (Treiber et al. 2000): s_e(v) = (s0 + vT) / √(1 − (v/v0)^δ).
 * Infinite at and above the desired speed.
 */
export function idmEquilibriumGap(p: IdmParams, v: number): number {
  const q = 1 - speedTerm(p, v);
  return q <= 0 ? Infinity : (p.minGap + v * p.timeGap) / Math.sqrt(q);
}
