import type { PipelineResult } from "../pipeline/runPipeline.js";
import { CONDITION_FIELDS } from "../recording/conditions.js";
import type { Table } from "./table.js";

/** SQL-friendly column name for a feature name ("ego.speed.mean" → "ego_speed_mean"). */
export function sqlName(name: string): string {
  const s = name.replace(/[^A-Za-z0-9_]+/g, "_").replace(/^_+|_+$/g, "");
  return /^[A-Za-z_]/.test(s) ? s : `f_${s}`;
}

/** Catalogue column of a condition field ("trafficDensity" → "traffic_density"). */
export function conditionColumn(field: string): string {
  return field.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`);
}

const finiteOrNull = (v: number): number | null => (Number.isFinite(v) ? v : null);

/**
 * The catalogue as tables: recordings, scenarios (with cluster, type key and test case), features
 * (one column per named feature), maneuvers (every segment) and test cases. Infinite TTC / THW
 * ("never closing", "no leader") are stored as NULL.
 *
 * Column names follow one rule, shared with plan.csv and the Parquet exports: a column holding a
 * physical quantity ends in its SI unit (_s, _m, _mps, _mps2); km and hours are named by their
 * unit (km, hours, vehicle_km); shares, counts, ids and codes carry no suffix. Feature columns keep
 * their feature names; their units are in the feature_info table.
 */
export function catalogueTables(r: PipelineResult): Table[] {
  const sc = r.scenarios.scenarios;
  const tcOf = new Array<string | null>(sc.length).fill(null);
  for (const t of r.plan.exploration.testCases) tcOf[t.scenarioIndex] = t.id;

  const scenarios: Table = {
    name: "scenarios",
    columns: [
      { name: "idx", type: "INTEGER", values: sc.map((s) => s.index) },
      { name: "id", type: "VARCHAR", values: sc.map((s) => s.id) },
      { name: "recording", type: "VARCHAR", values: sc.map((s) => s.recording) },
      { name: "ego_track", type: "BIGINT", values: sc.map((s) => s.egoTrack) },
      { name: "ego_kind", type: "VARCHAR", values: sc.map((s) => s.egoKind) },
      { name: "window_index", type: "INTEGER", values: sc.map((s) => s.window) },
      { name: "t_start_s", type: "DOUBLE", values: sc.map((s) => s.tStart) },
      { name: "t_end_s", type: "DOUBLE", values: sc.map((s) => s.tEnd) },
      { name: "duration_s", type: "DOUBLE", values: sc.map((s) => s.seconds) },
      { name: "km", type: "DOUBLE", values: sc.map((s) => s.km) },
      { name: "mean_speed_mps", type: "DOUBLE", values: sc.map((s) => s.meanSpeed) },
      { name: "lane_start", type: "INTEGER", values: sc.map((s) => s.laneStart) },
      { name: "lane_end", type: "INTEGER", values: sc.map((s) => s.laneEnd) },
      { name: "lateral", type: "VARCHAR", values: sc.map((s) => s.lateral.join(">")) },
      { name: "longitudinal", type: "VARCHAR", values: sc.map((s) => s.longitudinal.join(">")) },
      { name: "events", type: "VARCHAR", values: sc.map((s) => s.events.map((e) => `${e.kind}@${e.t.toFixed(2)}#${e.other}`).join(" ")) },
      { name: "min_ttc_s", type: "DOUBLE", values: sc.map((s) => finiteOrNull(s.criticality.minTtc)) },
      { name: "min_thw_s", type: "DOUBLE", values: sc.map((s) => finiteOrNull(s.criticality.minThw)) },
      { name: "max_drac_mps2", type: "DOUBLE", values: sc.map((s) => s.criticality.maxDrac) },
      { name: "max_decel_mps2", type: "DOUBLE", values: sc.map((s) => s.criticality.maxDecel) },
      { name: "flags", type: "VARCHAR", values: sc.map((s) => s.criticality.flags.join(" ")) },
      { name: "type_key", type: "VARCHAR", values: r.typeKeys },
      { name: "cluster", type: "INTEGER", values: r.labels },
      { name: "scenario_class", type: "VARCHAR", values: sc.map((s) => s.scenarioClass ?? null) },
      { name: "logical_scenario", type: "VARCHAR", values: r.logicalScenarioOf },
      { name: "parameters", type: "VARCHAR", values: sc.map((s) => (s.parameters ? JSON.stringify(s.parameters) : null)) },
      { name: "kmeans_cluster", type: "INTEGER", values: r.kmeans.labels },
      { name: "dbscan_label", type: "INTEGER", values: r.dbscan ? r.dbscan.labels : sc.map(() => null) },
      { name: "map_x", type: "DOUBLE", values: sc.map((_, i) => r.map.coords.data[2 * i]!) },
      { name: "map_y", type: "DOUBLE", values: sc.map((_, i) => r.map.coords.data[2 * i + 1]!) },
      { name: "test_case", type: "VARCHAR", values: tcOf },
    ],
  };
  const feats = r.embedding.features;
  const used = new Set<string>(["idx"]);
  const featureCols = feats.map((f, j) => {
    let name = sqlName(f.name);
    while (used.has(name)) name = `${name}_`;
    used.add(name);
    const values = new Array<number>(sc.length);
    for (let i = 0; i < sc.length; i++) values[i] = r.embedding.raw.data[i * r.embedding.raw.cols + j]!;
    return { name, type: "DOUBLE" as const, values: values.map(finiteOrNull) };
  });
  const features: Table = { name: "features", columns: [{ name: "idx", type: "INTEGER", values: sc.map((s) => s.index) }, ...featureCols] };
  const featureInfo: Table = {
    name: "feature_info",
    columns: [
      { name: "column_name", type: "VARCHAR", values: featureCols.map((c) => c.name) },
      { name: "feature", type: "VARCHAR", values: feats.map((f) => f.name) },
      { name: "unit", type: "VARCHAR", values: feats.map((f) => f.unit) },
      { name: "feature_group", type: "VARCHAR", values: feats.map((f) => f.group) },
      { name: "meaning", type: "VARCHAR", values: feats.map((f) => f.meaning) },
    ],
  };
  const m = {
    recording: [] as string[],
    track: [] as number[],
    axis: [] as string[],
    maneuver: [] as string[],
    tStart: [] as number[],
    tEnd: [] as number[],
    duration: [] as number[],
    startSpeed: [] as number[],
    endSpeed: [] as number[],
    meanAccel: [] as number[],
    peakAccel: [] as number[],
    displacement: [] as (number | null)[],
    peakLat: [] as (number | null)[],
    tCross: [] as (number | null)[],
    fromLane: [] as (number | null)[],
    toLane: [] as (number | null)[],
    boundaryMethod: [] as (string | null)[],
    flags: [] as string[],
  };
  r.maneuvers.forEach((rec, ri) => {
    const id = r.recordings[ri]!.id;
    for (const tm of rec)
      for (const s of tm.segments) {
        m.recording.push(id);
        m.track.push(tm.trackId);
        m.axis.push(s.axis);
        m.maneuver.push(s.maneuver);
        m.tStart.push(s.tStart);
        m.tEnd.push(s.tEnd);
        m.duration.push(s.duration);
        m.startSpeed.push(s.startSpeed);
        m.endSpeed.push(s.endSpeed);
        m.meanAccel.push(s.meanAccel);
        m.peakAccel.push(s.peakAccel);
        m.displacement.push(s.laneChange ? s.laneChange.displacement : null);
        m.peakLat.push(s.laneChange ? s.laneChange.peakLateralSpeed : null);
        m.tCross.push(s.laneChange ? s.laneChange.tCross : null);
        m.fromLane.push(s.laneChange ? s.laneChange.fromLane : null);
        m.toLane.push(s.laneChange ? s.laneChange.toLane : null);
        m.boundaryMethod.push(s.laneChange ? s.laneChange.boundaryMethod : null);
        m.flags.push(s.flags.join(" "));
      }
  });
  const maneuvers: Table = {
    name: "maneuvers",
    columns: [
      { name: "recording", type: "VARCHAR", values: m.recording },
      { name: "track", type: "BIGINT", values: m.track },
      { name: "axis", type: "VARCHAR", values: m.axis },
      { name: "maneuver", type: "VARCHAR", values: m.maneuver },
      { name: "t_start_s", type: "DOUBLE", values: m.tStart },
      { name: "t_end_s", type: "DOUBLE", values: m.tEnd },
      { name: "duration_s", type: "DOUBLE", values: m.duration },
      { name: "start_speed_mps", type: "DOUBLE", values: m.startSpeed },
      { name: "end_speed_mps", type: "DOUBLE", values: m.endSpeed },
      { name: "mean_accel_mps2", type: "DOUBLE", values: m.meanAccel },
      { name: "peak_accel_mps2", type: "DOUBLE", values: m.peakAccel },
      { name: "lateral_displacement_m", type: "DOUBLE", values: m.displacement },
      { name: "peak_lateral_speed_mps", type: "DOUBLE", values: m.peakLat },
      { name: "t_cross_s", type: "DOUBLE", values: m.tCross },
      { name: "from_lane", type: "INTEGER", values: m.fromLane },
      { name: "to_lane", type: "INTEGER", values: m.toLane },
      { name: "boundary_method", type: "VARCHAR", values: m.boundaryMethod },
      { name: "flags", type: "VARCHAR", values: m.flags },
    ],
  };
  const tc = r.plan.exploration.testCases;
  const testCases: Table = {
    name: "test_cases",
    columns: [
      { name: "id", type: "VARCHAR", values: tc.map((t) => t.id) },
      { name: "role", type: "VARCHAR", values: tc.map((t) => t.role) },
      { name: "scenario_idx", type: "INTEGER", values: tc.map((t) => t.scenarioIndex) },
      { name: "scenario_id", type: "VARCHAR", values: tc.map((t) => t.scenarioId) },
      { name: "cluster", type: "INTEGER", values: tc.map((t) => t.cluster) },
      { name: "type_key", type: "VARCHAR", values: tc.map((t) => t.typeKey) },
      { name: "share", type: "DOUBLE", values: tc.map((t) => t.share) },
      { name: "time_share", type: "DOUBLE", values: tc.map((t) => t.timeShare) },
      { name: "km", type: "DOUBLE", values: tc.map((t) => t.standsFor.km) },
      { name: "hours", type: "DOUBLE", values: tc.map((t) => t.standsFor.hours) },
      { name: "rate_per_1000km", type: "DOUBLE", values: tc.map((t) => t.standsFor.ratePer1000km.rate) },
      { name: "rate_lower", type: "DOUBLE", values: tc.map((t) => t.standsFor.ratePer1000km.lower) },
      { name: "rate_upper", type: "DOUBLE", values: tc.map((t) => t.standsFor.ratePer1000km.upper) },
      { name: "exposure_aid", type: "VARCHAR", values: tc.map((t) => t.standsFor.exposureClass) },
      { name: "members", type: "INTEGER", values: tc.map((t) => t.memberCount) },
      { name: "min_ttc_s", type: "DOUBLE", values: tc.map((t) => t.criticality.minTtc) },
      { name: "min_thw_s", type: "DOUBLE", values: tc.map((t) => t.criticality.minThw) },
      { name: "max_decel_mps2", type: "DOUBLE", values: tc.map((t) => t.criticality.maxDecel) },
      { name: "reasons", type: "VARCHAR", values: tc.map((t) => t.reasons.join("; ")) },
    ],
  };
  const recordings: Table = {
    name: "recordings",
    columns: [
      { name: "id", type: "VARCHAR", values: r.recordings.map((x) => x.id) },
      { name: "source", type: "VARCHAR", values: r.recordings.map((x) => x.source) },
      { name: "sha256", type: "VARCHAR", values: r.recordings.map((x) => x.checksum) },
      { name: "road", type: "VARCHAR", values: r.recordings.map((x) => x.road) },
      { name: "lanes", type: "INTEGER", values: r.recordings.map((x) => x.lanes) },
      { name: "tracks", type: "INTEGER", values: r.recordings.map((x) => x.tracks) },
      { name: "rows", type: "BIGINT", values: r.recordings.map((x) => x.rows) },
      { name: "rejected_tracks", type: "INTEGER", values: r.recordings.map((x) => x.rejected) },
      { name: "scenarios", type: "INTEGER", values: r.recordings.map((x) => x.scenarios) },
      { name: "vehicle_km", type: "DOUBLE", values: r.recordings.map((x) => x.km) },
      { name: "vehicle_hours", type: "DOUBLE", values: r.recordings.map((x) => x.hours) },
      // One column per condition field (snake case), NULL where the recording does not state it.
      ...CONDITION_FIELDS.map((f) => ({ name: conditionColumn(f), type: "VARCHAR" as const, values: r.recordings.map((x) => x.conditions?.[f] ?? null) })),
    ],
  };
  const ls = r.plan.logicalScenarios;
  const logical: Table = {
    name: "logical_scenarios",
    columns: [
      { name: "id", type: "VARCHAR", values: ls.map((l) => l.id) },
      { name: "class", type: "VARCHAR", values: ls.map((l) => l.classId) },
      { name: "name", type: "VARCHAR", values: ls.map((l) => l.name) },
      { name: "scenarios", type: "INTEGER", values: ls.map((l) => l.scenarios) },
      { name: "share", type: "DOUBLE", values: ls.map((l) => l.share) },
      { name: "km", type: "DOUBLE", values: ls.map((l) => l.km) },
      { name: "rate_per_1000km", type: "DOUBLE", values: ls.map((l) => l.ratePer1000km.rate) },
      { name: "representative", type: "VARCHAR", values: ls.map((l) => l.representative.scenarioId) },
      { name: "critical_anchors", type: "INTEGER", values: ls.map((l) => l.criticalAnchors.length) },
      { name: "test_cases", type: "INTEGER", values: ls.map((l) => l.testCases) },
    ],
  };
  const ct = r.plan.testCases;
  const concrete: Table = {
    name: "concrete_test_cases",
    columns: [
      { name: "id", type: "VARCHAR", values: ct.map((t) => t.id) },
      { name: "logical_scenario", type: "VARCHAR", values: ct.map((t) => t.logicalScenario) },
      { name: "kind", type: "VARCHAR", values: ct.map((t) => t.kind) },
      { name: "scenario_id", type: "VARCHAR", values: ct.map((t) => t.scenarioId) },
      { name: "weight", type: "DOUBLE", values: ct.map((t) => t.weight) },
      { name: "parameter_values", type: "VARCHAR", values: ct.map((t) => JSON.stringify(t.values)) },
    ],
  };
  return [recordings, scenarios, features, featureInfo, maneuvers, testCases, logical, concrete];
}
