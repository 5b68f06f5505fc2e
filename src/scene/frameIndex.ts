/**
 * All samples of a recording on a common frame clock, grouped per frame and sorted by lane and then
 * by x within each frame (CSR layout, flat typed arrays), so that the vehicles of one lane near a
 * position are found by binary search instead of a scan over all tracks.
 */
export interface FrameIndex {
  /** Frame number of index slot 0 (frame = round(t · frameRate)). */
  firstFrame: number;
  frames: number;
  /** Entries of frame f are [offsets[f − firstFrame], offsets[f − firstFrame + 1]). */
  offsets: Int32Array;
  track: Int32Array;
  sample: Int32Array;
  lane: Int32Array;
  x: Float64Array;
  /** Frame number of every sample, per track. */
  frameOf: Int32Array[];
}

export interface IndexInput {
  t: Float64Array;
  x: Float64Array;
  lane: Int32Array;
}

export function buildFrameIndex(tracks: IndexInput[], frameRate: number): FrameIndex {
  const frameOf: Int32Array[] = [];
  let lo = Infinity;
  let hi = -Infinity;
  for (const tr of tracks) {
    const f = new Int32Array(tr.t.length);
    for (let i = 0; i < f.length; i++) {
      const v = Math.round(tr.t[i]! * frameRate);
      f[i] = v;
      if (v < lo) lo = v;
      if (v > hi) hi = v;
    }
    frameOf.push(f);
  }
  if (!(hi >= lo)) {
    lo = 0;
    hi = -1;
  }
  const frames = hi - lo + 1;
  const offsets = new Int32Array(frames + 1);
  for (let k = 0; k < tracks.length; k++) {
    const f = frameOf[k]!;
    const lane = tracks[k]!.lane;
    for (let i = 0; i < f.length; i++) if (lane[i]! >= 0) offsets[f[i]! - lo + 1]!++;
  }
  for (let f = 0; f < frames; f++) offsets[f + 1]! += offsets[f]!;
  const total = offsets[frames]!;
  const order = new Int32Array(total);
  const trk = new Int32Array(total);
  const smp = new Int32Array(total);
  const fill = offsets.slice(0, frames);
  for (let k = 0; k < tracks.length; k++) {
    const f = frameOf[k]!;
    const lane = tracks[k]!.lane;
    for (let i = 0; i < f.length; i++) {
      if (lane[i]! < 0) continue;
      const p = fill[f[i]! - lo]!++;
      trk[p] = k;
      smp[p] = i;
    }
  }
  // Sort each frame's entries by (lane, x), via a permutation.
  for (let p = 0; p < total; p++) order[p] = p;
  const keyLane = (p: number): number => tracks[trk[p]!]!.lane[smp[p]!]!;
  const keyX = (p: number): number => tracks[trk[p]!]!.x[smp[p]!]!;
  for (let f = 0; f < frames; f++) {
    const a = offsets[f]!;
    const b = offsets[f + 1]!;
    if (b - a > 1)
      order.subarray(a, b).sort((p, q) => keyLane(p) - keyLane(q) || keyX(p) - keyX(q) || trk[p]! - trk[q]!);
  }
  const track = new Int32Array(total);
  const sample = new Int32Array(total);
  const lane = new Int32Array(total);
  const x = new Float64Array(total);
  for (let p = 0; p < total; p++) {
    const q = order[p]!;
    track[p] = trk[q]!;
    sample[p] = smp[q]!;
    lane[p] = keyLane(q);
    x[p] = keyX(q);
  }
  return { firstFrame: lo, frames, offsets, track, sample, lane, x, frameOf };
}

/** Entry range [a, b) of lane `lane` in frame `frame` (empty when the frame is outside the index). */
export function laneRange(ix: FrameIndex, frame: number, lane: number): [number, number] {
  const f = frame - ix.firstFrame;
  if (f < 0 || f >= ix.frames) return [0, 0];
  let a = ix.offsets[f]!;
  let b = ix.offsets[f + 1]!;
  // Lower bound of lane, then upper bound.
  let lo = a;
  let hi = b;
  while (lo < hi) {
    const m = (lo + hi) >> 1;
    if (ix.lane[m]! < lane) lo = m + 1;
    else hi = m;
  }
  a = lo;
  hi = b;
  while (lo < hi) {
    const m = (lo + hi) >> 1;
    if (ix.lane[m]! <= lane) lo = m + 1;
    else hi = m;
  }
  b = lo;
  return [a, b];
}

/** First entry in [a, b) with x > value (b when none). */
export function upperBoundX(ix: FrameIndex, a: number, b: number, value: number): number {
  let lo = a;
  let hi = b;
  while (lo < hi) {
    const m = (lo + hi) >> 1;
    if (ix.x[m]! <= value) lo = m + 1;
    else hi = m;
  }
  return lo;
}
