import fc from "fast-check";
import { describe, expect, it } from "vitest";
import {
  baselineVariantId,
  describeVariant,
  duplicateVariant,
  editVariant,
  isVariantLocked,
  normaliseBaseline,
  renameVariant,
  setBaseline,
} from "../../../../renderer/state/compare/variantCommands";
import { sampleProject } from "../../db/sampleProject";

const baselines = (doc: ReturnType<typeof sampleProject>) => doc.variants.filter((v) => v.baseline === true).map((v) => v.id);

describe("variant commands", () => {
  it("duplicates a variant right after it with a new id, a copy name, the source as parent and no baseline mark", () => {
    const doc = sampleProject();
    const { document, variantId } = duplicateVariant(doc, "lqr-soft");
    expect(document.variants.map((v) => v.id)).toEqual(["lqr-soft", "lqr-soft-copy", "poles-fast"]);
    const copy = document.variants[1]!;
    expect(copy).toMatchObject({ id: variantId, name: "LQR soft (copy)", parent: "lqr-soft" });
    expect(copy.baseline).toBeUndefined();
    expect(copy.stateFeedback).toEqual(doc.variants[0]!.stateFeedback);
    expect(duplicateVariant(document, "lqr-soft").variantId).toBe("lqr-soft-copy-2");
  });

  it("never changes the document it is given", () => {
    const doc = sampleProject();
    const before = structuredClone(doc);
    duplicateVariant(doc, "lqr-soft");
    renameVariant(doc, "poles-fast", "Renamed");
    describeVariant(doc, "poles-fast", "why");
    setBaseline(doc, "poles-fast");
    expect(doc).toEqual(before);
  });

  it("renames with a trimmed name and rejects an empty or multi-line name", () => {
    const doc = sampleProject();
    expect(renameVariant(doc, "poles-fast", "  Quick poles ").document.variants[1]!.name).toBe("Quick poles");
    expect(() => renameVariant(doc, "poles-fast", "  ")).toThrow(expect.objectContaining({ kind: "validation", details: expect.objectContaining({ reason: "empty" }) }));
    expect(() => renameVariant(doc, "poles-fast", "a\nb")).toThrow(expect.objectContaining({ details: expect.objectContaining({ reason: "control-character" }) }));
  });

  it("sets and clears a description", () => {
    const doc = sampleProject();
    const described = describeVariant(doc, "poles-fast", " Faster poles for the demo ").document;
    expect(described.variants[1]!.description).toBe("Faster poles for the demo");
    expect(describeVariant(described, "poles-fast", "").document.variants[1]!.description).toBeUndefined();
  });

  it("names an unknown variant id in the error", () => {
    expect(() => setBaseline(sampleProject(), "nope")).toThrow(/variantId "nope" names no variant/);
  });

  it("keeps exactly one baseline after any sequence of baseline, duplicate and rename commands", () => {
    // Property test; the seed is recorded so a failure can be replayed.
    fc.assert(
      fc.property(fc.array(fc.tuple(fc.constantFrom("baseline", "duplicate", "rename"), fc.nat(20)), { maxLength: 25 }), (steps) => {
        let doc = sampleProject();
        for (const [command, pick] of steps) {
          const id = doc.variants[pick % doc.variants.length]!.id;
          doc = command === "baseline" ? setBaseline(doc, id).document : command === "duplicate" ? duplicateVariant(doc, id).document : renameVariant(doc, id, `n${pick}`).document;
          expect(baselines(doc)).toHaveLength(1);
          expect(new Set(doc.variants.map((v) => v.id)).size).toBe(doc.variants.length);
        }
      }),
      { seed: 20250611, numRuns: 150 },
    );
  });

  it("repairs a document with no or several baselines to exactly one, preferring the first marked", () => {
    const none = sampleProject();
    delete none.variants[0]!.baseline;
    expect(baselines(normaliseBaseline(none))).toEqual(["lqr-soft"]);
    const two = sampleProject();
    two.variants[1]!.baseline = true;
    expect(baselines(normaliseBaseline(two))).toEqual(["lqr-soft"]);
    expect(baselineVariantId({ ...none, variants: [] })).toBeNull();
  });

  it("edits an unlocked variant in place", () => {
    const result = editVariant(sampleProject(), "poles-fast", (v) => {
      v.referenceFeedforward = false;
    });
    expect(result).toMatchObject({ variantId: "poles-fast", forked: false });
    expect(result.document.variants[1]!.referenceFeedforward).toBe(false);
  });

  it("turns an edit of a signed-off (locked) variant into a new variant whose parent is the locked one", () => {
    const doc = sampleProject();
    doc.signOffs = [{ variant: "lqr-soft", role: "approved", name: "A. Approver", date: "2025-06-01", fingerprint: "f00d" }];
    expect(isVariantLocked(doc, "lqr-soft")).toBe(true);
    const result = editVariant(doc, "lqr-soft", (v) => {
      if (v.stateFeedback?.method === "lqr") v.stateFeedback.R = [[2]];
    });
    expect(result.forked).toBe(true);
    const locked = result.document.variants.find((v) => v.id === "lqr-soft")!;
    const fork = result.document.variants.find((v) => v.id === result.variantId)!;
    expect(locked).toEqual(doc.variants[0]);
    expect(fork).toMatchObject({ parent: "lqr-soft", name: "LQR soft (revised)", stateFeedback: { R: [[2]] } });
    expect(fork.baseline).toBeUndefined();
    // A rename of a locked variant forks too, so the signed name stays as it was signed.
    const renamed = renameVariant(doc, "lqr-soft", "Other");
    expect(renamed.forked).toBe(true);
    expect(renamed.document.variants[0]!.name).toBe("LQR soft");
  });
});
