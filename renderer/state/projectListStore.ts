/**
 * State of the first screen (the project list and the engine status line), in plain
 * TypeScript: commands in, immutable state snapshots out. React only reads snapshots and calls
 * commands; tests drive the same commands headlessly.
 */
import type { ComplexNumber, EngineBridge } from "../../shared-engine/api/contract";
import type { ProjectRecord, ProjectRepository } from "../db";

export type ThemeChoice = "system" | "light" | "dark";

export interface RenameState {
  id: string;
  draft: string;
  error: string | null;
}

export interface EngineStatus {
  status: "connecting" | "ready" | "failed";
  transport: "worker" | "ipc";
  version: string | null;
  error: string | null;
}

export interface EngineCheck {
  status: "idle" | "running" | "done" | "failed";
  /** The matrix sent; its eigenvalues are −1 and −2 (companion form of s² + 3s + 2). */
  matrix: readonly (readonly number[])[];
  eigenvalues: readonly ComplexNumber[] | null;
  error: string | null;
}

export interface ProjectListState {
  phase: "loading" | "ready" | "failed";
  loadError: string | null;
  projects: readonly ProjectRecord[];
  /** Stored records that failed the read check: shown as a warning, never silently dropped. */
  unreadable: readonly { id: string; message: string }[];
  createDraft: string;
  createError: string | null;
  /** A write is in flight; commands that write are ignored until it settles. */
  busy: boolean;
  rename: RenameState | null;
  pendingDeleteId: string | null;
  /** The most recently deleted project, kept until the next write so it can be restored. */
  lastDeleted: ProjectRecord | null;
  notice: string | null;
  engine: EngineStatus;
  engineCheck: EngineCheck;
  theme: ThemeChoice;
}

export interface ProjectListStoreDeps {
  repository: ProjectRepository;
  bridge: EngineBridge;
  transport: "worker" | "ipc";
  /** Runs once before the first load (creates the demo project on first start). */
  prepare?: () => Promise<unknown>;
  initialTheme?: ThemeChoice;
}

export interface ProjectListStore {
  getState(): ProjectListState;
  /** Calls `listener` after every change. Returns the disposer. */
  subscribe(listener: () => void): () => void;
  start(): Promise<void>;
  reload(): Promise<void>;
  setCreateDraft(text: string): void;
  create(): Promise<boolean>;
  startRename(id: string): void;
  setRenameDraft(text: string): void;
  commitRename(): Promise<boolean>;
  cancelRename(): void;
  askDelete(id: string): void;
  cancelDelete(): void;
  confirmDelete(): Promise<boolean>;
  undoDelete(): Promise<boolean>;
  checkEngine(): Promise<void>;
  setTheme(theme: ThemeChoice): void;
  dismissNotice(): void;
}

export const ENGINE_CHECK_MATRIX: readonly (readonly number[])[] = [
  [0, 1],
  [-2, -3],
];

function messageOf(error: unknown): string {
  return error instanceof Error ? error.message : String(error);
}

export function createProjectListStore(deps: ProjectListStoreDeps): ProjectListStore {
  let state: ProjectListState = {
    phase: "loading",
    loadError: null,
    projects: [],
    unreadable: [],
    createDraft: "",
    createError: null,
    busy: false,
    rename: null,
    pendingDeleteId: null,
    lastDeleted: null,
    notice: null,
    engine: { status: "connecting", transport: deps.transport, version: null, error: null },
    engineCheck: { status: "idle", matrix: ENGINE_CHECK_MATRIX, eigenvalues: null, error: null },
    theme: deps.initialTheme ?? "system",
  };
  const listeners = new Set<() => void>();

  function update(patch: Partial<ProjectListState>): void {
    state = { ...state, ...patch };
    for (const listener of [...listeners]) listener();
  }

  async function reload(): Promise<void> {
    try {
      const listing = await deps.repository.list();
      update({ phase: "ready", loadError: null, projects: listing.projects, unreadable: listing.unreadable });
    } catch (error) {
      update({ phase: "failed", loadError: `The project list could not be read: ${messageOf(error)}` });
    }
  }

  /** Runs one write with the busy flag held; returns false (and changes nothing) if busy. */
  async function write(action: () => Promise<void>): Promise<boolean> {
    if (state.busy) return false;
    update({ busy: true });
    try {
      await action();
      return true;
    } catch {
      return false;
    } finally {
      update({ busy: false });
    }
  }

  async function loadEngineInfo(): Promise<void> {
    try {
      const info = await deps.bridge.request("engine.info", {});
      update({ engine: { ...state.engine, status: "ready", version: info.version, error: null } });
    } catch (error) {
      update({ engine: { ...state.engine, status: "failed", version: null, error: messageOf(error) } });
    }
  }

  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },

    async start() {
      const engine = loadEngineInfo();
      try {
        await deps.prepare?.();
      } catch (error) {
        update({ notice: `The demo project could not be set up: ${messageOf(error)}` });
      }
      await Promise.all([reload(), engine]);
    },

    reload,

    setCreateDraft(text) {
      update({ createDraft: text, createError: null });
    },

    create() {
      return write(async () => {
        try {
          const created = await deps.repository.create({ name: state.createDraft });
          update({ createDraft: "", createError: null, lastDeleted: null, notice: `Created “${created.name}”.` });
          await reload();
        } catch (error) {
          update({ createError: messageOf(error) });
          throw error;
        }
      });
    },

    startRename(id) {
      const project = state.projects.find((p) => p.id === id);
      if (!project) return;
      update({ rename: { id, draft: project.name, error: null }, pendingDeleteId: null });
    },

    setRenameDraft(text) {
      if (state.rename) update({ rename: { ...state.rename, draft: text, error: null } });
    },

    commitRename() {
      const rename = state.rename;
      if (!rename) return Promise.resolve(false);
      return write(async () => {
        try {
          const renamed = await deps.repository.rename(rename.id, rename.draft);
          update({ rename: null, lastDeleted: null, notice: `Renamed to “${renamed.name}”.` });
          await reload();
        } catch (error) {
          update({ rename: { ...rename, error: messageOf(error) } });
          throw error;
        }
      });
    },

    cancelRename() {
      update({ rename: null });
    },

    askDelete(id) {
      if (state.projects.some((p) => p.id === id)) update({ pendingDeleteId: id, rename: null });
    },

    cancelDelete() {
      update({ pendingDeleteId: null });
    },

    confirmDelete() {
      const id = state.pendingDeleteId;
      if (!id) return Promise.resolve(false);
      return write(async () => {
        try {
          const removed = await deps.repository.remove(id);
          update({ pendingDeleteId: null, lastDeleted: removed, notice: `Deleted “${removed.name}”.` });
        } catch (error) {
          update({ pendingDeleteId: null, notice: messageOf(error) });
          throw error;
        } finally {
          await reload();
        }
      });
    },

    undoDelete() {
      const record = state.lastDeleted;
      if (!record) return Promise.resolve(false);
      return write(async () => {
        try {
          const restored = await deps.repository.restore(record);
          update({ lastDeleted: null, notice: `Restored “${restored.name}”.` });
        } catch (error) {
          update({ lastDeleted: null, notice: `“${record.name}” could not be restored: ${messageOf(error)}` });
          throw error;
        } finally {
          await reload();
        }
      });
    },

    async checkEngine() {
      if (state.engineCheck.status === "running") return;
      update({ engineCheck: { ...state.engineCheck, status: "running", error: null } });
      try {
        const matrix = ENGINE_CHECK_MATRIX.map((row) => [...row]);
        const { eigenvalues } = await deps.bridge.request("linalg.eigenvalues", { matrix });
        update({ engineCheck: { ...state.engineCheck, status: "done", eigenvalues, error: null } });
      } catch (error) {
        update({ engineCheck: { ...state.engineCheck, status: "failed", eigenvalues: null, error: messageOf(error) } });
      }
    },

    setTheme(theme) {
      update({ theme });
    },

    dismissNotice() {
      update({ notice: null });
    },
  };
}

/** Formats a complex number for display with a true minus sign, e.g. "−1", "−0.5 + 1.3229i". */
export function formatComplex(z: ComplexNumber, digits = 6): string {
  const fmt = (x: number): string => {
    const text = Number.parseFloat(x.toPrecision(digits)).toString();
    return text.replace("-", "−");
  };
  const re = Object.is(z.re, -0) ? 0 : z.re;
  if (z.im === 0) return fmt(re);
  const sign = z.im < 0 ? "−" : "+";
  return `${fmt(re)} ${sign} ${fmt(Math.abs(z.im))}i`;
}
