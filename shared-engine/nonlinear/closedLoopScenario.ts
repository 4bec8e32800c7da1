/**
 * The scenario of a closed-loop simulation as events on the exogenous signals (set-point steps,
 * disturbance steps and ramps, sorted by time) and the initial state offset, with every name and
 * number checked.
 */
import { EngineError } from "../errors";
import type { ClosedLoopScenario } from "./simulateClosedLoop";
import type { ScenarioEvent } from "./linearPrediction";
import type { CompiledNonlinearPlant } from "./plant";

/**
 * The events of `scenario` sorted by time, and the initial offset δx(0) (n) by state name.
 * `trackedNames` are the outputs with integral action (a set-point step needs one). Throws
 * "invalid-argument" naming the scenario entry for unknown names, bad kinds, times or sizes.
 */
export function scenarioEvents(scenario: ClosedLoopScenario, trackedNames: readonly string[], plant: CompiledNonlinearPlant): { events: ScenarioEvent[]; offset: Float64Array } {
  const { n } = plant;
  const events: ScenarioEvent[] = [];
  const eventTime = (t: number | undefined, what: string): number => {
    const v = t ?? 0;
    if (typeof v !== "number" || !Number.isFinite(v) || v < 0) throw new EngineError("invalid-argument", `${what}.time must be a finite number ≥ 0 (it is ${v})`, { argument: what });
    return v;
  };
  (scenario.setpointSteps ?? []).forEach((s, k) => {
    const j = trackedNames.indexOf(s.output);
    if (j < 0) throw new EngineError("invalid-argument", `scenario.setpointSteps[${k}]: output '${s.output}' has no integral action, so a set-point step cannot act on it (outputs with integral action: ${trackedNames.join(", ") || "none"})`, { argument: `scenario.setpointSteps[${k}]` });
    const size = checkNumber(s.size, `scenario.setpointSteps[${k}].size`);
    events.push({ time: eventTime(s.time, `scenario.setpointSteps[${k}]`), apply: (e) => { e.dr[j] = e.dr[j]! + size; } });
  });
  (scenario.disturbanceChanges ?? []).forEach((s, k) => {
    const j = plant.names.disturbances.indexOf(s.disturbance);
    if (j < 0) throw new EngineError("invalid-argument", `scenario.disturbanceChanges[${k}]: '${s.disturbance}' is not a declared disturbance`, { argument: `scenario.disturbanceChanges[${k}]` });
    const size = checkNumber(s.size, `scenario.disturbanceChanges[${k}].size`);
    const time = eventTime(s.time, `scenario.disturbanceChanges[${k}]`);
    if (s.kind === "ramp") events.push({ time, apply: (e) => { e.ws[j] = e.ws[j]! + size; } });
    else if (s.kind === "step") events.push({ time, apply: (e) => { e.wv[j] = e.wv[j]! + size; } });
    else throw new EngineError("invalid-argument", `scenario.disturbanceChanges[${k}].kind must be "step" or "ramp"`, { argument: `scenario.disturbanceChanges[${k}].kind` });
  });
  events.sort((a, b) => a.time - b.time);
  const offset = new Float64Array(n);
  for (const [name, value] of Object.entries(scenario.initialOffset ?? {})) {
    const i = plant.names.states.indexOf(name);
    if (i < 0) throw new EngineError("invalid-argument", `scenario.initialOffset.${name}: '${name}' is not a declared state`, { argument: `scenario.initialOffset.${name}` });
    offset[i] = checkNumber(value, `scenario.initialOffset.${name}`);
  }
  return { events, offset };
}

function checkNumber(value: unknown, path: string): number {
  if (typeof value !== "number" || !Number.isFinite(value)) throw new EngineError("invalid-argument", `${path} must be a finite number (it is ${String(value)})`, { argument: path });
  return value;
}
