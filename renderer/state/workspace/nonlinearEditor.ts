/**
 * The nonlinear plant's equation editor, in plain TypeScript.
 *
 * - Edits of the tables (states, inputs, disturbances, parameters), the equations and the
 *   operating-point request are document commands on the workspace store (undo, autosave).
 *   An equation is stored exactly as typed, even when it does not parse: nothing typed is lost.
 * - The live check ("nonlinear.check") runs debounced and latest-wins after each change of the
 *   plant; its problems are kept by field with their 1-based column for the caret marker.
 * - "Solve operating point" and "Linearize here" ask the engine; linearizing adds a new
 *   state-space plant `<plant>-lin-<k>` through one undoable command and selects it.
 */
import type { EngineBridge, EquationProblem, LinearizeResult, NonlinearPlantSpec, OperatingPointRequest, OperatingPointResult, PlantSpec, ProjectFile } from "../../../shared-engine/api/contract";
import { parseNumberText } from "./parseMatrixText";
import { editReporting, refitVariants, renameInVariants } from "./variantSignals";
import type { WorkspaceStore } from "./workspaceStore";

type NonlinearModel = Extract<PlantSpec["model"], { type: "nonlinear" }>;
export type NonlinearTable = "states" | "inputs" | "disturbances" | "parameters";
/** Numeric columns of each table ("value" is required, the others optional). */
export const NUMERIC_COLUMNS: Record<NonlinearTable, readonly string[]> = {
  states: ["min", "max", "initial"],
  inputs: ["min", "max", "rateLimit"],
  disturbances: ["nominal"],
  parameters: ["value"],
};

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function nonlinearModelOf(doc: ProjectFile, plantId: string): NonlinearModel {
  const plant = doc.plants.find((p) => p.id === plantId);
  if (!plant) throw new Error(`There is no plant “${plantId}” in this project.`);
  if (plant.model.type !== "nonlinear") throw new Error(`Plant “${plantId}” is not given by nonlinear equations.`);
  return plant.model;
}

function updateModel(doc: ProjectFile, plantId: string, fn: (m: NonlinearModel) => NonlinearModel): ProjectFile {
  const model = nonlinearModelOf(doc, plantId);
  const next = fn(structuredClone(model));
  return { ...doc, plants: doc.plants.map((p) => (p.id === plantId ? { ...p, model: next } : p)) };
}

/** The engine's plant spec: the model without the document's own keys. */
export function plantSpecOf(model: NonlinearModel): NonlinearPlantSpec {
  const { states, inputs, disturbances, parameters, stateEquations, outputs } = model;
  return { states, inputs, disturbances, parameters, stateEquations, outputs };
}

const renameKey = (record: Record<string, number> | undefined, from: string, to: string): Record<string, number> | undefined =>
  record === undefined ? undefined : Object.fromEntries(Object.entries(record).map(([k, v]) => [k === from ? to : k, v]));

// ---- commands -----------------------------------------------------------------------------

export const nonlinearFieldKey = (plantId: string, table: NonlinearTable | "outputs", index: number, column: string): string => `${plantId}:nl:${table}:${index}:${column}`;

/** Renames a row (a state's equation, operating-point entries and the variants' references follow its name). */
export function renameNonlinearRow(store: WorkspaceStore, plantId: string, table: NonlinearTable | "outputs", index: number, text: string): boolean {
  const name = text.trim();
  return store.editText(nonlinearFieldKey(plantId, table, index, "name"), text, `renamed ${table === "outputs" ? "output" : table.slice(0, -1)} ${index + 1} of plant ${plantId} to ${name}`, () => {
    if (!/^[A-Za-z_][A-Za-z0-9_]*$/.test(name)) return { ok: false, error: "A name starts with a letter or _ and has only letters, digits and _ (it is used in the equations)." };
    return {
      ok: true,
      apply: (doc) => {
        const old = (nonlinearModelOf(doc, plantId)[table] as { name: string }[])[index]?.name;
        const renamed = updateModel(doc, plantId, (m) => {
          const rows = m[table] as { name: string }[];
          if (old === undefined) throw new Error(`Row ${index + 1} does not exist.`);
          if (old === name) return m;
          const all = [...m.states, ...m.inputs, ...m.disturbances, ...m.parameters, ...m.outputs].map((r) => r.name);
          if (all.includes(name)) throw new Error(`The name “${name}” is already used in this plant; names must be unique.`);
          rows[index] = { ...rows[index]!, name };
          if (table === "states") {
            m.stateEquations = Object.fromEntries(Object.entries(m.stateEquations).map(([k, v]) => [k === old ? name : k, v]));
            m.operatingPoint = { ...m.operatingPoint, states: renameKey(m.operatingPoint.states, old, name) };
          }
          if (table === "inputs") m.operatingPoint = { ...m.operatingPoint, inputs: renameKey(m.operatingPoint.inputs, old, name) };
          if (table === "disturbances") m.operatingPoint = { ...m.operatingPoint, disturbances: renameKey(m.operatingPoint.disturbances, old, name) };
          if (table === "outputs") m.operatingPoint = { ...m.operatingPoint, outputSetpoints: renameKey(m.operatingPoint.outputSetpoints, old, name) };
          if (table === "states" || table === "inputs") m.operatingPoint.unknowns = m.operatingPoint.unknowns.map((u) => (u === old ? name : u));
          for (const key of Object.keys(m.operatingPoint) as (keyof OperatingPointRequest)[]) if (m.operatingPoint[key] === undefined) delete m.operatingPoint[key];
          return m;
        });
        // Variants of the plant follow too (integral action, disturbance step, nonlinear-check scenario, robustness parameters).
        return old === undefined ? renamed : renameInVariants(renamed, plantId, table, old, name);
      },
    };
  });
}

export function setNonlinearUnit(store: WorkspaceStore, plantId: string, table: NonlinearTable | "outputs", index: number, unit: string): boolean {
  return store.edit(`set the unit of ${table === "outputs" ? "output" : table.slice(0, -1)} ${index + 1} of plant ${plantId} to “${unit.trim()}”`, (doc) =>
    updateModel(doc, plantId, (m) => {
      const rows = m[table] as { unit?: string }[];
      const row = { ...rows[index]! };
      if (unit.trim()) row.unit = unit.trim();
      else delete row.unit;
      rows[index] = row;
      return m;
    }),
  { coalesce: `${plantId}:nl:unit:${table}:${index}` });
}

/** A numeric column; empty text removes an optional value (no bound, no limit). */
export function setNonlinearNumber(store: WorkspaceStore, plantId: string, table: NonlinearTable, index: number, column: string, text: string): boolean {
  if (!NUMERIC_COLUMNS[table].includes(column)) throw new Error(`${table} has no numeric column “${column}”.`);
  return store.editText(nonlinearFieldKey(plantId, table, index, column), text, `set ${column} of ${table.slice(0, -1)} ${index + 1} of plant ${plantId}`, (t) => {
    let value: number | null = null;
    if (t.trim() !== "") {
      const parsed = parseNumberText(t);
      if (!parsed.ok) return { ok: false, error: `This entry ${parsed.error}; the last valid value is still used.` };
      value = parsed.value;
    } else if (column === "value") return { ok: false, error: "A parameter needs a value." };
    if (column === "rateLimit" && value !== null && !(value > 0)) return { ok: false, error: "A rate limit must be positive (units per second); leave it empty for none." };
    return {
      ok: true,
      apply: (doc) =>
        updateModel(doc, plantId, (m) => {
          const rows = m[table] as unknown as Record<string, unknown>[];
          const row = { ...rows[index]! };
          if (value === null) delete row[column];
          else row[column] = value;
          const lo = row.min as number | undefined, hi = row.max as number | undefined;
          if (lo !== undefined && hi !== undefined && !(lo < hi)) throw new Error(`The lower bound (${lo}) must be below the upper bound (${hi}).`);
          rows[index] = row;
          return m;
        }),
    };
  });
}

/** One equation, stored as typed (a syntax error is shown by the live check, never refused). */
export function setEquation(store: WorkspaceStore, plantId: string, target: { state: string } | { output: number }, text: string): boolean {
  const what = "state" in target ? `the equation of ${target.state}'` : `output ${target.output + 1}'s equation`;
  const coalesce = `${plantId}:nl:eq:${"state" in target ? target.state : `y${target.output}`}`;
  return store.edit(`edited ${what} of plant ${plantId}`, (doc) =>
    updateModel(doc, plantId, (m) => {
      if ("state" in target) m.stateEquations = { ...m.stateEquations, [target.state]: text };
      else m.outputs[target.output] = { ...m.outputs[target.output]!, equation: text };
      return m;
    }),
  { coalesce });
}

/** Adds a parameter (name p1, p2, ...; value 1). */
export function addParameter(store: WorkspaceStore, plantId: string): boolean {
  return store.edit(`added a parameter to plant ${plantId}`, (doc) =>
    updateModel(doc, plantId, (m) => {
      const used = new Set([...m.states, ...m.inputs, ...m.disturbances, ...m.parameters, ...m.outputs].map((r) => r.name));
      let k = 1;
      while (used.has(`p${k}`)) k++;
      m.parameters = [...m.parameters, { name: `p${k}`, value: 1 }];
      return m;
    }),
  );
}

/** Removes a parameter; robustness sweeps of the plant's variants drop it (the undo label says so). */
export function removeParameter(store: WorkspaceStore, plantId: string, index: number): boolean {
  return editReporting(store, `removed parameter ${index + 1} of plant ${plantId}`, (doc) => {
    const name = nonlinearModelOf(doc, plantId).parameters[index]?.name;
    const changed = updateModel(doc, plantId, (m) => {
      m.parameters = m.parameters.filter((_, i) => i !== index);
      return m;
    });
    return refitVariants(changed, plantId, (v) => {
      if (!v.robustness || !v.robustness.parameters.some((p) => p.name === name)) return [];
      v.robustness = { ...v.robustness, parameters: v.robustness.parameters.filter((p) => p.name !== name) };
      if (v.robustness.parameters.length === 0) delete v.robustness;
      return [v.robustness ? `the parameter ${name} of the robustness sweep` : `the robustness sweep (${name} was its only parameter)`];
    });
  });
}

/** Operating point: toggles whether a state or input is solved for. */
export function toggleUnknown(store: WorkspaceStore, plantId: string, name: string, unknown: boolean): boolean {
  return store.edit(`${unknown ? "solved for" : "fixed"} ${name} in the operating point of plant ${plantId}`, (doc) =>
    updateModel(doc, plantId, (m) => {
      const rest = m.operatingPoint.unknowns.filter((u) => u !== name);
      m.operatingPoint = { ...m.operatingPoint, unknowns: unknown ? [...rest, name] : rest };
      return m;
    }),
  );
}

export type OperatingValueKind = "states" | "inputs" | "disturbances" | "outputSetpoints";

/** A fixed value / guess / disturbance value / output set-point; empty text removes it (default). */
export function setOperatingValue(store: WorkspaceStore, plantId: string, kind: OperatingValueKind, name: string, text: string): boolean {
  return store.editText(`${plantId}:nl:op:${kind}:${name}`, text, `set ${name} of the operating point of plant ${plantId}`, (t) => {
    let value: number | null = null;
    if (t.trim() !== "") {
      const parsed = parseNumberText(t);
      if (!parsed.ok) return { ok: false, error: `This entry ${parsed.error}; the last valid value is still used.` };
      value = parsed.value;
    }
    return {
      ok: true,
      apply: (doc) =>
        updateModel(doc, plantId, (m) => {
          const record = { ...(m.operatingPoint[kind] ?? {}) };
          if (value === null) delete record[name];
          else record[name] = value;
          m.operatingPoint = { ...m.operatingPoint, [kind]: record };
          if (Object.keys(record).length === 0) delete m.operatingPoint[kind];
          return m;
        }),
    };
  });
}

/** "backlog = 10000, consumers = 40, requested_consumers = 40" (4 significant digits). */
export function describeOperatingPoint(point: LinearizeResult["operatingPoint"]): string {
  const fmt = (x: number) => String(Number(x.toPrecision(4)));
  const parts = [...point.names.states.map((n, i) => `${n} = ${fmt(point.states[i]!)}`), ...point.names.inputs.map((n, i) => `${n} = ${fmt(point.inputs[i]!)}`)];
  return parts.join(", ");
}

/** Adds the linearization as a new state-space plant `<plant>-lin-<k>`; returns its id. */
export function addLinearizedPlant(store: WorkspaceStore, plantId: string, linearized: LinearizeResult): string | null {
  let id: string | null = null;
  const where = describeOperatingPoint(linearized.operatingPoint);
  const ok = store.edit(`linearized plant ${plantId} at ${where}`, (doc) => {
    const source = doc.plants.find((p) => p.id === plantId);
    let k = 1;
    while (doc.plants.some((p) => p.id === `${plantId}-lin-${k}`)) k++;
    id = `${plantId}-lin-${k}`;
    const m = linearized.model;
    const plant: PlantSpec = {
      id,
      name: `${source?.name ?? plantId}, linearized at ${where}`,
      description: `Exact Jacobians of plant ${plantId} at ${where} (deviation variables; equilibrium residual ${linearized.equilibriumResidual.toExponential(2)}).`,
      model: { type: "state-space", A: m.A, B: m.B, C: m.C, D: m.D, F: m.F, E: m.E, sampleTime: null, names: m.names, units: m.units },
    };
    return { ...doc, plants: [...doc.plants, plant] };
  });
  return ok ? id : null;
}

// ---- the editor's engine requests -----------------------------------------------------------

export interface NonlinearEditorState {
  plantId: string;
  check: { status: "idle" | "waiting" | "checking" | "done" | "failed"; ok: boolean; problems: EquationProblem[]; error: string | null; checks: number };
  operatingPoint: { status: "idle" | "solving" | "done" | "failed"; result: OperatingPointResult | null; error: string | null };
  linearize: { status: "idle" | "working" | "done" | "failed"; plantId: string | null; error: string | null };
  /** The plant to show in the editor after "Linearize here" (the new one). */
  selectedPlantId: string;
}

export interface NonlinearEditor {
  getState(): NonlinearEditorState;
  subscribe(listener: () => void): () => void;
  /** Problems of one field ("stateEquations.backlog", "outputs[0].equation"). */
  problemsOf(field: string): EquationProblem[];
  checkNow(): void;
  solveOperatingPoint(): Promise<void>;
  linearizeHere(): Promise<string | null>;
  selectPlant(plantId: string): void;
  dispose(): void;
}

export interface NonlinearEditorDeps {
  store: WorkspaceStore;
  bridge: EngineBridge;
  plantId: string;
  checkDelayMs?: number;
  /** Called with the new plant's id after "Linearize here" (the view shows it). */
  onSelectPlant?: (plantId: string) => void;
}

export function createNonlinearEditor(deps: NonlinearEditorDeps): NonlinearEditor {
  const { store, bridge, plantId } = deps;
  const delay = deps.checkDelayMs ?? 150;
  let state: NonlinearEditorState = {
    plantId,
    check: { status: "idle", ok: true, problems: [], error: null, checks: 0 },
    operatingPoint: { status: "idle", result: null, error: null },
    linearize: { status: "idle", plantId: null, error: null },
    selectedPlantId: plantId,
  };
  const listeners = new Set<() => void>();
  let timer: ReturnType<typeof setTimeout> | null = null;
  let checkController: AbortController | null = null;
  let lastChecked: string | null = null;
  let disposed = false;

  function update(patch: Partial<NonlinearEditorState>): void {
    if (disposed) return;
    state = { ...state, ...patch };
    for (const listener of [...listeners]) listener();
  }

  function currentSpec(): NonlinearPlantSpec | null {
    const doc = store.getState().document;
    const model = doc?.plants.find((p) => p.id === plantId)?.model;
    return model?.type === "nonlinear" ? plantSpecOf(model) : null;
  }
  function currentModel(): NonlinearModel {
    const doc = store.getState().document;
    if (!doc) throw new Error("The project is not open.");
    return nonlinearModelOf(doc, plantId);
  }

  function sendCheck(): void {
    timer = null;
    const spec = currentSpec();
    if (!spec) return;
    lastChecked = JSON.stringify(spec);
    checkController?.abort();
    const controller = new AbortController();
    checkController = controller;
    const checks = state.check.checks + 1;
    update({ check: { ...state.check, status: "checking", checks } });
    bridge.request("nonlinear.check", { plant: spec }, { signal: controller.signal }).then(
      (result) => {
        if (checkController !== controller) return; // superseded: a newer text is being checked
        checkController = null;
        update({ check: { status: "done", ok: result.ok, problems: result.problems, error: null, checks } });
      },
      (error: unknown) => {
        if (checkController !== controller) return;
        checkController = null;
        update({ check: { ...state.check, status: "failed", error: messageOf(error), checks } });
      },
    );
  }

  function schedule(): void {
    const spec = currentSpec();
    if (!spec || JSON.stringify(spec) === lastChecked) return;
    if (timer !== null) clearTimeout(timer);
    checkController?.abort();
    checkController = null;
    if (state.check.status !== "waiting") update({ check: { ...state.check, status: "waiting" } });
    timer = setTimeout(sendCheck, delay);
  }

  const stopWatching = store.subscribe(schedule);
  schedule();

  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    problemsOf: (field) => state.check.problems.filter((p) => p.field === field),
    checkNow() {
      if (timer !== null) clearTimeout(timer);
      lastChecked = null;
      sendCheck();
    },
    async solveOperatingPoint() {
      update({ operatingPoint: { ...state.operatingPoint, status: "solving", error: null } });
      try {
        const m = currentModel();
        const result = await bridge.request("nonlinear.operatingPoint", { plant: plantSpecOf(m), request: m.operatingPoint });
        update({ operatingPoint: { status: "done", result, error: null } });
      } catch (error) {
        update({ operatingPoint: { status: "failed", result: state.operatingPoint.result, error: messageOf(error) } });
      }
    },
    async linearizeHere() {
      update({ linearize: { status: "working", plantId: null, error: null } });
      try {
        const m = currentModel();
        const result = await bridge.request("nonlinear.linearize", { plant: plantSpecOf(m), request: m.operatingPoint });
        const id = addLinearizedPlant(store, plantId, result);
        if (!id) throw new Error(store.getState().editError ?? "The linearized plant could not be added.");
        update({ linearize: { status: "done", plantId: id, error: null }, selectedPlantId: id });
        deps.onSelectPlant?.(id);
        return id;
      } catch (error) {
        update({ linearize: { status: "failed", plantId: null, error: messageOf(error) } });
        return null;
      }
    },
    selectPlant(id) {
      update({ selectedPlantId: id });
    },
    dispose() {
      disposed = true;
      if (timer !== null) clearTimeout(timer);
      checkController?.abort();
      stopWatching();
      listeners.clear();
    },
  };
}
