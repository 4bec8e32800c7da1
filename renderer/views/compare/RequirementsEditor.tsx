import { useState } from "react";
import type { ProjectToolsState, ProjectToolsStore } from "../../state/compare/projectToolsStore";
import {
  REQUIREMENT_METRIC_CHOICES,
  addRequirement,
  describeRequirement,
  draftOf,
  parseRequirementDraft,
  removeRequirement,
  requirementOutcome,
  updateRequirement,
  type RequirementDraft,
} from "../../state/compare/requirementCommands";
import { variantLabel } from "../../state/compare/variantCommands";

const EMPTY_DRAFT: RequirementDraft = { metric: "overshootPct", min: "", max: "", description: "" };

/** Requirements of the project (add, edit, remove) with pass/fail per variant from the engine's checks. */
export function RequirementsEditor({ state, store }: { state: ProjectToolsState; store: ProjectToolsStore }) {
  const document = state.stored?.document;
  const [editing, setEditing] = useState<{ id: string | null; draft: RequirementDraft; error: string | null } | null>(null);
  if (!document) return null;
  const requirements = document.requirements ?? [];

  const commit = () => {
    if (!editing) return;
    try {
      parseRequirementDraft(editing.draft);
    } catch (error) {
      setEditing({ ...editing, error: (error as Error).message });
      return;
    }
    const id = editing.id;
    void store
      .apply((d) => (id === null ? addRequirement(d, editing.draft).document : updateRequirement(d, id, editing.draft)), id === null ? "Added a requirement" : `Edited requirement ${id}`)
      .then((ok) => ok && setEditing(null));
  };

  const editor = editing && (
    <form
      className="requirement-form"
      onSubmit={(e) => {
        e.preventDefault();
        commit();
      }}
    >
      <label>
        Metric{" "}
        <select className="text-input" value={editing.draft.metric} onChange={(e) => setEditing({ ...editing, draft: { ...editing.draft, metric: e.target.value }, error: null })}>
          {REQUIREMENT_METRIC_CHOICES.map((c) => (
            <option key={c.metric} value={c.metric}>
              {c.label}
              {c.unit ? ` (${c.unit})` : ""}
            </option>
          ))}
        </select>
      </label>
      <label>
        at least <input className="text-input num bound-input" inputMode="decimal" value={editing.draft.min} onChange={(e) => setEditing({ ...editing, draft: { ...editing.draft, min: e.target.value }, error: null })} />
      </label>
      <label>
        at most <input className="text-input num bound-input" inputMode="decimal" value={editing.draft.max} onChange={(e) => setEditing({ ...editing, draft: { ...editing.draft, max: e.target.value }, error: null })} />
      </label>
      <button type="submit" className="button-accent" disabled={state.busy}>Save requirement</button>
      <button type="button" className="button-quiet" onClick={() => setEditing(null)}>Cancel</button>
      {editing.error && <p className="error-text" role="alert">{editing.error}</p>}
    </form>
  );

  return (
    <section aria-labelledby="requirements-heading">
      <div className="panel-head">
        <h2 id="requirements-heading" className="section-title">Requirements</h2>
        <button type="button" className="button-quiet" onClick={() => setEditing({ id: null, draft: EMPTY_DRAFT, error: null })}>
          Add requirement
        </button>
      </div>
      {editing?.id === null && editor}
      {requirements.length === 0 ? (
        <p className="muted">No requirements yet. Add one, e.g. step overshoot at most 5 %.</p>
      ) : (
        <table className="compare-table" data-testid="requirements-table">
          <thead>
            <tr>
              <th scope="col">Requirement</th>
              {document.variants.map((v) => (
                <th scope="col" key={v.id}>{variantLabel(v)}</th>
              ))}
              <th scope="col">Actions</th>
            </tr>
          </thead>
          <tbody>
            {requirements.map((req) => (
              <tr key={req.id}>
                <th scope="row">{editing?.id === req.id ? editor : describeRequirement(req)}</th>
                {document.variants.map((v) => {
                  const outcome = requirementOutcome(state.evaluation.results[v.id], req.id);
                  return (
                    <td key={v.id} title={outcome.detail}>
                      <span className={`verdict verdict-${outcome.status}`}>{outcome.status === "not-checked" ? "not checked" : outcome.status}</span>
                    </td>
                  );
                })}
                <td className="cell-actions">
                  <button type="button" className="button-quiet" onClick={() => setEditing({ id: req.id, draft: draftOf(req), error: null })}>Edit</button>
                  <button type="button" className="button-quiet" disabled={state.busy} onClick={() => void store.apply((d) => removeRequirement(d, req.id), `Removed requirement ${describeRequirement(req)}`)}>
                    Remove
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
