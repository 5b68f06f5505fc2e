import { TEMPLATE_CAR, TEMPLATE_LEAD_S } from "../exports/logicalTemplateXml.js";
import type { ChainView } from "./egoSeries.js";

/**
 * Re-measure a template's input parameters from a re-simulated run, through roadsieve's chain
 * (maneuvers and scenes of the run read back from its tracks file). This is a local measurement of the
 * template inputs for the fidelity check; the plan's own per-scenario parameter measurement (the
 * "logical" work's measureScenarioParameters) can replace it at integration. Entities are found by
 * track id (`ids`, from the run).
 */
export function measureTemplateParameters(view: ChainView, classId: string, ids: Record<string, number>): Record<string, number | null> {
  const fr = view.recording.road.frameRate;
  const idx = (name: string): number => view.recording.tracks.findIndex((t) => t.id === ids[name]);
  const k = idx("ego");
  const out: Record<string, number | null> = {};
  if (k < 0) return out;
  const ego = view.maneuvers[k]!;
  const egoT = view.recording.tracks[k]!;
  const frameAt = (trackIdx: number, t: number): number => {
    const tt = view.recording.tracks[trackIdx]!.t;
    let best = 0;
    for (let i = 0; i < tt.length; i++) if (Math.abs(tt[i]! - t) < Math.abs(tt[best]! - t)) best = i;
    return best;
  };
  // Speeds at the start: the median over the first second (the templates start in steady state).
  const startSpeed = (trackIdx: number): number => {
    const v = [...view.maneuvers[trackIdx]!.motion.vx.subarray(0, Math.round(fr))].sort((a, b) => a - b);
    return v[v.length >> 1]!;
  };
  out.egoSpeed = startSpeed(k);
  const L = TEMPLATE_CAR.length;
  const gapBetween = (a: number, ia: number, b: number, ib: number): number => view.maneuvers[b]!.motion.x[ib]! - view.maneuvers[a]!.motion.x[ia]! - L;
  const laneChangeOf = (trackIdx: number) => view.maneuvers[trackIdx]!.segments.find((s) => s.maneuver === "lane-change-left" || s.maneuver === "lane-change-right") ?? null;
  switch (classId) {
    case "following":
    case "leader-braking": {
      const l = idx("leader");
      if (l < 0) break;
      out.leaderSpeed = startSpeed(l);
      const tGap = classId === "leader-braking" ? egoT.t[0]! + TEMPLATE_LEAD_S : egoT.t[0]!;
      out.gap = gapBetween(k, frameAt(k, tGap), l, frameAt(l, tGap));
      if (classId === "leader-braking") {
        // Braking at a constant rate: the peak of the chain's smoothed deceleration is the rate (when the
        // braking lasts about as long as the acceleration window or longer), and the speed drop from the
        // first to the last second over that rate is its duration.
        let peak = 0;
        for (const a of view.maneuvers[l]!.motion.ax) if (-a > peak) peak = -a;
        out.leaderDecel = peak;
        const vx = view.maneuvers[l]!.motion.vx;
        const tail = [...vx.subarray(Math.max(0, vx.length - Math.round(fr)))].sort((a, b) => a - b);
        out.brakeDuration = peak > 0 ? (out.leaderSpeed - tail[tail.length >> 1]!) / peak : null;
      }
      break;
    }
    case "cut-in": {
      const c = idx("cutter");
      const seg = c >= 0 ? laneChangeOf(c) : null;
      if (!seg?.laneChange) break;
      const cf = seg.laneChange.crossFrame;
      const ef = frameAt(k, view.recording.tracks[c]!.t[cf]!);
      out.cutterRelSpeed = view.maneuvers[c]!.motion.vx[cf]! - ego.motion.vx[ef]!;
      out.gapAtCrossing = gapBetween(k, ef, c, cf);
      out.laneChangeDuration = seg.duration;
      break;
    }
    case "lane-change-left":
    case "lane-change-right": {
      const seg = laneChangeOf(k);
      out.laneChangeDuration = seg ? seg.duration : null;
      const i0 = seg ? seg.startFrame : 0;
      const a = idx("targetLeader");
      const b = idx("targetFollower");
      out.targetGapAhead = a >= 0 ? gapBetween(k, i0, a, frameAt(a, egoT.t[i0]!)) : null;
      out.targetGapBehind = b >= 0 ? gapBetween(b, frameAt(b, egoT.t[i0]!), k, i0) : null;
      break;
    }
    case "overtaken": {
      const o = idx("overtaker");
      if (o < 0) break;
      out.overtakerRelSpeed = startSpeed(o) - out.egoSpeed;
      // Lateral centre-to-centre distance when the overtaker is alongside (centres within one length).
      const d: number[] = [];
      const ot = view.recording.tracks[o]!;
      for (let i = 0; i < ot.t.length; i++) {
        const j = frameAt(k, ot.t[i]!);
        if (Math.abs(view.maneuvers[o]!.motion.x[i]! - ego.motion.x[j]!) < L) d.push(Math.abs(view.maneuvers[o]!.motion.y[i]! - ego.motion.y[j]!));
      }
      d.sort((x, y) => x - y);
      out.lateralDistance = d.length ? d[d.length >> 1]! : null;
      break;
    }
  }
  return out;
}

/**
 * Tolerances of the template fidelity check (ours, chosen as what a test engineer would accept as
 * "the requested value"): speeds 0.3 m/s, gaps 0.5 m or 3 %, decelerations 10 %, durations 0.5 s or
 * 15 %, lateral distance 0.1 m. Returns the tolerance for a parameter and value.
 */
export function templateTolerance(name: string, requested: number): number {
  if (/Speed$/.test(name)) return 0.3;
  if (/[Gg]ap/.test(name) || name === "gapAtCrossing") return Math.max(0.5, 0.03 * Math.abs(requested));
  if (/Decel$/.test(name)) return 0.1 * Math.abs(requested);
  if (/Duration$/.test(name)) return Math.max(0.5, 0.15 * Math.abs(requested));
  if (name === "lateralDistance") return 0.1;
  return 0.05 * Math.abs(requested);
}
