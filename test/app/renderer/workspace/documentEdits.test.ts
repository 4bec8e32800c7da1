import { describe, expect, it } from "vitest";
import { addVariant, duplicateVariant, removeVariant, resizePlant, setMatrixEntry } from "../../../../renderer/state/workspace/documentEdits";
import { LINEAR_QUEUE_DOCUMENT } from "./linearQueueDocument";

const frozen = () => structuredClone(LINEAR_QUEUE_DOCUMENT);

describe("document edits", () => {
  it("never change the document they are given", () => {
    const doc = frozen();
    const copy = structuredClone(doc);
    setMatrixEntry(doc, "queue", "A", 0, 0, 5);
    resizePlant(doc, "queue", { states: 3, inputs: 2, outputs: 2, disturbances: 0 });
    duplicateVariant(doc, "poles-continuous");
    expect(doc).toEqual(copy);
  });

  it("shrinking the outputs drops integral action on an output that no longer exists, and removing disturbances removes F and E", () => {
    const doc = resizePlant(frozen(), "queue", { states: 2, inputs: 1, outputs: 1, disturbances: 0 });
    const model = doc.plants[0]!.model as { F?: unknown; E?: unknown; names: { disturbances?: string[] } };
    expect(model.F).toBeUndefined();
    expect(model.E).toBeUndefined();
    expect(model.names.disturbances).toBeUndefined();
    const renamedAway = resizePlant({ ...frozen(), variants: [{ ...frozen().variants[0]!, integralAction: { outputs: [3], weights: [1] } }] }, "queue", { states: 2, inputs: 1, outputs: 1, disturbances: 1 });
    expect(renamedAway.variants[0]!.integralAction).toBeUndefined();
  });

  it("refuses impossible sizes with a message naming the count", () => {
    expect(() => resizePlant(frozen(), "queue", { states: 0, inputs: 1, outputs: 1, disturbances: 0 })).toThrow("The number of states must be a whole number from 1 to 60; got 0.");
  });

  it("adds, duplicates and removes variants with unique ids; a copy remembers its parent", () => {
    const added = addVariant(frozen(), "queue", "lqr", { states: 2, inputs: 1, outputs: 1, disturbances: 1 });
    expect(added.id).toBe("lqr");
    expect(added.document.variants.at(-1)!.stateFeedback).toEqual({ method: "lqr", Q: [[1, 0], [0, 1]], R: [[1]] });
    const dup = duplicateVariant(added.document, "lqr");
    expect(dup.id).toBe("lqr-copy");
    expect(dup.document.variants.find((v) => v.id === "lqr-copy")!.parent).toBe("lqr");
    const removed = removeVariant(dup.document, "lqr");
    expect(removed.variants.map((v) => v.id)).toEqual(["lqr-integral-1s", "poles-continuous", "lqr-kalman", "lqr-copy"]);
    expect(removed.variants.at(-1)!.parent).toBeUndefined();
  });
});
