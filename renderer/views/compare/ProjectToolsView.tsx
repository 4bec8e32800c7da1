import { useEffect, useMemo, useSyncExternalStore } from "react";
import type { EngineBridge } from "../../../shared-engine/api/contract";
import type { DocumentStore } from "../../db";
import { createProjectToolsStore } from "../../state/compare/projectToolsStore";
import { HistoryView } from "../history/HistoryView";
import { CompareView } from "./CompareView";
import { RequirementsEditor } from "./RequirementsEditor";
import { VariantsPanel } from "./VariantsPanel";
import "./compare.css";

export type ProjectToolsTab = "compare" | "variants" | "history";

const TABS: { id: ProjectToolsTab; label: string }[] = [
  { id: "compare", label: "Compare" },
  { id: "variants", label: "Variants & requirements" },
  { id: "history", label: "History" },
];

/** One project's comparison, variants, requirements and history, reached at #/project/<id>/<tab>. */
export function ProjectToolsView({ projectId, tab, documents, bridge }: { projectId: string; tab: ProjectToolsTab; documents: DocumentStore; bridge: EngineBridge }) {
  const store = useMemo(() => createProjectToolsStore({ projectId, documents, bridge }), [projectId, documents, bridge]);
  useEffect(() => {
    void store.start();
    return () => store.dispose();
  }, [store]);
  const state = useSyncExternalStore(store.subscribe, store.getState, store.getState);

  return (
    <section className="panel project-tools" aria-labelledby="tools-heading">
      <div className="panel-head">
        <a href="#/" className="button-quiet back-link">
          ← Projects
        </a>
        <h1 id="tools-heading">{state.stored?.document.name ?? "Project"}</h1>
        <span className="muted num" data-testid="revision-label">
          {state.stored ? (state.stored.revision === 0 ? "not saved yet" : `revision ${state.stored.revision}`) : ""}
        </span>
      </div>
      <nav className="tab-row" aria-label="Project tools">
        {TABS.map((t) => (
          <a key={t.id} href={`#/project/${encodeURIComponent(projectId)}/${t.id}`} className={t.id === tab ? "tab tab-current" : "tab"} aria-current={t.id === tab ? "page" : undefined}>
            {t.label}
          </a>
        ))}
      </nav>
      <div className="notice-line" role="status" aria-live="polite">
        {state.notice && (
          <>
            <span className={state.notice.kind === "info" ? undefined : "error-text"} data-testid="tools-notice">
              {state.notice.text}
            </span>
            {state.notice.kind === "conflict" && (
              <button type="button" className="button-quiet" onClick={() => void store.reload()}>
                Load the newer revision
              </button>
            )}
            <button type="button" className="button-quiet" aria-label="Dismiss message" onClick={() => store.dismissNotice()}>
              ×
            </button>
          </>
        )}
      </div>
      {state.phase === "loading" && <p className="muted">Opening the project…</p>}
      {state.phase === "failed" && (
        <p className="error-text" role="alert">
          The project could not be opened: {state.loadError}
        </p>
      )}
      {state.phase === "ready" && tab === "compare" && <CompareView state={state} store={store} />}
      {state.phase === "ready" && tab === "variants" && (
        <>
          <VariantsPanel state={state} store={store} />
          <RequirementsEditor state={state} store={store} />
        </>
      )}
      {state.phase === "ready" && tab === "history" && <HistoryView state={state} store={store} />}
    </section>
  );
}

/** Reads `#/project/<id>/<tab>`; null for any other address (the project list). */
export function parseToolsRoute(hash: string): { projectId: string; tab: ProjectToolsTab } | null {
  const match = /^#\/project\/([^/]+)\/(compare|variants|history)$/.exec(hash);
  if (!match) return null;
  try {
    return { projectId: decodeURIComponent(match[1]!), tab: match[2] as ProjectToolsTab };
  } catch {
    return null;
  }
}
