import type { EgoSeries } from "./egoSeries.js";

/**
 * Agreement of a re-simulated run with its source, both measured by roadsieve's own chain. MAPE =
 * mean over the compared frames of |resim − source| / |source| × 100 (%). Gap and THW are compared on
 * frames where both runs see the same same-lane leader; lateral position is measured from the right
 * road edge (so it stays away from zero on the road).
 */
export interface ReplayFidelity {
  frames: number;
  /** Frames with the same leader in both runs / frames with a leader in the source. */
  leaderAgreement: number | null;
  speedMape: number | null;
  /** Mean absolute speed error (m/s): meaningful also where the ego nearly stops. */
  speedMae: number | null;
  /** Lowest source speed in the window (m/s): below a few m/s a percentage error says little. */
  sourceMinSpeed: number | null;
  gapMape: number | null;
  thwMape: number | null;
  lateralMape: number | null;
  minThwSource: number | null;
  minThwResim: number | null;
  /** |minThwResim − minThwSource| (s). */
  minThwDiff: number | null;
}

/**
 * Percentage errors are not meaningful where the source value is near zero (a vehicle coming to a
 * stop): frames with |source| below `floor` are left out of the mean (speed: 1 m/s, gap: 1 m, THW: 0.1 s).
 */
function mape(pairs: Array<[number, number]>, floor: number): number | null {
  let s = 0;
  let n = 0;
  for (const [src, sim] of pairs) {
    if (!Number.isFinite(src) || !Number.isFinite(sim) || Math.abs(src) < floor) continue;
    s += Math.abs(sim - src) / Math.abs(src);
    n++;
  }
  return n > 0 ? (100 * s) / n : null;
}

function finiteMin(a: Float64Array): number | null {
  let m = Infinity;
  for (const v of a) if (v < m) m = v;
  return Number.isFinite(m) ? m : null;
}

export function replayFidelity(source: EgoSeries, resim: EgoSeries): ReplayFidelity {
  const at = new Map<number, number>();
  resim.frame.forEach((f, j) => at.set(f, j));
  const speed: Array<[number, number]> = [];
  const lateral: Array<[number, number]> = [];
  const gap: Array<[number, number]> = [];
  const thw: Array<[number, number]> = [];
  let withLeader = 0;
  let same = 0;
  for (let i = 0; i < source.frame.length; i++) {
    const j = at.get(source.frame[i]!);
    if (j === undefined) continue;
    speed.push([source.speed[i]!, resim.speed[j]!]);
    lateral.push([source.lateral[i]!, resim.lateral[j]!]);
    if (source.leader[i]! >= 0) {
      withLeader++;
      if (source.leader[i] === resim.leader[j]) {
        same++;
        gap.push([source.gap[i]!, resim.gap[j]!]);
        thw.push([source.thw[i]!, resim.thw[j]!]);
      }
    }
  }
  const a = finiteMin(source.thw);
  const b = finiteMin(resim.thw);
  return {
    frames: speed.length,
    leaderAgreement: withLeader > 0 ? same / withLeader : null,
    speedMape: mape(speed, 1),
    speedMae: speed.length > 0 ? speed.reduce((acc, [a, b]) => acc + Math.abs(a - b), 0) / speed.length : null,
    sourceMinSpeed: speed.length > 0 ? Math.min(...speed.map(([a]) => a)) : null,
    gapMape: mape(gap, 1),
    thwMape: mape(thw, 0.1),
    lateralMape: mape(lateral, 0.1),
    minThwSource: a,
    minThwResim: b,
    minThwDiff: a !== null && b !== null ? Math.abs(a - b) : null,
  };
}
