/**
 * Renderer entry: opens the project database, connects the engine bridge, builds the store and
 * mounts the first screen. Everything it starts is disposed when the page goes away for good.
 */
import { createRoot } from "react-dom/client";
import { App } from "./App";
import { createBridge, exposeBridgeForTests } from "./bridge";
import { createDatabase, createDexieDocumentStore, createProjectRepository, ensureDemoProject, requestPersistentStorage } from "./db";
import { createProjectListStore, type ThemeChoice } from "./state/projectListStore";
import "./styles/app.css";

const THEME_KEY = "loopwright.theme";

function readTheme(): ThemeChoice {
  try {
    const saved = localStorage.getItem(THEME_KEY);
    return saved === "light" || saved === "dark" ? saved : "system";
  } catch {
    return "system";
  }
}

function applyTheme(theme: ThemeChoice): void {
  if (theme === "system") delete document.documentElement.dataset.theme;
  else document.documentElement.dataset.theme = theme;
  try {
    if (theme === "system") localStorage.removeItem(THEME_KEY);
    else localStorage.setItem(THEME_KEY, theme);
  } catch {
    // Storage may be unavailable (private mode); the theme then lasts for this page only.
  }
}

const connection = createBridge();
const db = createDatabase();
const repository = createProjectRepository(db);
const documents = createDexieDocumentStore(db);
void requestPersistentStorage(navigator.storage);
const store = createProjectListStore({
  repository,
  bridge: connection.bridge,
  transport: connection.transport,
  prepare: () => ensureDemoProject(db, undefined, documents),
  initialTheme: readTheme(),
});

const removeTestHook = exposeBridgeForTests(window, connection, location.search);

applyTheme(store.getState().theme);
let appliedTheme = store.getState().theme;
const stopThemeSync = store.subscribe(() => {
  const theme = store.getState().theme;
  if (theme !== appliedTheme) applyTheme((appliedTheme = theme));
});

const rootElement = document.getElementById("root");
if (!rootElement) throw new Error("index.html must contain <div id=\"root\">");
const root = createRoot(rootElement);
root.render(<App store={store} tools={{ documents, bridge: connection.bridge, repository }} />);
void store.start();

window.addEventListener("pagehide", (event) => {
  if (event.persisted) return; // kept in the back/forward cache: it may come back as it is
  stopThemeSync();
  removeTestHook();
  root.unmount();
  connection.dispose();
  documents.dispose();
  db.close();
});
