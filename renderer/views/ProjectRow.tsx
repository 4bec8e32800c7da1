import { useEffect, useRef } from "react";
import type { ProjectRecord } from "../db";
import type { ProjectListState, ProjectListStore } from "../state/projectListStore";
import { formatLocalTime } from "./formatTime";

interface Props {
  project: ProjectRecord;
  state: ProjectListState;
  store: ProjectListStore;
  /** Opens the project's design workspace; absent: no Open action. */
  onOpen?: (project: ProjectRecord) => void;
}

/** One project: name (or the inline rename field), dates, and rename/delete with an in-row confirmation. */
export function ProjectRow({ project, state, store, onOpen }: Props) {
  const renaming = state.rename?.id === project.id ? state.rename : null;
  const confirming = state.pendingDeleteId === project.id;
  const renameInput = useRef<HTMLInputElement>(null);
  const keepButton = useRef<HTMLButtonElement>(null);
  const renameButton = useRef<HTMLButtonElement>(null);
  const wasEditing = useRef(false);

  // Move focus into the field or the confirmation when they appear, and back to the row's
  // Rename button when the field closes, so keyboard users never lose their place.
  useEffect(() => {
    if (renaming) {
      if (!wasEditing.current) renameInput.current?.select();
      wasEditing.current = true;
    } else if (wasEditing.current) {
      wasEditing.current = false;
      renameButton.current?.focus();
    }
  }, [renaming]);
  useEffect(() => {
    if (confirming) keepButton.current?.focus();
  }, [confirming]);

  const errorId = `rename-error-${project.id}`;
  return (
    <tr className={confirming ? "row-confirming" : undefined} data-project-id={project.id}>
      <td className="cell-name">
        {renaming ? (
          <form
            className="rename-form"
            onSubmit={(e) => {
              e.preventDefault();
              void store.commitRename();
            }}
          >
            <input
              ref={renameInput}
              className="text-input"
              aria-label={`New name for ${project.name}`}
              aria-invalid={renaming.error ? true : undefined}
              aria-describedby={renaming.error ? errorId : undefined}
              value={renaming.draft}
              onChange={(e) => store.setRenameDraft(e.target.value)}
              onKeyDown={(e) => {
                if (e.key === "Escape") {
                  e.preventDefault();
                  store.cancelRename();
                }
              }}
            />
            <button type="submit" className="button-accent" disabled={state.busy}>
              Save
            </button>
            <button type="button" className="button-quiet" onClick={() => store.cancelRename()}>
              Cancel
            </button>
            {renaming.error && (
              <p id={errorId} className="error-text" role="alert">
                {renaming.error}
              </p>
            )}
          </form>
        ) : (
          <>
            <span className="project-name">{project.name}</span>
            {project.isDemo && <span className="tag">demo</span>}
            {project.description && <p className="project-description">{project.description}</p>}
          </>
        )}
      </td>
      <td className="num cell-time">{formatLocalTime(project.updatedAt)}</td>
      <td className="num cell-time">{formatLocalTime(project.createdAt)}</td>
      <td className="cell-actions">
        {confirming ? (
          <div
            className="confirm"
            role="group"
            aria-label={`Confirm deleting ${project.name}`}
            onKeyDown={(e) => {
              if (e.key === "Escape") store.cancelDelete();
            }}
          >
            <span>Delete this project?</span>
            <button type="button" className="button-danger" onClick={() => void store.confirmDelete()} disabled={state.busy}>
              Delete
            </button>
            <button ref={keepButton} type="button" className="button-quiet" onClick={() => store.cancelDelete()}>
              Keep
            </button>
          </div>
        ) : (
          !renaming && (
            <>
              {onOpen && (
                <button type="button" className="button-accent" onClick={() => onOpen(project)} aria-label={`Open ${project.name}`}>
                  Open
                </button>
              )}
              <a className="button-quiet tools-link" href={`#/project/${encodeURIComponent(project.id)}/compare`} aria-label={`Compare and history of ${project.name}`}>
                Compare &amp; history
              </a>
              <button ref={renameButton} type="button" className="button-quiet" onClick={() => store.startRename(project.id)} aria-label={`Rename ${project.name}`}>
                Rename
              </button>
              <button type="button" className="button-quiet" onClick={() => store.askDelete(project.id)} aria-label={`Delete ${project.name}`}>
                Delete
              </button>
            </>
          )
        )}
      </td>
    </tr>
  );
}
