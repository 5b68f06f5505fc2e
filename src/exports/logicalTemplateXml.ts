import { InputError } from "../core/errors.js";
import type { Road } from "../recording/types.js";
import { egoControllerLines, OPENSCENARIO_REV, simulationTimeTrigger, vehicleBody, DEFAULT_THRESHOLDS, type EvaluationThresholds } from "./concreteScenarioXml.js";
import type { LogicalScenarioLike } from "./logicalScenarioShape.js";
import { openDriveLaneId } from "./openDriveXml.js";
import { xmlEscape as esc, xmlNumber as num } from "./xmlText.js";

/** Template vehicles: one passenger-car size for every entity (common practice for logical scenarios). */
export const TEMPLATE_CAR = Object.freeze({ length: 4.5, width: 1.8, height: 1.5 });

/** Time before the event (braking, lane change) starts, so that the chain sees the steady state first (s). */
export const TEMPLATE_LEAD_S = 2;

/** Classes with a template and the parameters each template takes as inputs (CONTRACT.md §1 names). */
export const TEMPLATE_INPUTS: Readonly<Record<string, readonly string[]>> = Object.freeze({
  "free-driving": ["egoSpeed"],
  following: ["egoSpeed", "leaderSpeed", "gap"],
  "leader-braking": ["egoSpeed", "leaderSpeed", "gap", "leaderDecel", "brakeDuration"],
  "cut-in": ["egoSpeed", "cutterRelSpeed", "gapAtCrossing", "laneChangeDuration"],
  "lane-change-left": ["egoSpeed", "laneChangeDuration", "targetGapAhead", "targetGapBehind"],
  "lane-change-right": ["egoSpeed", "laneChangeDuration", "targetGapAhead", "targetGapBehind"],
  overtaken: ["egoSpeed", "overtakerRelSpeed", "lateralDistance"],
});

/** A gap given as null ("no such vehicle") is written as this distance: far outside any interaction (m). */
export const ABSENT_GAP = 1000;

/** Parameter name with its unit ("egoSpeed" + "m/s" → "egoSpeed_mps"); ParameterDeclaration has no unit field. */
export function parameterName(name: string, unit: string): string {
  const u = unit.replace(/\s/g, "");
  const suffix = u === "m/s" ? "mps" : u === "m/s²" || u === "m/s^2" || u === "m/s2" ? "mps2" : u === "" || u === "1" || u === "-" ? "" : u.replace(/[^A-Za-z0-9]/g, "");
  return suffix ? `${name}_${suffix}` : name;
}

/** Default units of the template inputs, when the logical scenario does not list a parameter. */
const UNITS: Readonly<Record<string, string>> = {
  egoSpeed: "m/s",
  leaderSpeed: "m/s",
  gap: "m",
  leaderDecel: "m/s²",
  brakeDuration: "s",
  cutterRelSpeed: "m/s",
  gapAtCrossing: "m",
  laneChangeDuration: "s",
  targetGapAhead: "m",
  targetGapBehind: "m",
  overtakerRelSpeed: "m/s",
  lateralDistance: "m",
};

export interface TemplateOptions {
  /** Length of the run (s); default the representative's window, at least 10 s. */
  duration?: number;
  date?: string;
  thresholds?: EvaluationThresholds;
  /** Path of the OpenDRIVE road as written into RoadNetwork/LogicFile. */
  roadFile: string;
}

export interface TemplateResult {
  xml: string;
  /** Template input → declared parameter name (with unit), and its default value. */
  parameters: { input: string; name: string; unit: string; value: number }[];
  warnings: string[];
}

/**
 * A parameterized logical scenario as an OpenSCENARIO 1.2 template: actions and triggers, not
 * replayed points. The ego (entity under test, with its controller slot and the pass/fail
 * thresholds) starts in a lane of the written road at the declared speed; the other vehicles are
 * placed relative to it (RelativeLanePosition, reference point to reference point, so ds = bumper gap
 * + one car length for equal cars with the rear-axle reference point) and act through speed and
 * lane-change actions whose targets, rates and durations are the declared parameters. Defaults are
 * the representative's values (the median where the representative has none).
 */
export function logicalTemplateXml(ls: LogicalScenarioLike, road: Road, options: TemplateOptions): TemplateResult {
  const inputs = TEMPLATE_INPUTS[ls.classId];
  if (!inputs) throw new InputError(`no template for scenario class "${ls.classId}" (templates: ${Object.keys(TEMPLATE_INPUTS).join(", ")})`, { value: ls.id });
  const warnings: string[] = [];
  const nLanes = road.laneMarkings.length - 1;
  const needsTwo = ls.classId !== "free-driving" && ls.classId !== "following" && ls.classId !== "leader-braking";
  if (needsTwo && nLanes < 2) throw new InputError(`class "${ls.classId}" needs at least two lanes; the road "${road.name}" has ${nLanes}`);
  const params = inputs.map((input) => {
    const p = ls.parameters.find((q) => q.name === input);
    const unit = p?.unit ?? UNITS[input] ?? "";
    const rep = ls.representative.values[input];
    let value = rep ?? p?.p50 ?? null;
    if (value === null || !Number.isFinite(value)) {
      if (/Gap(Ahead|Behind)$/.test(input)) value = ABSENT_GAP;
      else throw new InputError(`logical scenario ${ls.id}: parameter "${input}" has no representative value and no median`, { value: input });
    }
    return { input, name: parameterName(input, unit), unit, value };
  });
  const P = (input: string): string => `$${params.find((p) => p.input === input)!.name}`;
  const L = TEMPLATE_CAR.length;
  const duration = options.duration ?? Math.max(10, ls.representative.tEnd - ls.representative.tStart);
  const thresholds = options.thresholds ?? DEFAULT_THRESHOLDS;
  const date = options.date ?? "1970-01-01T00:00:00";
  const lead = TEMPLATE_LEAD_S;
  // Lanes (OpenDRIVE ids on the written road): the ego drives in the rightmost lane, or one lane further
  // left when the class needs a lane on its right.
  const egoLane = ls.classId === "lane-change-right" ? 1 : 0;
  const egoLaneId = openDriveLaneId(road, egoLane);
  const egoS = 100;
  const entities: { name: string; lines: string[] }[] = [];
  const init: string[] = [];
  const events: { actor: string; name: string; action: string[]; trigger: string[] }[] = [];
  const car = (name: string, isEgo: boolean): string[] => [
    `    <ScenarioObject name="${name}">`,
    ...vehicleBody(`${name}-car`, "car", L, TEMPLATE_CAR.width, TEMPLATE_CAR.height, 0.65, TEMPLATE_CAR.width - 0.2, 70, [["role", isEgo ? "entity under test" : "traffic"]]),
    ...(isEgo ? egoControllerLines(thresholds) : []),
    `    </ScenarioObject>`,
  ];
  const speedInit = (name: string, speed: string): string[] => [
    `          <PrivateAction>`,
    `            <LongitudinalAction>`,
    `              <SpeedAction>`,
    `                <SpeedActionDynamics dynamicsDimension="time" dynamicsShape="step" value="0"/>`,
    `                <SpeedActionTarget>`,
    `                  <AbsoluteTargetSpeed value="${speed}"/>`,
    `                </SpeedActionTarget>`,
    `              </SpeedAction>`,
    `            </LongitudinalAction>`,
    `          </PrivateAction>`,
  ];
  const place = (name: string, position: string, speed: string): void => {
    init.push(`        <Private entityRef="${name}">`, `          <PrivateAction>`, `            <TeleportAction>`, `              <Position>`, `                ${position}`, `              </Position>`, `            </TeleportAction>`, `          </PrivateAction>`, ...speedInit(name, speed), `        </Private>`);
  };
  const rel = (dLane: number, ds: string, offset = "0"): string => `<RelativeLanePosition entityRef="ego" dLane="${dLane}" ds="${ds}" offset="${offset}"/>`;
  // The class parameter laneChangeDuration is the lane change's duration as the detection measures it;
  // its boundary fit includes the half-cosine shape (docs/maneuvers.md, "Boundaries"), which is the
  // OpenSCENARIO sinusoidal shape, so the duration is written as it is.
  const laneChange = (target: string, dir: number, durationParam: string): string[] => laneChangeLines(target, dir, durationParam);
  const laneChangeLines = (target: string, dir: number, duration: string): string[] => [
    `<PrivateAction>`,
    `  <LateralAction>`,
    `    <LaneChangeAction>`,
    `      <LaneChangeActionDynamics dynamicsDimension="time" dynamicsShape="sinusoidal" value="${duration}"/>`,
    `      <LaneChangeTarget>`,
    `        <RelativeTargetLane entityRef="${target}" value="${dir}"/>`,
    `      </LaneChangeTarget>`,
    `    </LaneChangeAction>`,
    `  </LateralAction>`,
    `</PrivateAction>`,
  ];

  entities.push({ name: "ego", lines: car("ego", true) });
  init.push(
    `        <Private entityRef="ego">`,
    `          <PrivateAction>`,
    `            <TeleportAction>`,
    `              <Position>`,
    `                <LanePosition roadId="1" laneId="${egoLaneId}" s="${egoS}" offset="0"/>`,
    `              </Position>`,
    `            </TeleportAction>`,
    `          </PrivateAction>`,
    ...speedInit("ego", P("egoSpeed")),
    `        </Private>`,
  );
  let rule: string | null = null;
  switch (ls.classId) {
    case "free-driving":
      break;
    case "following":
      entities.push({ name: "leader", lines: car("leader", false) });
      // Gap held at t = 0; reference point to reference point = gap + one car length.
      place("leader", rel(0, `\${${P("gap")} + ${num(L)}}`), P("leaderSpeed"));
      break;
    case "leader-braking": {
      entities.push({ name: "leader", lines: car("leader", false) });
      // The gap parameter is the gap when braking starts (after TEMPLATE_LEAD_S at the initial speeds).
      place("leader", rel(0, `\${${P("gap")} + (${P("egoSpeed")} - ${P("leaderSpeed")}) * ${lead} + ${num(L)}}`), P("leaderSpeed"));
      events.push({
        actor: "leader",
        name: "leader-brakes",
        action: [
          `<PrivateAction>`,
          `  <LongitudinalAction>`,
          `    <SpeedAction>`,
          `      <SpeedActionDynamics dynamicsDimension="rate" dynamicsShape="linear" value="${P("leaderDecel")}"/>`,
          `      <SpeedActionTarget>`,
          `        <AbsoluteTargetSpeed value="\${${P("leaderSpeed")} - ${P("leaderDecel")} * ${P("brakeDuration")}}"/>`,
          `      </SpeedActionTarget>`,
          `    </SpeedAction>`,
          `  </LongitudinalAction>`,
          `</PrivateAction>`,
        ],
        trigger: simulationTimeTrigger("StartTrigger", "brake-start", lead, "greaterOrEqual", ""),
      });
      break;
    }
    case "cut-in": {
      entities.push({ name: "cutter", lines: car("cutter", false) });
      // The cutter starts in the lane left of the ego at the ego's speed + cutterRelSpeed and starts its
      // lane change when its bumper gap to the ego reaches gapAtCrossing − cutterRelSpeed · duration / 2
      // (the centre crosses the marking at half the sinusoidal lane change). It starts TEMPLATE_LEAD_S
      // of relative motion away from that distance; the trigger rule follows the sign of the relative
      // speed (closing: lessOrEqual, opening: greaterOrEqual), a declared parameter of its own.
      const trig = `${P("gapAtCrossing")} - ${P("cutterRelSpeed")} * ${P("laneChangeDuration")} / 2`;
      place("cutter", rel(1, `\${${trig} - ${P("cutterRelSpeed")} * ${lead} + ${num(L)}}`), `\${${P("egoSpeed")} + ${P("cutterRelSpeed")}}`);
      rule = (ls.representative.values.cutterRelSpeed ?? 0) < 0 ? "lessOrEqual" : "greaterOrEqual";
      events.push({
        actor: "cutter",
        name: "cutter-changes-lane",
        action: laneChange("ego", 0, P("laneChangeDuration")),
        trigger: [
          `<StartTrigger>`,
          `  <ConditionGroup>`,
          `    <Condition conditionEdge="none" delay="0" name="cut-in-distance">`,
          `      <ByEntityCondition>`,
          `        <TriggeringEntities triggeringEntitiesRule="any">`,
          `          <EntityRef entityRef="cutter"/>`,
          `        </TriggeringEntities>`,
          `        <EntityCondition>`,
          `          <RelativeDistanceCondition entityRef="ego" freespace="true" relativeDistanceType="longitudinal" rule="$cutInTriggerRule" value="\${${trig}}"/>`,
          `        </EntityCondition>`,
          `      </ByEntityCondition>`,
          `    </Condition>`,
          `  </ConditionGroup>`,
          `</StartTrigger>`,
        ],
      });
      break;
    }
    case "lane-change-left":
    case "lane-change-right": {
      const dir = ls.classId === "lane-change-left" ? 1 : -1;
      entities.push({ name: "targetLeader", lines: car("targetLeader", false) }, { name: "targetFollower", lines: car("targetFollower", false) });
      place("targetLeader", rel(dir, `\${${P("targetGapAhead")} + ${num(L)}}`), P("egoSpeed"));
      place("targetFollower", rel(dir, `\${-${P("targetGapBehind")} - ${num(L)}}`), P("egoSpeed"));
      events.push({ actor: "ego", name: "ego-changes-lane", action: laneChange("ego", dir, P("laneChangeDuration")), trigger: simulationTimeTrigger("StartTrigger", "lane-change-start", lead, "greaterOrEqual", "") });
      break;
    }
    case "overtaken": {
      entities.push({ name: "overtaker", lines: car("overtaker", false) });
      // Starts 30 m behind (bumper to bumper) in the lane to the left, offset so that the centre-to-centre
      // lateral distance is lateralDistance, and passes at overtakerRelSpeed.
      const laneWidth = road.laneMarkings[egoLane + 2]! - road.laneMarkings[egoLane + 1]!;
      const ownWidth = road.laneMarkings[egoLane + 1]! - road.laneMarkings[egoLane]!;
      place("overtaker", rel(1, `\${-30 - ${num(L)}}`, `\${${P("lateralDistance")} - ${num((laneWidth + ownWidth) / 2)}}`), `\${${P("egoSpeed")} + ${P("overtakerRelSpeed")}}`);
      break;
    }
  }
  const lines: string[] = [
    `<?xml version="1.0" encoding="UTF-8"?>`,
    `<OpenSCENARIO>`,
    `  <FileHeader author="roadsieve" date="${esc(date)}" description="${esc(`${ls.id}: ${ls.name} (${ls.className}), parameterized template`)}" revMajor="${OPENSCENARIO_REV.major}" revMinor="${OPENSCENARIO_REV.minor}">`,
    `    <Properties>`,
    `      <Property name="roadsieve.kind" value="logical"/>`,
    `      <Property name="roadsieve.logicalScenario" value="${esc(ls.id)}"/>`,
    `      <Property name="roadsieve.class" value="${esc(ls.classId)}"/>`,
    `      <Property name="roadsieve.frameRate_Hz" value="${num(road.frameRate, 6)}"/>`,
    ...params.map((p) => {
      const d = ls.parameters.find((q) => q.name === p.input)?.description ?? p.input;
      return `      <Property name="parameter.${esc(p.name)}" value="${esc(`${d} (${p.unit})`)}"/>`;
    }),
    `    </Properties>`,
    `  </FileHeader>`,
    `  <ParameterDeclarations>`,
    ...params.map((p) => `    <ParameterDeclaration name="${esc(p.name)}" parameterType="double" value="${num(p.value, 6)}"/>`),
    ...(rule ? [`    <ParameterDeclaration name="cutInTriggerRule" parameterType="string" value="${rule}"/>`] : []),
    `  </ParameterDeclarations>`,
    `  <CatalogLocations/>`,
    `  <RoadNetwork>`,
    `    <LogicFile filepath="${esc(options.roadFile)}"/>`,
    `  </RoadNetwork>`,
    `  <Entities>`,
    ...entities.flatMap((e) => e.lines),
    `  </Entities>`,
    `  <Storyboard>`,
    `    <Init>`,
    `      <Actions>`,
    ...init,
    `      </Actions>`,
    `    </Init>`,
  ];
  if (events.length > 0) {
    lines.push(`    <Story name="${esc(ls.id)}">`, `      <Act name="${esc(ls.classId)}">`);
    for (const ev of events)
      lines.push(
        `        <ManeuverGroup maximumExecutionCount="1" name="${ev.actor}-group">`,
        `          <Actors selectTriggeringEntities="false">`,
        `            <EntityRef entityRef="${ev.actor}"/>`,
        `          </Actors>`,
        `          <Maneuver name="${ev.name}">`,
        `            <Event name="${ev.name}" priority="override">`,
        `              <Action name="${ev.name}">`,
        ...ev.action.map((l) => `                ${l}`),
        `              </Action>`,
        ...ev.trigger.map((l) => `              ${l}`),
        `            </Event>`,
        `          </Maneuver>`,
        `        </ManeuverGroup>`,
      );
    lines.push(...simulationTimeTrigger("StartTrigger", "act-start", 0, "greaterOrEqual", "        "), `      </Act>`, `    </Story>`);
  }
  lines.push(...simulationTimeTrigger("StopTrigger", "end", duration, "greaterThan", "    "), `  </Storyboard>`, `</OpenSCENARIO>`);
  return { xml: `${lines.join("\n")}\n`, parameters: params, warnings };
}
