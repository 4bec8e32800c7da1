import type { ProjectToolsState, ProjectToolsStore } from "../../state/compare/projectToolsStore";
import { variantLabel } from "../../state/compare/variantCommands";
import { formatLocalTime } from "../formatTime";

/** Every saved revision with time and message; inspect one read-only, or restore it as a new revision. */
export function HistoryView({ state, store }: { state: ProjectToolsState; store: ProjectToolsStore }) {
  const current = state.stored?.revision ?? 0;
  const inspected = state.inspected;
  return (
    <section aria-labelledby="history-heading" className="history-view">
      <h2 id="history-heading" className="section-title">History</h2>
      <p className="muted hint">Restoring saves the old revision again as the newest one; no revision is ever deleted.</p>
      {state.history.length === 0 ? (
        <p className="muted">Nothing saved yet.</p>
      ) : (
        <table className="compare-table" data-testid="history-table">
          <thead>
            <tr>
              <th scope="col">Revision</th>
              <th scope="col">Saved</th>
              <th scope="col">Change</th>
              <th scope="col">Actions</th>
            </tr>
          </thead>
          <tbody>
            {state.history.map((h) => (
              <tr key={h.revision} data-revision={h.revision}>
                <td className="num">
                  {h.revision}
                  {h.revision === current && <span className="tag">current</span>}
                </td>
                <td className="num cell-time">{formatLocalTime(h.savedAt)}</td>
                <td>{h.message || <span className="muted">(no message)</span>}</td>
                <td className="cell-actions">
                  <button type="button" className="button-quiet" onClick={() => void store.inspect(h.revision)}>
                    Inspect
                  </button>
                  <button type="button" className="button-quiet" disabled={state.busy || h.revision === current} onClick={() => void store.restore(h.revision)}>
                    Restore
                  </button>
                </td>
              </tr>
            ))}
          </tbody>
        </table>
      )}
      {inspected && (
        <div className="panel inspected" role="region" aria-label={`Revision ${inspected.revision} (read-only)`}>
          <div className="panel-head">
            <h3>Revision {inspected.revision} (read-only)</h3>
            <span className="muted num">{formatLocalTime(inspected.savedAt)}</span>
            <span className="status-spacer" />
            <button type="button" className="button-quiet" onClick={() => void store.inspect(null)}>
              Close
            </button>
          </div>
          <dl className="summary-list">
            <dt>Project name</dt>
            <dd>{inspected.document.name}</dd>
            <dt>Plants</dt>
            <dd>{inspected.document.plants.map((p) => `${p.name ?? p.id} (${p.model.type}${p.model.type === "state-space" ? `, ${p.model.A.length} states` : ""})`).join("; ") || "none"}</dd>
            <dt>Variants</dt>
            <dd>
              {inspected.document.variants.map((v) => `${variantLabel(v)}${v.baseline ? " (baseline)" : ""}: ${v.stateFeedback?.method ?? "no state feedback"}`).join("; ") || "none"}
            </dd>
            <dt>Requirements</dt>
            <dd>{(inspected.document.requirements ?? []).length}</dd>
            <dt>Sign-offs</dt>
            <dd>{(inspected.document.signOffs ?? []).length}</dd>
          </dl>
        </div>
      )}
    </section>
  );
}
