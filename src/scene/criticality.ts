/**
 * Surrogate safety measures between a follower and its leader, as pure functions of the
 * bumper-to-bumper gap (m) and the two speeds (m/s). Definitions as in the surrogate-safety
 * literature:
 * - time headway THW = gap / v_follower (the time the follower needs to reach the leader's rear
 *   position at its current speed);
 * - time-to-collision TTC = gap / (v_follower − v_leader), defined only while closing
 *   (Hayward 1972, "Near-miss determination through use of a scale of danger");
 * - deceleration rate to avoid a crash DRAC = (v_follower − v_leader)² / (2 · gap), the constant
 *   deceleration the follower needs to match the leader's speed exactly at the leader's rear
 *   (Archer 2005, "Indicators for traffic safety assessment and prediction", KTH; after Almqvist,
 *   Hydén & Risser 1991).
 * Check values: gap 30 m, follower 30 m/s, leader 20 m/s → TTC 3.0 s, THW 1.0 s, DRAC 1.667 m/s².
 */

/** Time headway (s): gap / vFollower; Infinity when the follower stands still or moves backwards. */
export function timeHeadway(gap: number, vFollower: number): number {
  if (!(vFollower > 0)) return Infinity;
  return Math.max(gap, 0) / vFollower;
}

/** Time-to-collision (s) while closing (vFollower > vLeader); Infinity otherwise. 0 for a gap <= 0. */
export function timeToCollision(gap: number, vFollower: number, vLeader: number): number {
  const closing = vFollower - vLeader;
  if (!(closing > 0)) return Infinity;
  return Math.max(gap, 0) / closing;
}

/**
 * Deceleration rate to avoid a crash (m/s², positive) while closing; 0 when not closing. A gap <= 0
 * while closing gives Infinity (no finite deceleration avoids the contact).
 */
export function drac(gap: number, vFollower: number, vLeader: number): number {
  const closing = vFollower - vLeader;
  if (!(closing > 0)) return 0;
  if (!(gap > 0)) return Infinity;
  return (closing * closing) / (2 * gap);
}
