import type { ProjectListStore } from "./state/projectListStore";
import { EngineStatusLine } from "./views/EngineStatusLine";
import { ProjectListView } from "./views/ProjectListView";
import { ThemeSwitch } from "./views/ThemeSwitch";

export function App({ store }: { store: ProjectListStore }) {
  return (
    <div className="app-frame">
      <header className="top-bar">
        <span className="wordmark">Loopwright</span>
        <span className="muted">state-feedback design workbench</span>
        <span className="status-spacer" />
        <ThemeSwitch store={store} />
      </header>
      <main className="page">
        <ProjectListView store={store} />
      </main>
      <EngineStatusLine store={store} />
    </div>
  );
}
