import { MAX_PROJECT_NAME_LENGTH, type ProjectRecord } from "../db";
import type { ProjectListStore } from "../state/projectListStore";
import { ProjectRow } from "./ProjectRow";
import { useStoreState } from "./useStoreState";

/** The first screen: every project on this machine, with create, rename and delete. */
export function ProjectListView({ store, onOpen }: { store: ProjectListStore; onOpen?: (project: ProjectRecord) => void }) {
  const state = useStoreState(store);
  const count = state.projects.length;
  return (
    <section className="panel" aria-labelledby="projects-heading">
      <div className="panel-head">
        <h1 id="projects-heading">Projects</h1>
        <span className="muted num" data-testid="project-count">
          {state.phase === "ready" ? `${count} ${count === 1 ? "project" : "projects"}` : ""}
        </span>
      </div>

      <form
        className="create-row"
        onSubmit={(e) => {
          e.preventDefault();
          void store.create();
        }}
      >
        <label htmlFor="new-project-name">New project</label>
        <input
          id="new-project-name"
          className="text-input"
          placeholder="Name, e.g. Pump station level loop"
          value={state.createDraft}
          onChange={(e) => store.setCreateDraft(e.target.value)}
          aria-invalid={state.createError ? true : undefined}
          aria-describedby="new-project-hint"
          autoComplete="off"
        />
        <button type="submit" className="button-accent" disabled={state.busy}>
          Create project
        </button>
        <p id="new-project-hint" className={state.createError ? "error-text" : "muted hint"} role={state.createError ? "alert" : undefined}>
          {state.createError ?? `Up to ${MAX_PROJECT_NAME_LENGTH} characters, one line.`}
        </p>
      </form>

      <div className="notice-line" role="status" aria-live="polite">
        {state.notice && (
          <>
            <span>{state.notice}</span>
            {state.lastDeleted && (
              <button type="button" className="button-quiet" onClick={() => void store.undoDelete()}>
                Undo
              </button>
            )}
            <button type="button" className="button-quiet" aria-label="Dismiss message" onClick={() => store.dismissNotice()}>
              ×
            </button>
          </>
        )}
      </div>

      {state.unreadable.length > 0 && (
        <div className="warning-box" role="alert">
          {state.unreadable.length} stored {state.unreadable.length === 1 ? "project could" : "projects could"} not be read and{" "}
          {state.unreadable.length === 1 ? "is" : "are"} not listed:
          <ul>
            {state.unreadable.map((u) => (
              <li key={u.id}>{u.message}</li>
            ))}
          </ul>
        </div>
      )}

      {state.phase === "loading" && <p className="muted">Reading projects…</p>}
      {state.phase === "failed" && (
        <p className="error-text" role="alert">
          {state.loadError}{" "}
          <button type="button" className="button-quiet" onClick={() => void store.reload()}>
            Try again
          </button>
        </p>
      )}
      {state.phase === "ready" && count === 0 && (
        <div className="empty-state" data-testid="empty-state">
          <p>No projects yet.</p>
          <p className="muted">Name your first project above and press Enter. Projects are stored on this machine only.</p>
        </div>
      )}
      {state.phase === "ready" && count > 0 && (
        <table className="project-table" aria-labelledby="projects-heading">
          <thead>
            <tr>
              <th scope="col">Name</th>
              <th scope="col" className="col-time">Changed</th>
              <th scope="col" className="col-time">Created</th>
              <th scope="col" className="col-actions">
                <span className="visually-hidden">Actions</span>
              </th>
            </tr>
          </thead>
          <tbody>
            {state.projects.map((project) => (
              <ProjectRow key={project.id} project={project} state={state} store={store} onOpen={onOpen} />
            ))}
          </tbody>
        </table>
      )}
    </section>
  );
}
