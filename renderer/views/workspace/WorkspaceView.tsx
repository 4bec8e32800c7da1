import { useEffect, useMemo, useRef, useState } from "react";
import type { EngineBridge, ProjectFile } from "../../../shared-engine/api/contract";
import type { DocumentStore } from "../../db/documentStore";
import {
  activeVariantOf,
  addVariantCommand,
  createWorkspaceStore,
  duplicateVariantCommand,
  plantDimensionsOf,
  removeVariantCommand,
  renameVariantCommand,
  signalNames,
  type WorkspaceStore,
} from "../../state/workspace";
import { DesignPanel } from "./DesignPanel";
import { DiagnosticsPanel } from "./DiagnosticsPanel";
import { MetricsStrip } from "./MetricsStrip";
import { PlantEditor } from "./PlantEditor";
import { ResultPlots } from "./ResultPlots";
import { StructurePanel } from "./StructurePanel";
import { StructureDetails } from "./StructureDetails";
import { ResponsesPanel } from "./ResponsesPanel";
import { LocusPanel } from "./LocusPanel";
import { NonlinearCheckPanel } from "./NonlinearCheckPanel";
import { NonlinearEditor } from "./NonlinearEditor";
import { ShortcutsHelp } from "./ShortcutsHelp";
import { useWorkspaceState } from "./useWorkspaceState";
import "./workspace.css";

interface Props {
  projectId: string;
  projectName: string;
  documents: DocumentStore;
  bridge: EngineBridge;
  onClose: () => void;
  /** Document for a project never saved yet (the demo's example). */
  initialDocument?: ProjectFile;
}

type Tab = "plant" | "structure" | "design" | "equations" | "locus" | "check" | "responses";
const TABS: { id: Tab; label: string; key: string }[] = [
  { id: "plant", label: "Plant", key: "1" },
  { id: "structure", label: "Structure", key: "2" },
  { id: "design", label: "Design", key: "3" },
  { id: "equations", label: "Equations", key: "4" },
  { id: "locus", label: "Locus", key: "5" },
  { id: "check", label: "Check", key: "6" },
  { id: "responses", label: "Responses", key: "7" },
];

/** Owns one workspace store for the open project; flushes pending saves when the screen closes. */
export function WorkspaceView(props: Props) {
  const { projectId, documents, bridge, initialDocument } = props;
  const store = useMemo(
    () =>
      createWorkspaceStore({
        documents,
        bridge,
        projectId,
        initialDocument: () => (initialDocument ? structuredClone(initialDocument) : null),
        onResult: (_result, durationMs, kind) => {
          // Engine time (request to answer, worker included) and frame time of the redraw: from
          // the result's arrival to the next painted frame. Read by `npm run bench:ui`.
          performance.measure?.("lw:engine", { start: performance.now() - durationMs, duration: durationMs, detail: { kind } });
          performance.mark?.("lw:result");
          requestAnimationFrame(() => requestAnimationFrame(() => performance.measure?.("lw:frame", "lw:result")));
          // lw:paint: to just after the frame that shows the result is painted (a message posted
          // from its animation frame runs after that paint); lw:frame above also waits a whole
          // extra frame interval, so it is never below ~16.7 ms.
          requestAnimationFrame(() => {
            const channel = new MessageChannel();
            channel.port1.onmessage = () => performance.measure?.("lw:paint", "lw:result");
            channel.port2.postMessage(null);
          });
        },
      }),
    [projectId, documents, bridge],
  );
  useEffect(() => {
    void store.load();
    return () => {
      void store.flushSave().finally(() => store.dispose());
    };
  }, [store]);
  return <Workspace {...props} store={store} />;
}

function Workspace({ store, projectName, onClose, bridge }: Props & { store: WorkspaceStore }) {
  const [helpOpen, setHelpOpen] = useState(false);
  const state = useWorkspaceState(store);
  const [tab, setTab] = useState<Tab>("design");
  const [editedPlantId, setEditedPlantId] = useState<string | null>(null);
  const tabRefs = useRef<Record<Tab, HTMLButtonElement | null>>({ plant: null, structure: null, design: null, equations: null, locus: null, check: null, responses: null });
  const plotBox = useRef<HTMLDivElement>(null);
  const [plotWidth, setPlotWidth] = useState(720);

  useEffect(() => {
    const el = plotBox.current;
    if (!el || typeof ResizeObserver === "undefined") return;
    const observer = new ResizeObserver(() => setPlotWidth(Math.max(480, Math.floor(el.clientWidth) - 22)));
    observer.observe(el);
    return () => observer.disconnect();
  }, [state.phase]);

  useEffect(() => {
    const onKey = (e: KeyboardEvent) => {
      const mod = e.ctrlKey || e.metaKey;
      const typing = e.target instanceof HTMLInputElement || e.target instanceof HTMLTextAreaElement || e.target instanceof HTMLSelectElement;
      if (e.key === "?" && !mod && !typing) {
        e.preventDefault();
        setHelpOpen((open) => !open);
        return;
      }
      if (e.key === "Escape") setHelpOpen(false);
      if (!mod) return;
      const inText = e.target instanceof HTMLInputElement && e.target.type !== "range" && e.target.type !== "checkbox" && e.target.type !== "radio";
      if (e.key.toLowerCase() === "z" && !inText) {
        e.preventDefault();
        if (e.shiftKey) store.redo();
        else store.undo();
      } else if (e.key.toLowerCase() === "y" && !inText) {
        e.preventDefault();
        store.redo();
      } else if (e.altKey && TABS.some((t) => t.key === e.key)) {
        e.preventDefault();
        const t = TABS.find((x) => x.key === e.key)!.id;
        setTab(t);
        tabRefs.current[t]?.focus();
      }
    };
    window.addEventListener("keydown", onKey);
    return () => window.removeEventListener("keydown", onKey);
  }, [store]);

  if (state.phase === "loading") return <p className="muted page">Opening the project…</p>;
  if (state.phase === "failed" || !state.document) {
    return (
      <section className="panel">
        <p className="error-text" role="alert">
          {state.loadError}
        </p>
        <button type="button" className="button-quiet" onClick={() => void store.load()}>
          Try again
        </button>{" "}
        <button type="button" className="button-quiet" onClick={onClose}>
          Back to projects
        </button>
      </section>
    );
  }
  const doc = state.document;
  const variant = activeVariantOf(state);
  const plant = variant ? doc.plants.find((p) => p.id === variant.plant) ?? doc.plants[0]! : doc.plants[0]!;
  const editedPlant = doc.plants.find((p) => p.id === editedPlantId) ?? plant;
  const result = state.evaluation.variantId === variant?.id ? state.evaluation.result : null;
  const dims = plantDimensionsOf(doc, plant.id, result) ?? { states: 1, inputs: 1, outputs: 1, disturbances: 0 };
  const names =
    plant.model.type === "state-space"
      ? { states: signalNames(plant.model.names, "states", dims.states), inputs: signalNames(plant.model.names, "inputs", dims.inputs), outputs: signalNames(plant.model.names, "outputs", dims.outputs) }
      : { states: result?.plant?.names.states ?? signalNames(undefined, "states", dims.states), inputs: result?.plant?.names.inputs ?? ["u1"], outputs: result?.plant?.names.outputs ?? ["y1"] };
  const styleIndex = Math.max(0, doc.variants.findIndex((v) => v.id === variant?.id));
  const saveText = {
    saved: `Saved (revision ${state.save.revision})`,
    pending: "Unsaved changes…",
    saving: "Saving…",
    conflict: "Not saved: changed elsewhere",
    failed: "Not saved",
  }[state.save.status];

  return (
    <div className="workspace" data-testid="workspace">
      <div className="workspace-bar">
        <button type="button" className="button-quiet" onClick={() => void store.flushSave().then(onClose)}>
          ← Projects
        </button>
        <h1 className="workspace-title" title={doc.name}>
          {projectName}
        </h1>
        <label htmlFor="variant-select" className="muted">
          Variant
        </label>
        <select id="variant-select" className="text-input variant-select" value={variant?.id ?? ""} onChange={(e) => store.selectVariant(e.target.value)}>
          {doc.variants.map((v) => (
            <option key={v.id} value={v.id}>
              {v.name ?? v.id}
              {v.baseline ? " (baseline)" : ""}
            </option>
          ))}
        </select>
        <button type="button" className="button-quiet small" onClick={() => addVariantCommand(store, plant.id, "poles", dims)}>
          New
        </button>
        {variant && (
          <>
            <button type="button" className="button-quiet small" onClick={() => duplicateVariantCommand(store, variant.id)}>
              Duplicate
            </button>
            <button type="button" className="button-quiet small" onClick={() => removeVariantCommand(store, variant.id)} aria-label={`Remove variant ${variant.name ?? variant.id} (undo brings it back)`}>
              Remove
            </button>
          </>
        )}
        <span className="status-spacer" />
        <button type="button" className="button-quiet small" disabled={!state.undoLabel} onClick={() => store.undo()} title={state.undoLabel ? `Undo: ${state.undoLabel} (Ctrl+Z)` : "Nothing to undo"}>
          Undo
        </button>
        <button type="button" className="button-quiet small" disabled={!state.redoLabel} onClick={() => store.redo()} title={state.redoLabel ? `Redo: ${state.redoLabel} (Ctrl+Shift+Z)` : "Nothing to redo"}>
          Redo
        </button>
        <button type="button" className="button-quiet small" onClick={() => setHelpOpen((open) => !open)} aria-expanded={helpOpen} title="Keyboard shortcuts (?)">
          Shortcuts (?)
        </button>
        <span className={`save-status save-${state.save.status}`} data-testid="save-status" role="status">
          {saveText}
        </span>
      </div>
      {(state.save.status === "conflict" || state.save.status === "failed") && (
        <div className="warning-box" role="alert">
          {state.save.error}{" "}
          {state.save.status === "conflict" ? (
            <>
              <button type="button" className="button-quiet small" onClick={() => void store.keepMineAfterConflict()}>
                Keep mine
              </button>
              <button type="button" className="button-quiet small" onClick={() => void store.takeTheirsAfterConflict()}>
                Load theirs
              </button>
            </>
          ) : (
            <button type="button" className="button-quiet small" onClick={() => void store.flushSave()}>
              Save again
            </button>
          )}
        </div>
      )}
      <ShortcutsHelp open={helpOpen} onClose={() => setHelpOpen(false)} />
      {state.editError && (
        <div className="warning-box" role="alert" data-testid="edit-error">
          {state.editError}{" "}
          <button type="button" className="button-quiet small" onClick={() => store.dismissEditError()} aria-label="Dismiss message">
            ×
          </button>
        </div>
      )}
      <div className="workspace-columns">
        <div className="workspace-editor">
          <div role="tablist" aria-label="Workspace sections" className="tabs">
            {TABS.map((t, i) => (
              <button
                key={t.id}
                ref={(el) => {
                  tabRefs.current[t.id] = el;
                }}
                role="tab"
                id={`tab-${t.id}`}
                aria-selected={tab === t.id}
                aria-controls={`panel-${t.id}`}
                tabIndex={tab === t.id ? 0 : -1}
                className="tab"
                title={`Alt+${t.key}`}
                onClick={() => setTab(t.id)}
                onKeyDown={(e) => {
                  const d = e.key === "ArrowRight" ? 1 : e.key === "ArrowLeft" ? -1 : 0;
                  if (!d) return;
                  const next = TABS[(i + d + TABS.length) % TABS.length]!.id;
                  setTab(next);
                  tabRefs.current[next]?.focus();
                }}
              >
                {t.label}
              </button>
            ))}
          </div>
          <div role="tabpanel" id={`panel-${tab}`} aria-labelledby={`tab-${tab}`} className="tab-panel">
            {tab === "plant" && (
              <>
                {doc.plants.length > 1 && (
                  <div className="form-row">
                    <label htmlFor="plant-select">Plant</label>
                    <select id="plant-select" className="text-input" value={editedPlant.id} onChange={(e) => setEditedPlantId(e.target.value)}>
                      {doc.plants.map((p) => (
                        <option key={p.id} value={p.id}>
                          {p.name ?? p.id}
                          {p.id === plant.id ? " (used by this variant)" : ""}
                        </option>
                      ))}
                    </select>
                  </div>
                )}
                <PlantEditor store={store} state={state} plant={editedPlant} />
              </>
            )}
            {tab === "structure" && (
              <>
                <StructurePanel plant={result?.plant} />
                <StructureDetails bridge={bridge} plant={plant} result={result} />
              </>
            )}
            {tab === "responses" && (variant ? <ResponsesPanel bridge={bridge} plant={plant} variant={variant} result={result} styleIndex={styleIndex} width={520} /> : <p className="muted">Add a design variant first.</p>)}
            {tab === "equations" && (() => {
              const nonlinearPlants = doc.plants.filter((p) => p.model.type === "nonlinear");
              const shown = editedPlant.model.type === "nonlinear" ? editedPlant : nonlinearPlants[0];
              if (!shown) return <p className="muted">No plant of this project is given by equations; the Plant tab edits the linear ones.</p>;
              return (
                <>
                  {nonlinearPlants.length > 1 && (
                    <div className="form-row">
                      <label htmlFor="equations-plant-select">Plant</label>
                      <select id="equations-plant-select" className="text-input" value={shown.id} onChange={(e) => setEditedPlantId(e.target.value)}>
                        {nonlinearPlants.map((p) => <option key={p.id} value={p.id}>{p.name ?? p.id}</option>)}
                      </select>
                    </div>
                  )}
                  <NonlinearEditor store={store} state={state} bridge={bridge} plant={shown} onSelectPlant={(id) => { setEditedPlantId(id); setTab("plant"); }} />
                </>
              );
            })()}
            {tab === "locus" && (variant ? <LocusPanel bridge={bridge} document={doc} variant={variant} result={result} width={520} /> : <p className="muted">Add a design variant first.</p>)}
            {tab === "check" && (variant ? <NonlinearCheckPanel bridge={bridge} document={doc} variant={variant} result={result} styleIndex={styleIndex} width={520} /> : <p className="muted">Add a design variant first.</p>)}
            {tab === "design" &&
              (variant ? (
                <>
                  <div className="form-row">
                    <label htmlFor="variant-name">Variant name</label>
                    <input id="variant-name" key={variant.id} className="text-input" defaultValue={variant.name ?? ""} onBlur={(e) => e.target.value !== (variant.name ?? "") && renameVariantCommand(store, variant.id, e.target.value)} />
                  </div>
                  <DesignPanel store={store} state={state} variant={variant} dims={dims} names={names} bridge={bridge} plant={plant} />
                </>
              ) : (
                <div className="empty-state">
                  <p>This project has no design variant yet.</p>
                  <button type="button" className="button-accent" onClick={() => addVariantCommand(store, plant.id, "poles", dims)}>
                    Start a pole-placement design
                  </button>{" "}
                  <button type="button" className="button-quiet" onClick={() => addVariantCommand(store, plant.id, "lqr", dims)}>
                    Start an LQR design
                  </button>
                </div>
              ))}
          </div>
        </div>
        <div className="workspace-results" ref={plotBox}>
          <MetricsStrip result={result} />
          <DiagnosticsPanel evaluation={state.evaluation} onCancel={() => store.cancelEvaluation()} onRetry={() => store.evaluateNow()} />
          {variant && <ResultPlots store={store} variant={variant} result={result} styleIndex={styleIndex} width={plotWidth - 4} />}
        </div>
      </div>
    </div>
  );
}
