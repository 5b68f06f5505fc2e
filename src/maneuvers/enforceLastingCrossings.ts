/** Parameters of the lasting-crossing rule (docs/maneuvers.md, "Lasting crossings"). */
export interface LastingCrossingRule {
  /** Lane markings (m, right edge first). */
  markings: number[];
  /** How far (m) the smoothed centre must get past the marking it crossed. */
  minExcursion: number;
  /** Samples the vehicle must stay in the new lane when it comes back across the same marking. */
  minDwellSamples: number;
  /**
   * For an episode cut by the start or end of the run (whose excursion may not be observed yet): the
   * mean lateral speed across the marking over that episode (m/s) from which the crossing still counts.
   */
  minCrossingSpeed: number;
}

interface Run {
  lane: number;
  a: number;
  /** Exclusive end. */
  b: number;
}

/**
 * Remove, in place on [s, e), lane episodes that are no lasting crossing of a marking: the vehicle
 * rides on the marking or noise makes the smoothed centre flicker across it. An episode in lane L
 * entered across marking m (from lane P = L ∓ 1) is weak when
 * - it lies between two episodes in lane P (the vehicle came back across m) and the centre got less
 *   than `minExcursion` past m, or stayed fewer than `minDwellSamples` samples;
 * - it is the first or last episode of the run (its other side is not observed), the centre got less
 *   than `minExcursion` past m and its mean lateral speed across m over the episode (from the
 *   episode's first sample to the crossing, or from the crossing to its last) is below
 *   `minCrossingSpeed`: a lane change cut by the track's start or end moves across all the time,
 *   while a vehicle that rides the marking and then drifts off it spends that episode standing.
 * Episodes between two different lanes (passing through a lane in a double lane change) and episodes
 * next to "outside all lanes" (-1) are never weak. Weak episodes are merged into their neighbour's
 * lane, the one with the smallest excursion first, until none is left. Returns the number removed.
 */
export function enforceLastingCrossings(
  lane: Int32Array,
  t: Float64Array,
  y: Float64Array,
  vy: Float64Array,
  s: number,
  e: number,
  rule: LastingCrossingRule,
): number {
  let runs = collect(lane, s, e);
  let removed = 0;
  for (;;) {
    let worst = -1;
    let worstExc = Infinity;
    for (let r = 0; r < runs.length; r++) {
      const exc = weakness(runs, r, t, y, vy, rule);
      if (exc !== undefined && exc < worstExc) {
        worstExc = exc;
        worst = r;
      }
    }
    if (worst < 0) return removed;
    const r = runs[worst]!;
    const into = worst > 0 ? runs[worst - 1]!.lane : runs[worst + 1]!.lane;
    lane.fill(into, r.a, r.b);
    removed++;
    runs = collect(lane, s, e);
  }
}

/** The excursion of run r when it is weak, else undefined. */
function weakness(runs: Run[], r: number, t: Float64Array, y: Float64Array, vy: Float64Array, rule: LastingCrossingRule): number | undefined {
  const run = runs[r]!;
  if (run.lane < 0) return undefined;
  const prev = r > 0 ? runs[r - 1]! : undefined;
  const next = r + 1 < runs.length ? runs[r + 1]! : undefined;
  if (!prev && !next) return undefined;
  if ((prev && prev.lane < 0) || (next && next.lane < 0)) return undefined;
  if (prev && next) {
    if (prev.lane !== next.lane || Math.abs(prev.lane - run.lane) !== 1) return undefined;
    const exc = excursion(run, prev.lane, y, rule.markings);
    if (exc === undefined) return undefined;
    return exc < rule.minExcursion || run.b - run.a < rule.minDwellSamples ? exc : undefined;
  }
  const other = (prev ?? next)!;
  if (Math.abs(other.lane - run.lane) !== 1) return undefined;
  const exc = excursion(run, other.lane, y, rule.markings);
  if (exc === undefined || exc >= rule.minExcursion) return undefined;
  // Mean lateral speed in the direction of the crossing over the episode: into this run when it is
  // the last one (crossing .. last sample), out of it when it is the first (first sample .. crossing).
  const dir = (prev ? run.lane - other.lane : other.lane - run.lane) > 0 ? 1 : -1;
  const i0 = prev ? run.a - 1 : run.a;
  const i1 = prev ? run.b - 1 : run.b;
  const span = t[i1]! - t[i0]!;
  const speed = span > 0 ? (dir * (y[i1]! - y[i0]!)) / span : dir * vy[prev ? run.a : other.a]!;
  return speed < rule.minCrossingSpeed ? exc : undefined;
}

/** Largest distance (m) of the centre past the marking between `from` and the run's lane. */
function excursion(run: Run, from: number, y: Float64Array, markings: number[]): number | undefined {
  const m = markings[Math.max(from, run.lane)];
  if (m === undefined) return undefined;
  const dir = run.lane > from ? 1 : -1;
  let best = -Infinity;
  for (let i = run.a; i < run.b; i++) best = Math.max(best, dir * (y[i]! - m));
  return best;
}

function collect(lane: Int32Array, s: number, e: number): Run[] {
  const out: Run[] = [];
  let a = s;
  for (let i = s + 1; i <= e; i++) {
    if (i === e || lane[i] !== lane[a]) {
      out.push({ lane: lane[a]!, a, b: i });
      a = i;
    }
  }
  return out;
}
