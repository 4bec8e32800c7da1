import { afterEach, describe, expect, it } from "vitest";
import { createNonlinearEditor, nonlinearModelOf, renameNonlinearRow, setEquation, setNonlinearNumber, setOperatingValue, toggleUnknown, type NonlinearEditor, type WorkspaceStore } from "../../../../renderer/state/workspace";
import { expectMatrixClose, expectRelativeClose } from "../../../helpers/assertions";
import { inProcessBridge, openDemoStore, waitFor } from "./nonlinearTestSupport";

// The demo plant (assets/examples/queue-backlog.loopwright.json, invented values):
// q' = λ − c·μ·q/(K + q), c' = (u − c)/τ, y = q; λ = 2000, μ = 60, K = 2000, τ = 20.
const LAMBDA = 2000, MU = 60, K = 2000, TAU = 20, Q0 = 10_000;
// Equilibrium with q fixed, c and u unknown: closed form c = u = λ(K + q)/(μq) (hand derivation,
// as in test/engine/project/nonlinearPipeline.test.ts).
const C0 = (LAMBDA * (K + Q0)) / (MU * Q0);

let store: WorkspaceStore | null = null;
let editor: NonlinearEditor | null = null;
afterEach(() => {
  editor?.dispose();
  store?.dispose();
  editor = null;
  store = null;
});

async function open() {
  const bridge = inProcessBridge();
  store = await openDemoStore(bridge);
  let selected: string | null = null;
  editor = createNonlinearEditor({ store, bridge, plantId: "queue", checkDelayMs: 5, onSelectPlant: (id) => (selected = id) });
  await waitFor(() => editor!.getState().check.status === "done");
  return { store, editor, bridge, selected: () => selected };
}

describe("nonlinear equation editor", () => {
  it("reports no problem for the demo's equations", async () => {
    const { editor } = await open();
    expect(editor.getState().check.ok).toBe(true);
    expect(editor.getState().check.problems).toEqual([]);
  });

  it("puts a syntax error at its column in the state, keeps the typed text, and clears it when fixed", async () => {
    const { store, editor } = await open();
    const broken = "arrival_rate - * consumers*mu*backlog/(K + backlog)";
    expect(setEquation(store, "queue", { state: "backlog" }, broken)).toBe(true);
    await waitFor(() => editor.getState().check.status === "done" && !editor.getState().check.ok);
    const [problem] = editor.problemsOf("stateEquations.backlog");
    // The stray operator is the first character the grammar cannot accept: 1-based column of "*".
    expect(problem!.column).toBe(broken.indexOf("*") + 1);
    expect(problem!.message.length).toBeGreaterThan(10);
    // Nothing typed is lost: the document holds the text as typed.
    expect(nonlinearModelOf(store.getState().document!, "queue").stateEquations.backlog).toBe(broken);
    setEquation(store, "queue", { state: "backlog" }, "arrival_rate - consumers*mu*backlog/(K + backlog)");
    await waitFor(() => editor.getState().check.status === "done" && editor.getState().check.ok);
    expect(editor.problemsOf("stateEquations.backlog")).toEqual([]);
  });

  it("marks an undeclared name in an output equation at its first use", async () => {
    const { store, editor } = await open();
    const text = "2*backlog + lag";
    setEquation(store, "queue", { output: 0 }, text);
    await waitFor(() => editor.getState().check.status === "done" && !editor.getState().check.ok);
    const [problem] = editor.problemsOf("outputs[0].equation");
    expect(problem!.column).toBe(text.indexOf("lag") + 1);
    expect(problem!.message).toContain("lag");
  });

  it("only the newest text's check result is shown when edits come faster than checks", async () => {
    const { store, editor } = await open();
    for (const text of ["arrival_rate -", "arrival_rate - (", "arrival_rate - consumers*mu*backlog/(K + backlog)"]) setEquation(store, "queue", { state: "backlog" }, text);
    await waitFor(() => editor.getState().check.status === "done");
    expect(editor.getState().check.ok).toBe(true);
  });

  it("solves the queue's operating point at c = u = λ(K+q)/(μq) = 40 with a small residual", async () => {
    const { editor } = await open();
    await editor.solveOperatingPoint();
    const s = editor.getState().operatingPoint;
    expect(s.status).toBe("done");
    const point = s.result!.operatingPoint;
    expect(C0).toBe(40);
    expectRelativeClose(point.states[point.names.states.indexOf("consumers")]!, C0, 1e-9, "consumers");
    expectRelativeClose(point.inputs[0]!, C0, 1e-9, "requested_consumers");
    expect(point.states[0]).toBe(Q0);
    expect(s.result!.residual).toBeLessThan(1e-8);
    expect(s.result!.iterations).toBeGreaterThan(0);
  });

  it("shows the specific error when the operating point is not square", async () => {
    const { store, editor } = await open();
    toggleUnknown(store, "queue", "backlog", true);
    await editor.solveOperatingPoint();
    expect(editor.getState().operatingPoint.status).toBe("failed");
    expect(editor.getState().operatingPoint.error).toMatch(/unknown/i);
  });

  it("linearizes at the point into a new selected plant whose A is the hand-derived Jacobian, and undo removes it", async () => {
    const { store, editor, selected } = await open();
    const plantsBefore = store.getState().document!.plants.length;
    const id = await editor.linearizeHere();
    expect(id).toBe("queue-lin-1");
    expect(selected()).toBe("queue-lin-1");
    expect(editor.getState().selectedPlantId).toBe("queue-lin-1");
    const plant = store.getState().document!.plants.find((p) => p.id === id)!;
    expect(plant.name).toContain("consumers = 40");
    if (plant.model.type !== "state-space") throw new Error("expected a state-space plant");
    // Hand-derived Jacobian at q = 10000, c = 40: ∂q'/∂q = −cμK/(K+q)² = −1/30,
    // ∂q'/∂c = −μq/(K+q) = −50, ∂c'/∂c = −1/τ; B = [0; 1/τ]; F = [1; 0].
    const A = [[-(C0 * MU * K) / (K + Q0) ** 2, -(MU * Q0) / (K + Q0)], [0, -1 / TAU]];
    expectMatrixClose(plant.model.A, A, 1e-9, "A");
    expectMatrixClose(plant.model.B, [[0], [1 / TAU]], 1e-12, "B");
    expect(plant.model.F).toEqual([[1], [0]]);
    expect(store.getState().undoLabel).toMatch(/^linearized plant queue/);
    store.undo();
    expect(store.getState().document!.plants.length).toBe(plantsBefore);
    store.redo();
    expect(store.getState().document!.plants.some((p) => p.id === "queue-lin-1")).toBe(true);
    // A second linearization gets the next free id.
    expect(await editor.linearizeHere()).toBe("queue-lin-2");
  });

  it("renaming a state renames its equation and operating-point entries, and undo restores them", async () => {
    const { store } = await open();
    expect(renameNonlinearRow(store, "queue", "states", 1, "pool")).toBe(true);
    const m = nonlinearModelOf(store.getState().document!, "queue");
    expect(Object.keys(m.stateEquations)).toEqual(["backlog", "pool"]);
    expect(m.operatingPoint.unknowns).toContain("pool");
    expect(m.operatingPoint.states).toHaveProperty("pool");
    store.undo();
    expect(nonlinearModelOf(store.getState().document!, "queue").states[1]!.name).toBe("consumers");
  });

  it("keeps a number that does not parse as a draft with an error and leaves the document's value", async () => {
    const { store } = await open();
    expect(setNonlinearNumber(store, "queue", "parameters", 0, "value", "6o")).toBe(false);
    const draft = Object.entries(store.getState().drafts).find(([key]) => key.includes(":nl:parameters:0:value"))![1];
    expect(draft.text).toBe("6o");
    expect(nonlinearModelOf(store.getState().document!, "queue").parameters[0]!.value).toBe(MU);
    expect(setNonlinearNumber(store, "queue", "inputs", 0, "rateLimit", "")).toBe(true);
    expect(nonlinearModelOf(store.getState().document!, "queue").inputs[0]!.rateLimit).toBeUndefined();
    expect(setNonlinearNumber(store, "queue", "inputs", 0, "min", "500")).toBe(false);
    expect(store.getState().editError ?? "").toMatch(/lower bound/);
  });

  it("an output set-point replaces a fixed state in the operating point and the solve honours it", async () => {
    const { store, editor } = await open();
    toggleUnknown(store, "queue", "backlog", true);
    toggleUnknown(store, "queue", "requested_consumers", false);
    setOperatingValue(store, "queue", "inputs", "requested_consumers", "40");
    setOperatingValue(store, "queue", "outputSetpoints", "backlog_out", "");
    await editor.solveOperatingPoint();
    // u = c = 40 fixed: backlog solves λ = cμq/(K+q) → q = λK/(cμ − λ) = 10000 (same closed form).
    const point = editor.getState().operatingPoint.result!.operatingPoint;
    expectRelativeClose(point.states[0]!, (LAMBDA * K) / (40 * MU - LAMBDA), 1e-8, "backlog");
  });
});
