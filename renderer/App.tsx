import { useState } from "react";
import { DEMO_DOCUMENT } from "./db/demoProject";
import type { ProjectListStore } from "./state/projectListStore";
import { EngineStatusLine } from "./views/EngineStatusLine";
import { ProjectListView } from "./views/ProjectListView";
import { ThemeSwitch } from "./views/ThemeSwitch";
import { ProjectToolsRoute, type ProjectToolsDeps } from "./views/compare/ProjectToolsRoute";
import { WorkspaceView } from "./views/workspace/WorkspaceView";
import { DesignSheetRoute, sheetRouteHash } from "./sheet";

export function App({ store, tools }: { store: ProjectListStore; tools?: ProjectToolsDeps }) {
  // The open design workspace (project list → Open → workspace → "← Projects").
  const [open, setOpen] = useState<{ id: string; name: string; isDemo: boolean } | null>(null);
  const workspace = tools;
  return (
    <div className="app-frame">
      <header className="top-bar">
        <span className="wordmark">Loopwright</span>
        <span className="muted">state-feedback design workbench</span>
        <span className="status-spacer" />
        {open && tools && <a className="button-quiet" href={sheetRouteHash(open.id)}>Design sheet</a>}
        <ThemeSwitch store={store} />
      </header>
      <main className="page">
        <DesignSheetRoute deps={tools}>
        <ProjectToolsRoute tools={tools} onImported={() => void store.reload()}>
          {open && workspace ? (
          <WorkspaceView
            key={open.id}
            projectId={open.id}
            projectName={open.name}
            documents={workspace.documents}
            bridge={workspace.bridge}
            initialDocument={open.isDemo ? DEMO_DOCUMENT : undefined}
            onClose={() => {
              setOpen(null);
              void store.reload();
            }}
          />
        ) : (
          <ProjectListView store={store} onOpen={workspace ? (project) => setOpen({ id: project.id, name: project.name, isDemo: project.isDemo === true }) : undefined} />
        )}
        </ProjectToolsRoute>
        </DesignSheetRoute>
      </main>
      <EngineStatusLine store={store} />
    </div>
  );
}
