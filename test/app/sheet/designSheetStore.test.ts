// The design-sheet view's state, driven headlessly: load, evaluate through a bridge, sign off.
import { describe, expect, it } from "vitest";
import { dispatch } from "../../../shared-engine/api";
import type { EngineBridge, ProjectFile } from "../../../shared-engine/api/contract";
import { fingerprint } from "../../../shared-engine/project/fingerprint";
import { ENGINE_VERSION } from "../../../shared-engine/version";
import { createMemoryDocumentStore } from "../../../renderer/db/documentStore";
import { createDesignSheetStore } from "../../../renderer/sheet/designSheetStore";
import { parseSheetRoute, sheetRouteHash } from "../../../renderer/sheet/DesignSheetView";

const bridge: EngineBridge = { request: (method, params) => dispatch(method, params) as never };
const doc: ProjectFile = {
  format: "loopwright-project",
  version: 1,
  name: "Store test",
  plants: [{ id: "p", model: { type: "state-space", A: [[0, 1], [0, 0]], B: [[0], [1]], C: [[1, 0]], D: [[0]], sampleTime: null } }],
  variants: [{ id: "v", plant: "p", stateFeedback: { method: "poles", poles: [-1, -2] } }],
};

async function setup() {
  const documents = createMemoryDocumentStore(() => 1000);
  await documents.save("proj", doc, { baseRevision: 0, message: "created" });
  const store = createDesignSheetStore({ bridge, documents });
  await store.load("proj");
  return { documents, store };
}

describe("design sheet store", () => {
  it("loads the first variant and evaluates it through the bridge", async () => {
    const { store } = await setup();
    const s = store.getState();
    expect(s.phase).toBe("ready");
    expect(s.variantId).toBe("v");
    // Double integrator with poles −1, −2: s² + 3s + 2, so K = [2, 3] (hand calculation).
    expect(s.result!.gain!.K[0]![0]).toBeCloseTo(2, 12);
    expect(s.result!.gain!.K[0]![1]).toBeCloseTo(3, 12);
  });

  it("records a sign-off with the current fingerprint as a new revision of the document", async () => {
    const { store, documents } = await setup();
    expect(await store.signOff({ role: "reviewed", name: "  R. Reviewer ", date: "2025-02-03" })).toBe(true);
    const stored = await documents.load("proj");
    expect(stored.revision).toBe(2);
    expect(stored.document.signOffs).toEqual([{ variant: "v", role: "reviewed", name: "R. Reviewer", date: "2025-02-03", fingerprint: fingerprint(doc.plants[0]!, doc.variants[0]!, ENGINE_VERSION) }]);
    expect((await documents.history("proj"))[0]!.message).toMatch(/reviewed sign-off of variant v by R\. Reviewer/);
    expect(store.getState().revision).toBe(2);
  });

  it("refuses an empty name or a malformed date and records nothing", async () => {
    const { store, documents } = await setup();
    expect(await store.signOff({ role: "approved", name: " ", date: "2025-02-03" })).toBe(false);
    expect(store.getState().notice).toMatch(/name/);
    expect(await store.signOff({ role: "approved", name: "A", date: "3 Feb" })).toBe(false);
    expect(store.getState().notice).toMatch(/yyyy-mm-dd/);
    expect((await documents.load("proj")).revision).toBe(1);
  });

  it("reports a conflict when the document changed elsewhere, without losing it", async () => {
    const { store, documents } = await setup();
    await documents.save("proj", { ...doc, notes: "edited in another tab" }, { baseRevision: 1, message: "other" });
    expect(await store.signOff({ role: "prepared", name: "P", date: "2025-02-03" })).toBe(false);
    expect(store.getState().notice).toMatch(/not recorded.*changed elsewhere/);
    expect((await documents.load("proj")).document.notes).toBe("edited in another tab");
  });

  it("round-trips the hash route for a project and a variant", () => {
    expect(parseSheetRoute(sheetRouteHash("a b", "v/1"))).toEqual({ projectId: "a b", variantId: "v/1" });
    expect(parseSheetRoute("#/sheet/p")).toEqual({ projectId: "p" });
    expect(parseSheetRoute("#/projects")).toBeNull();
  });
});
