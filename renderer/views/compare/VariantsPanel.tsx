import { useState } from "react";
import type { ProjectToolsState, ProjectToolsStore } from "../../state/compare/projectToolsStore";
import { describeVariant, duplicateVariant, lockedVariantIds, renameVariant, setBaseline, variantLabel } from "../../state/compare/variantCommands";
import { exportProject, exportVariant } from "../../io";
import { VariantSwatch } from "./VariantSwatch";

/** The project's variants: duplicate, rename, describe, baseline, export; signed-off ones are locked. */
export function VariantsPanel({ state, store }: { state: ProjectToolsState; store: ProjectToolsStore }) {
  const document = state.stored?.document;
  const [editing, setEditing] = useState<{ id: string; name: string; description: string } | null>(null);
  if (!document) return null;
  const locked = lockedVariantIds(document);
  return (
    <section aria-labelledby="variants-heading">
      <div className="panel-head">
        <h2 id="variants-heading" className="section-title">Design variants</h2>
        <button type="button" className="button-quiet" onClick={() => exportProject(document)}>
          Export project file
        </button>
      </div>
      <table className="compare-table variants-table">
        <thead>
          <tr>
            <th scope="col">Variant</th>
            <th scope="col">Derived from</th>
            <th scope="col">Actions</th>
          </tr>
        </thead>
        <tbody>
          {document.variants.map((v, index) => (
            <tr key={v.id} data-variant-id={v.id}>
              <td>
                {editing?.id === v.id ? (
                  <form
                    className="rename-form"
                    onSubmit={(e) => {
                      e.preventDefault();
                      const { name, description } = editing;
                      void store
                        .apply((d) => describeVariant(renameVariant(d, v.id, name).document, v.id, description).document, `Renamed or described variant ${variantLabel(v)}`)
                        .then((ok) => ok && setEditing(null));
                    }}
                  >
                    <input className="text-input" aria-label={`Name of ${variantLabel(v)}`} value={editing.name} onChange={(e) => setEditing({ ...editing, name: e.target.value })} />
                    <input className="text-input" aria-label={`Description of ${variantLabel(v)}`} placeholder="Description" value={editing.description} onChange={(e) => setEditing({ ...editing, description: e.target.value })} />
                    <button type="submit" className="button-accent" disabled={state.busy}>Save</button>
                    <button type="button" className="button-quiet" onClick={() => setEditing(null)}>Cancel</button>
                  </form>
                ) : (
                  <>
                    <span className="compare-head">
                      <VariantSwatch styleIndex={index} />
                      <span className="project-name">{variantLabel(v)}</span>
                      {v.baseline && <span className="tag">baseline</span>}
                      {locked.has(v.id) && <span className="tag" title="Signed off: edits create a new variant derived from it">locked</span>}
                    </span>
                    {v.description && <p className="project-description">{v.description}</p>}
                  </>
                )}
              </td>
              <td className="muted">{v.parent ? variantLabel(document.variants.find((p) => p.id === v.parent) ?? { id: v.parent, plant: "" }) : "—"}</td>
              <td className="cell-actions">
                <button type="button" className="button-quiet" disabled={state.busy} onClick={() => void store.apply((d) => duplicateVariant(d, v.id).document, `Duplicated variant ${variantLabel(v)}`)}>
                  Duplicate
                </button>
                <button type="button" className="button-quiet" disabled={state.busy} onClick={() => setEditing({ id: v.id, name: variantLabel(v), description: v.description ?? "" })}>
                  {locked.has(v.id) ? "Revise…" : "Rename…"}
                </button>
                <button type="button" className="button-quiet" disabled={state.busy || v.baseline === true} onClick={() => void store.apply((d) => setBaseline(d, v.id).document, `Made ${variantLabel(v)} the baseline`)}>
                  Make baseline
                </button>
                <button type="button" className="button-quiet" onClick={() => exportVariant(document, v.id)}>
                  Export
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
    </section>
  );
}
