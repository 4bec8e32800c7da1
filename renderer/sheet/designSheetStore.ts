/**
 * State of the "Design sheet" view in plain TypeScript (commands in, snapshots out): load the
 * project document, pick a variant, evaluate it through the engine bridge, record a sign-off
 * into the document's signOffs through the DocumentStore. React only reads snapshots.
 * Recording a sign-off is what locks a variant; the locking rules live with the variant editor.
 */
import type { EngineBridge, ProjectFile, VariantResult } from "../../shared-engine/api/contract";
import type { SignOffSpec } from "./sheetModel";
import { fingerprint } from "../../shared-engine/project/fingerprint";
import type { DocumentStore } from "../db/documentStore";
import type { PageSize, SignOffRole } from "./sheetModel";

export interface DesignSheetState {
  phase: "idle" | "loading" | "ready" | "failed";
  error: string | null;
  project: ProjectFile | null;
  revision: number;
  variantId: string | null;
  result: VariantResult | null;
  engineVersion: string | null;
  pageSize: PageSize;
  busy: boolean;
  notice: string | null;
}

export interface DesignSheetStore {
  getState(): DesignSheetState;
  subscribe(listener: () => void): () => void;
  load(projectId: string, variantId?: string): Promise<void>;
  chooseVariant(variantId: string): Promise<void>;
  setPageSize(pageSize: PageSize): void;
  signOff(entry: { role: SignOffRole; name: string; date: string; comment?: string }): Promise<boolean>;
}

const message = (error: unknown): string => (error instanceof Error ? error.message : String(error));

export function createDesignSheetStore(deps: { bridge: EngineBridge; documents: DocumentStore }): DesignSheetStore {
  let state: DesignSheetState = { phase: "idle", error: null, project: null, revision: 0, variantId: null, result: null, engineVersion: null, pageSize: "a4", busy: false, notice: null };
  let projectId = "";
  const listeners = new Set<() => void>();
  const set = (patch: Partial<DesignSheetState>) => {
    state = { ...state, ...patch };
    for (const l of listeners) l();
  };

  async function evaluate(variantId: string): Promise<void> {
    const project = state.project!;
    const variant = project.variants.find((v) => v.id === variantId);
    if (!variant) return set({ phase: "failed", error: `No variant "${variantId}" in this project` });
    const plant = project.plants.find((p) => p.id === variant.plant);
    if (!plant) return set({ phase: "failed", error: `Variant "${variantId}" names plant "${variant.plant}", which is not in the project` });
    set({ phase: "loading", variantId, result: null });
    try {
      const [info, result] = await Promise.all([
        state.engineVersion ? Promise.resolve({ version: state.engineVersion }) : deps.bridge.request("engine.info", {}),
        deps.bridge.request("project.evaluateVariant", { plant, variant, requirements: project.requirements }),
      ]);
      set({ phase: "ready", result, engineVersion: info.version, error: null });
    } catch (error) {
      set({ phase: "failed", error: message(error) });
    }
  }

  return {
    getState: () => state,
    subscribe(listener) {
      listeners.add(listener);
      return () => listeners.delete(listener);
    },
    async load(id, variantId) {
      projectId = id;
      set({ phase: "loading", error: null, notice: null });
      try {
        const stored = await deps.documents.load(id);
        set({ project: stored.document, revision: stored.revision });
        const chosen = variantId ?? stored.document.variants[0]?.id;
        if (!chosen) return set({ phase: "failed", error: "This project has no design variants yet" });
        await evaluate(chosen);
      } catch (error) {
        set({ phase: "failed", error: message(error) });
      }
    },
    chooseVariant: (variantId) => evaluate(variantId),
    setPageSize: (pageSize) => set({ pageSize }),
    async signOff({ role, name, date, comment }) {
      const { project, variantId, engineVersion } = state;
      if (!project || !variantId || !engineVersion || state.busy) return false;
      if (name.trim() === "") return set({ notice: "Enter the name of the person signing off." }), false;
      if (!/^\d{4}-\d{2}-\d{2}$/.test(date)) return set({ notice: "Enter the date as yyyy-mm-dd." }), false;
      const variant = project.variants.find((v) => v.id === variantId)!;
      const plant = project.plants.find((p) => p.id === variant.plant)!;
      const entry: SignOffSpec = { variant: variantId, role, name: name.trim(), date, fingerprint: fingerprint(plant, variant, engineVersion), ...(comment ? { comment } : {}) };
      const document: ProjectFile = { ...project, signOffs: [...(project.signOffs ?? []), entry] };
      set({ busy: true });
      try {
        const saved = await deps.documents.save(projectId, document, { baseRevision: state.revision, message: `${role} sign-off of variant ${variantId} by ${entry.name}` });
        set({ busy: false, project: saved.document, revision: saved.revision, notice: `Recorded: ${role} by ${entry.name} for ${entry.fingerprint}.` });
        return true;
      } catch (error) {
        set({ busy: false, notice: `The sign-off was not recorded: ${message(error)}` });
        return false;
      }
    },
  };
}
