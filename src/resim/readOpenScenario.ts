import { readFile } from "node:fs/promises";
import { dirname, resolve } from "node:path";
import { InputError } from "../core/errors.js";
import { evaluateValue } from "./expression.js";
import { parseXml, xmlInputError, type XmlElement } from "./parseXml.js";
import { readOpenDrive, type PlayerRoad } from "./readOpenDrive.js";
import type { ActDef, ActionDef, ConditionDef, Dynamics, EntityDef, EventDef, PositionDef, Rule, ScenarioModel, TriggerDef } from "./scenarioModel.js";

const RULES: readonly Rule[] = ["greaterThan", "lessThan", "equalTo", "greaterOrEqual", "lessOrEqual", "notEqualTo"];

/** Reading context: file, resolved parameters, and strict element checks. */
class Ctx {
  constructor(
    readonly file: string,
    readonly params: Map<string, string>,
  ) {}
  err(el: XmlElement, problem: string): InputError {
    return xmlInputError(problem, this.file, el.line, el.name);
  }
  only(el: XmlElement, allowed: readonly string[]): void {
    for (const c of el.children) if (!allowed.includes(c.name)) throw this.err(c, `element not supported by roadsieve's player (inside <${el.name}>; supported there: ${allowed.join(", ") || "none"})`);
  }
  one(el: XmlElement, name: string): XmlElement {
    const c = el.children.filter((k) => k.name === name);
    if (c.length !== 1) throw this.err(el, `expected exactly one <${name}>, found ${c.length}`);
    return c[0]!;
  }
  opt(el: XmlElement, name: string): XmlElement | null {
    const c = el.children.filter((k) => k.name === name);
    if (c.length > 1) throw this.err(el, `expected at most one <${name}>, found ${c.length}`);
    return c[0] ?? null;
  }
  /** The single child of a choice element. */
  choice(el: XmlElement, allowed: readonly string[]): XmlElement {
    this.only(el, allowed);
    if (el.children.length !== 1) throw this.err(el, `expected exactly one of ${allowed.join(", ")}, found ${el.children.length}`);
    return el.children[0]!;
  }
  str(el: XmlElement, name: string, fallback?: string): string {
    const raw = el.attrs[name];
    if (raw === undefined) {
      if (fallback !== undefined) return fallback;
      throw this.err(el, `attribute ${name} is missing`);
    }
    const r = evaluateValue(raw, this.params);
    if ("error" in r) throw this.err(el, `attribute ${name}: ${r.error}`);
    return r.value;
  }
  num(el: XmlElement, name: string, fallback?: number): number {
    if (el.attrs[name] === undefined && fallback !== undefined) return fallback;
    const s = this.str(el, name);
    const v = Number(s);
    if (s.trim() === "" || !Number.isFinite(v)) throw this.err(el, `attribute ${name}="${s}" should be a number`);
    return v;
  }
  bool(el: XmlElement, name: string, fallback?: boolean): boolean {
    if (el.attrs[name] === undefined && fallback !== undefined) return fallback;
    const s = this.str(el, name);
    if (s !== "true" && s !== "false") throw this.err(el, `attribute ${name}="${s}" should be true or false`);
    return s === "true";
  }
  oneOf<T extends string>(el: XmlElement, name: string, allowed: readonly T[], fallback?: T): T {
    const s = el.attrs[name] === undefined && fallback !== undefined ? fallback : this.str(el, name);
    if (!(allowed as readonly string[]).includes(s)) throw this.err(el, `attribute ${name}="${s}" is not supported (supported: ${allowed.join(", ")})`);
    return s as T;
  }
}

function properties(c: Ctx, el: XmlElement | null): Record<string, string> {
  const out: Record<string, string> = {};
  if (!el) return out;
  c.only(el, ["Property"]);
  for (const p of el.children) out[c.str(p, "name")] = c.str(p, "value");
  return out;
}

function position(c: Ctx, el: XmlElement): PositionDef {
  const p = c.choice(el, ["WorldPosition", "LanePosition", "RelativeLanePosition"]);
  c.only(p, []);
  if (p.name === "WorldPosition") return { type: "world", x: c.num(p, "x"), y: c.num(p, "y"), h: c.num(p, "h", 0) };
  if (p.name === "LanePosition") {
    const laneId = Number(c.str(p, "laneId"));
    if (!Number.isInteger(laneId)) throw c.err(p, `laneId should be an integer`);
    return { type: "lane", laneId, s: c.num(p, "s"), offset: c.num(p, "offset", 0) };
  }
  if (p.attrs.dsLane !== undefined) throw c.err(p, `dsLane is not supported (use ds)`);
  return { type: "relativeLane", entity: c.str(p, "entityRef"), dLane: c.num(p, "dLane"), ds: c.num(p, "ds", 0), offset: c.num(p, "offset", 0) };
}

function dynamics(c: Ctx, el: XmlElement): Dynamics {
  c.only(el, []);
  if (el.attrs.followingMode !== undefined) throw c.err(el, `followingMode is not supported`);
  return {
    shape: c.oneOf(el, "dynamicsShape", ["step", "linear", "cubic", "sinusoidal"] as const),
    dimension: c.oneOf(el, "dynamicsDimension", ["time", "rate", "distance"] as const),
    value: c.num(el, "value"),
  };
}

/** A PrivateAction for one entity. */
function privateAction(c: Ctx, el: XmlElement, entity: string): ActionDef {
  const a = c.choice(el, ["TeleportAction", "LongitudinalAction", "LateralAction", "RoutingAction"]);
  if (a.name === "TeleportAction") {
    c.only(a, ["Position"]);
    return { kind: "teleport", entity, position: position(c, c.one(a, "Position")) };
  }
  if (a.name === "LongitudinalAction") {
    const sp = c.choice(a, ["SpeedAction"]);
    c.only(sp, ["SpeedActionDynamics", "SpeedActionTarget"]);
    const dyn = dynamics(c, c.one(sp, "SpeedActionDynamics"));
    const t = c.choice(c.one(sp, "SpeedActionTarget"), ["AbsoluteTargetSpeed", "RelativeTargetSpeed"]);
    c.only(t, []);
    if (t.name === "AbsoluteTargetSpeed") return { kind: "speed", entity, dynamics: dyn, target: { type: "absolute", value: c.num(t, "value") } };
    if (c.bool(t, "continuous")) throw c.err(t, `continuous="true" is not supported`);
    return {
      kind: "speed",
      entity,
      dynamics: dyn,
      target: { type: "relative", entity: c.str(t, "entityRef"), value: c.num(t, "value"), valueType: c.oneOf(t, "speedTargetValueType", ["delta", "factor"] as const) },
    };
  }
  if (a.name === "LateralAction") {
    const lc = c.choice(a, ["LaneChangeAction"]);
    c.only(lc, ["LaneChangeActionDynamics", "LaneChangeTarget"]);
    const dyn = dynamics(c, c.one(lc, "LaneChangeActionDynamics"));
    if (dyn.dimension === "rate") throw c.err(c.one(lc, "LaneChangeActionDynamics"), `dynamicsDimension="rate" is not supported for lane changes (time or distance)`);
    const t = c.choice(c.one(lc, "LaneChangeTarget"), ["RelativeTargetLane", "AbsoluteTargetLane"]);
    c.only(t, []);
    const offset = c.num(lc, "targetLaneOffset", 0);
    if (t.name === "RelativeTargetLane") return { kind: "laneChange", entity, dynamics: dyn, target: { type: "relative", entity: c.str(t, "entityRef"), value: c.num(t, "value") }, offset };
    return { kind: "laneChange", entity, dynamics: dyn, target: { type: "absolute", laneId: c.num(t, "value") }, offset };
  }
  const fta = c.choice(a, ["FollowTrajectoryAction"]);
  c.only(fta, ["TrajectoryRef", "TimeReference", "TrajectoryFollowingMode"]);
  if (fta.attrs.initialDistanceOffset !== undefined) throw c.err(fta, `initialDistanceOffset is not supported`);
  const mode = c.one(fta, "TrajectoryFollowingMode");
  c.only(mode, []);
  c.oneOf(mode, "followingMode", ["position"] as const);
  const timing = c.choice(c.one(fta, "TimeReference"), ["Timing"]);
  c.only(timing, []);
  c.oneOf(timing, "domainAbsoluteRelative", ["absolute"] as const);
  const traj = c.choice(c.one(fta, "TrajectoryRef"), ["Trajectory"]);
  c.only(traj, ["Shape"]);
  if (c.bool(traj, "closed")) throw c.err(traj, `closed="true" is not supported`);
  const poly = c.choice(c.one(traj, "Shape"), ["Polyline"]);
  c.only(poly, ["Vertex"]);
  const vertices = poly.children.map((v) => {
    c.only(v, ["Position"]);
    return { t: c.num(v, "time"), position: position(c, c.one(v, "Position")) };
  });
  if (vertices.length < 2) throw c.err(poly, `a polyline needs at least 2 vertices`);
  for (let i = 1; i < vertices.length; i++) if (!(vertices[i]!.t > vertices[i - 1]!.t)) throw c.err(poly.children[i]!, `vertex times should increase`);
  return { kind: "trajectory", entity, vertices, offset: c.num(timing, "offset"), scale: c.num(timing, "scale") };
}

function globalAction(c: Ctx, el: XmlElement): ActionDef {
  const ea = c.choice(el, ["EntityAction"]);
  const entity = c.str(ea, "entityRef");
  const k = c.choice(ea, ["AddEntityAction", "DeleteEntityAction"]);
  if (k.name === "DeleteEntityAction") {
    c.only(k, []);
    return { kind: "delete", entity };
  }
  c.only(k, ["Position"]);
  return { kind: "add", entity, position: position(c, c.one(k, "Position")) };
}

function trigger(c: Ctx, el: XmlElement): TriggerDef {
  c.only(el, ["ConditionGroup"]);
  return el.children.map((g) => {
    c.only(g, ["Condition"]);
    if (g.children.length === 0) throw c.err(g, `a ConditionGroup needs at least one Condition`);
    return g.children.map((cond): ConditionDef => {
      const base = { name: c.str(cond, "name"), delay: c.num(cond, "delay"), edge: c.oneOf(cond, "conditionEdge", ["none", "rising", "falling", "risingOrFalling"] as const), line: cond.line };
      if (!(base.delay >= 0)) throw c.err(cond, `delay should be >= 0`);
      const by = c.choice(cond, ["ByValueCondition", "ByEntityCondition"]);
      if (by.name === "ByValueCondition") {
        const st = c.choice(by, ["SimulationTimeCondition"]);
        c.only(st, []);
        return { ...base, kind: "simulationTime", rule: c.oneOf(st, "rule", RULES), value: c.num(st, "value") };
      }
      c.only(by, ["TriggeringEntities", "EntityCondition"]);
      const te = c.one(by, "TriggeringEntities");
      c.only(te, ["EntityRef"]);
      const all = c.oneOf(te, "triggeringEntitiesRule", ["any", "all"] as const) === "all";
      const triggering = te.children.map((r) => c.str(r, "entityRef"));
      if (triggering.length === 0) throw c.err(te, `needs at least one EntityRef`);
      const rd = c.choice(c.one(by, "EntityCondition"), ["RelativeDistanceCondition"]);
      c.only(rd, []);
      if (rd.attrs.coordinateSystem !== undefined) c.oneOf(rd, "coordinateSystem", ["entity", "road", "lane"] as const);
      if (rd.attrs.routingAlgorithm !== undefined) throw c.err(rd, `routingAlgorithm is not supported`);
      return {
        ...base,
        kind: "relativeDistance",
        triggering,
        all,
        entity: c.str(rd, "entityRef"),
        distanceType: c.oneOf(rd, "relativeDistanceType", ["longitudinal", "lateral", "euclidianDistance"] as const),
        freespace: c.bool(rd, "freespace"),
        rule: c.oneOf(rd, "rule", RULES),
        value: c.num(rd, "value"),
      };
    });
  });
}

function entity(c: Ctx, so: XmlElement): EntityDef {
  c.only(so, ["Vehicle", "ObjectController"]);
  const v = c.one(so, "Vehicle");
  c.only(v, ["ParameterDeclarations", "BoundingBox", "Performance", "Axles", "Properties"]);
  const bb = c.one(v, "BoundingBox");
  c.only(bb, ["Center", "Dimensions"]);
  const centre = c.one(bb, "Center");
  const dim = c.one(bb, "Dimensions");
  const cat = c.oneOf(v, "vehicleCategory", ["car", "truck", "motorbike", "van", "bus"] as const);
  let controller: Record<string, string> | null = null;
  const oc = c.opt(so, "ObjectController");
  if (oc) {
    const ctl = c.choice(oc, ["Controller"]);
    c.only(ctl, ["Properties"]);
    controller = properties(c, c.opt(ctl, "Properties"));
  }
  return {
    name: c.str(so, "name"),
    kind: cat === "motorbike" ? "motorcycle" : cat === "truck" || cat === "bus" ? "truck" : "car",
    length: c.num(dim, "length"),
    width: c.num(dim, "width"),
    centreX: c.num(centre, "x"),
    centreY: c.num(centre, "y"),
    properties: properties(c, c.opt(v, "Properties")),
    controller,
  };
}

export interface ReadScenarioOptions {
  /** Parameter values that replace the declared defaults (e.g. one value set of a distribution file). */
  parameters?: Record<string, number | string>;
  /** Frame rate when the file does not carry roadsieve.frameRate_Hz (Hz). */
  frameRate?: number;
}

/**
 * Read an OpenSCENARIO 1.2 file of the subset roadsieve writes, with its OpenDRIVE road. Every
 * element outside the subset, a missing road file, another version or a malformed document is an
 * InputError naming the file, the element and its line.
 */
export async function readOpenScenario(path: string, options: ReadScenarioOptions = {}): Promise<ScenarioModel> {
  let text: string;
  try {
    text = await readFile(path, "utf8");
  } catch (e) {
    throw new InputError(`cannot read the scenario file: ${(e as Error).message}`, { file: path });
  }
  const pre = parseScenarioText(text, path, options);
  const fr = Number(pre.header["roadsieve.frameRate_Hz"] ?? options.frameRate);
  const roadPath = resolve(dirname(path), pre.roadFile);
  let road: PlayerRoad;
  try {
    road = await readOpenDrive(roadPath, fr);
  } catch (e) {
    if (e instanceof InputError && /cannot read the road file/.test(e.message))
      throw xmlInputError(`the road file "${pre.roadFile}" cannot be read (${roadPath})`, path, pre.roadLine, "LogicFile");
    throw e;
  }
  return { ...pre.model, road };
}

/** The scenario without its road (tests and callers that read the road themselves). */
export function parseScenarioText(
  text: string,
  file: string,
  options: ReadScenarioOptions = {},
): { model: Omit<ScenarioModel, "road">; header: Record<string, string>; roadFile: string; roadLine: number } {
  const root = parseXml(text, file);
  const c0 = new Ctx(file, new Map());
  if (root.name !== "OpenSCENARIO") throw c0.err(root, `root element should be <OpenSCENARIO>`);
  const fh = c0.one(root, "FileHeader");
  if (fh.attrs.revMajor !== "1" || fh.attrs.revMinor !== "2")
    throw c0.err(fh, `OpenSCENARIO ${fh.attrs.revMajor ?? "?"}.${fh.attrs.revMinor ?? "?"} is not supported; the player reads OpenSCENARIO 1.2 (what roadsieve writes)`);
  c0.only(fh, ["Properties"]);
  const header = properties(c0, c0.opt(fh, "Properties"));
  c0.only(root, ["FileHeader", "ParameterDeclarations", "CatalogLocations", "RoadNetwork", "Entities", "Storyboard"]);
  const params = new Map<string, string>();
  const pd = c0.opt(root, "ParameterDeclarations");
  if (pd) {
    c0.only(pd, ["ParameterDeclaration"]);
    for (const d of pd.children) {
      c0.only(d, []);
      c0.oneOf(d, "parameterType", ["double", "integer", "string", "boolean", "unsignedInt"] as const);
      params.set(d.attrs.name ?? "", d.attrs.value ?? "");
    }
  }
  for (const [k, v] of Object.entries(options.parameters ?? {})) {
    if (!params.has(k)) throw new InputError(`parameter "${k}" is not declared in the scenario`, { file, value: v });
    params.set(k, String(v));
  }
  const c = new Ctx(file, params);
  const cl = c.one(root, "CatalogLocations");
  c.only(cl, []);
  const rn = c.one(root, "RoadNetwork");
  c.only(rn, ["LogicFile"]);
  const lf = c.opt(rn, "LogicFile");
  if (!lf) throw c.err(rn, `the player needs a road: RoadNetwork/LogicFile with an OpenDRIVE file`);
  const roadFile = c.str(lf, "filepath");
  const ents = c.one(root, "Entities");
  c.only(ents, ["ScenarioObject"]);
  const entities = ents.children.map((so) => entity(c, so));
  const names = new Set(entities.map((e) => e.name));
  const sb = c.one(root, "Storyboard");
  c.only(sb, ["Init", "Story", "StopTrigger"]);
  const init: ActionDef[] = [];
  const ia = c.one(c.one(sb, "Init"), "Actions");
  c.only(c.one(sb, "Init"), ["Actions"]);
  c.only(ia, ["GlobalAction", "Private"]);
  for (const a of ia.children) {
    if (a.name === "GlobalAction") init.push(globalAction(c, a));
    else {
      c.only(a, ["PrivateAction"]);
      const ent = c.str(a, "entityRef");
      for (const pa of a.children) init.push(privateAction(c, pa, ent));
    }
  }
  const acts: ActDef[] = [];
  for (const story of sb.children.filter((k) => k.name === "Story")) {
    c.only(story, ["Act"]);
    for (const act of story.children) {
      c.only(act, ["ManeuverGroup", "StartTrigger"]);
      const events: EventDef[] = [];
      for (const mg of act.children.filter((k) => k.name === "ManeuverGroup")) {
        c.only(mg, ["Actors", "Maneuver"]);
        const actorsEl = c.one(mg, "Actors");
        c.only(actorsEl, ["EntityRef"]);
        if (c.bool(actorsEl, "selectTriggeringEntities")) throw c.err(actorsEl, `selectTriggeringEntities="true" is not supported`);
        const actors = actorsEl.children.map((r) => c.str(r, "entityRef"));
        for (const man of mg.children.filter((k) => k.name === "Maneuver")) {
          c.only(man, ["Event"]);
          for (const ev of man.children) {
            c.only(ev, ["Action", "StartTrigger"]);
            if (ev.attrs.maximumExecutionCount !== undefined && c.num(ev, "maximumExecutionCount") !== 1) throw c.err(ev, `maximumExecutionCount other than 1 is not supported`);
            const actions: ActionDef[] = [];
            for (const ac of ev.children.filter((k) => k.name === "Action")) {
              const inner = c.choice(ac, ["GlobalAction", "PrivateAction"]);
              if (inner.name === "GlobalAction") actions.push(globalAction(c, inner));
              else for (const ent of actors) actions.push(privateAction(c, inner, ent));
            }
            const st = c.opt(ev, "StartTrigger");
            events.push({ name: c.str(ev, "name"), priority: c.oneOf(ev, "priority", ["override", "parallel"] as const), actions, start: st ? trigger(c, st) : null });
          }
        }
      }
      acts.push({ name: c.str(act, "name"), start: trigger(c, c.one(act, "StartTrigger")), events });
    }
  }
  const stop = trigger(c, c.one(sb, "StopTrigger"));
  const sc = stop.length === 1 && stop[0]!.length === 1 ? stop[0]![0]! : null;
  if (!sc || sc.kind !== "simulationTime" || !["greaterThan", "greaterOrEqual"].includes(sc.rule))
    throw c.err(c.one(sb, "StopTrigger"), `the player needs a Storyboard StopTrigger with a single SimulationTimeCondition (greaterThan or greaterOrEqual)`);
  const checkRef = (a: ActionDef): void => {
    const refs = [a.entity];
    if ("position" in a && a.position.type === "relativeLane") refs.push(a.position.entity);
    if (a.kind === "speed" && a.target.type === "relative") refs.push(a.target.entity);
    if (a.kind === "laneChange" && a.target.type === "relative") refs.push(a.target.entity);
    for (const r of refs) if (!names.has(r)) throw new InputError(`an action refers to entity "${r}", which Entities does not declare`, { file });
  };
  init.forEach(checkRef);
  for (const a of acts) for (const e of a.events) e.actions.forEach(checkRef);
  return {
    model: { file, header, parameters: Object.fromEntries(params), roadFile, entities, init, acts, stopAfter: { rule: sc.rule, value: sc.value } },
    header,
    roadFile,
    roadLine: lf.line,
  };
}
