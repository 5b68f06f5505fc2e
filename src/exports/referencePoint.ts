/**
 * Where a written vehicle position sits on the vehicle. roadsieve's tracks hold the centre of the
 * vehicle's box; OpenSCENARIO positions an entity by its reference point, and the entity's
 * BoundingBox/Center gives the box centre in the entity's own frame (x forward, y left) relative to
 * that point (ASAM OpenSCENARIO 1.2, BoundingBox: "Represents the geometrical center of the bounding
 * box expressed in coordinates that refer to the coordinate system of the entity").
 *
 * We declare the reference point at the middle of the rear axle, the usual choice for vehicles in
 * OpenSCENARIO (common practice), with the rear axle at 20 % of the length from the rear: the box
 * centre is then 0.3 × length ahead of the reference point. Every written position is the centre
 * moved back by that offset along the heading; the player moves it forward again.
 */

/** Rear overhang as a share of the vehicle length (common practice for passenger cars; used for all kinds). */
export const REAR_AXLE_FROM_REAR = 0.2;

/** Box centre ahead of the reference point (m) for a vehicle of this length. */
export function centreOffset(length: number): number {
  return (0.5 - REAR_AXLE_FROM_REAR) * length;
}

/** Reference point (rear-axle middle) of a vehicle whose box centre is (x, y) at heading h (rad). */
export function centreToReference(x: number, y: number, h: number, length: number): { x: number; y: number } {
  const d = centreOffset(length);
  return { x: x - d * Math.cos(h), y: y - d * Math.sin(h) };
}

/**
 * Box centre from a reference-point position and the declared BoundingBox/Center (cx forward, cy left,
 * in the entity frame).
 */
export function referenceToCentre(x: number, y: number, h: number, cx: number, cy: number): { x: number; y: number } {
  const c = Math.cos(h);
  const s = Math.sin(h);
  return { x: x + cx * c - cy * s, y: y + cx * s + cy * c };
}
