/**
 * The "Design sheet" screen: pick a variant, read its sheet as it will print, print it, and
 * record a sign-off (role, name, date) that stores the design fingerprint in the project document.
 * Print: a PDF through the desktop app's preload (`window.loopwright.printSheet`) when present,
 * else the browser's print dialog (window.print, with the sheet's own @page rules); see
 * sheetPrinting.ts. With `?sheet-print=A4|Letter` in the URL (the desktop app's hidden print
 * window) only the sheet is rendered and its state is reported through document.title.
 *
 * Reached by the hash route "#/sheet/<projectId>[/<variantId>]" (see DesignSheetRoute).
 */
import { useEffect, useMemo, useState, useSyncExternalStore } from "react";
import type { EngineBridge } from "../../shared-engine/api/contract";
import type { DocumentStore } from "../db/documentStore";
import { DesignSheet } from "./DesignSheet";
import { createDesignSheetStore } from "./designSheetStore";
import { SIGN_OFF_ROLES, type SignOffRole } from "./sheetModel";
import { sheetCss } from "./sheetStyles";
import { chooseSheetPrinter, describePrintOutcome, readSheetPrintMode, sheetStatusTitle, type SheetPrintHost, type SheetPrintOutcome } from "./sheetPrinting";

export interface DesignSheetDeps {
  bridge: EngineBridge;
  documents: DocumentStore;
  /** Replaces the print action (tests); by default chosen by `chooseSheetPrinter(window)`. */
  print?: () => void;
  today?: () => string;
  /** Where print-only mode is read from; defaults to `window.location.search`. */
  locationSearch?: string;
}

export function DesignSheetView({ deps, projectId, variantId, onClose }: { deps: DesignSheetDeps; projectId: string; variantId?: string; onClose?: () => void }) {
  const store = useMemo(() => createDesignSheetStore(deps), [deps]);
  const state = useSyncExternalStore(store.subscribe, store.getState, store.getState);
  const today = deps.today ?? (() => new Date().toISOString().slice(0, 10));
  const [role, setRole] = useState<SignOffRole>("prepared");
  const [name, setName] = useState("");
  const [date, setDate] = useState(today);
  const printMode = useMemo(() => readSheetPrintMode(deps.locationSearch ?? window.location.search), [deps.locationSearch]);
  const [printing, setPrinting] = useState(false);
  const [printOutcome, setPrintOutcome] = useState<SheetPrintOutcome | null>(null);
  useEffect(() => {
    if (printMode) store.setPageSize(printMode.pageSize);
    void store.load(projectId, variantId);
  }, [store, projectId, variantId, printMode]);
  const { project, result, variantId: chosen } = state;
  // Print-only mode: tell main (watching the title) once the sheet is committed to the DOM.
  useEffect(() => {
    if (!printMode) return;
    const title = sheetStatusTitle(state.phase, state.phase === "failed" ? (state.error ?? "unknown error") : (project?.name ?? ""));
    if (title) document.title = title;
  }, [printMode, state.phase, state.error, project]);
  const print = async (): Promise<void> => {
    if (deps.print) return deps.print();
    if (!chosen) return;
    setPrinting(true);
    setPrintOutcome(null);
    const outcome = await chooseSheetPrinter(window as unknown as SheetPrintHost)(sheetRouteHash(projectId, chosen), state.pageSize);
    setPrinting(false);
    setPrintOutcome(outcome);
  };
  if (printMode) {
    return (
      <section className="lw-sheet-view">
        {state.phase === "failed" && <p className="error-text" role="alert">{state.error}</p>}
        {state.phase === "ready" && project && result && chosen && state.engineVersion && (
          <>
            <style>{`${sheetCss(state.pageSize, { project: project.name, variant: chosen, revision: String(state.revision), date: today() })}
@media print { .top-bar, .status-line { display: none !important; } }`}</style>
            <DesignSheet project={project} variantId={chosen} result={result} revision={String(state.revision)} date={today()} pageSize={state.pageSize} engineVersion={state.engineVersion} />
          </>
        )}
      </section>
    );
  }
  return (
    <section className="panel lw-sheet-view" aria-labelledby="sheet-heading">
      <div className="panel-head lw-sheet-noprint">
        <h1 id="sheet-heading">Design sheet</h1>
        {onClose && <button type="button" className="button-quiet" onClick={onClose}>Back</button>}
      </div>
      <div className="create-row lw-sheet-noprint">
        <label htmlFor="sheet-variant">Variant</label>
        <select id="sheet-variant" value={chosen ?? ""} onChange={(e) => void store.chooseVariant(e.target.value)} disabled={!project}>
          {(project?.variants ?? []).map((v) => <option key={v.id} value={v.id}>{v.name ?? v.id}</option>)}
        </select>
        <label htmlFor="sheet-page">Paper</label>
        <select id="sheet-page" value={state.pageSize} onChange={(e) => store.setPageSize(e.target.value === "letter" ? "letter" : "a4")}>
          <option value="a4">A4</option>
          <option value="letter">US Letter</option>
        </select>
        <button type="button" className="button-accent" disabled={state.phase !== "ready" || printing} onClick={() => void print()}>{printing ? "Printing…" : "Print"}</button>
      </div>
      <form
        className="create-row lw-sheet-noprint"
        aria-label="Sign off"
        onSubmit={(e) => {
          e.preventDefault();
          void store.signOff({ role, name, date }).then((ok) => ok && setName(""));
        }}
      >
        <label htmlFor="sheet-role">Sign off as</label>
        <select id="sheet-role" value={role} onChange={(e) => setRole(e.target.value as SignOffRole)}>
          {SIGN_OFF_ROLES.map((r) => <option key={r} value={r}>{r}</option>)}
        </select>
        <label htmlFor="sheet-name">Name</label>
        <input id="sheet-name" className="text-input" value={name} onChange={(e) => setName(e.target.value)} autoComplete="name" />
        <label htmlFor="sheet-date">Date</label>
        <input id="sheet-date" className="text-input num" value={date} onChange={(e) => setDate(e.target.value)} placeholder="yyyy-mm-dd" />
        <button type="submit" className="button-accent" disabled={state.phase !== "ready" || state.busy}>Record sign-off</button>
      </form>
      <p className="notice-line lw-sheet-noprint" role="status" aria-live="polite">{state.notice ?? ""}</p>
      {printOutcome && describePrintOutcome(printOutcome) && (
        <p className={`${printOutcome.kind === "failed" ? "error-text" : "notice-line"} lw-sheet-noprint`} role={printOutcome.kind === "failed" ? "alert" : "status"}>
          {describePrintOutcome(printOutcome)}
        </p>
      )}
      {state.phase === "failed" && <p className="error-text" role="alert">{state.error}</p>}
      {state.phase === "loading" && <p className="muted">Designing the variant…</p>}
      {state.phase === "ready" && project && result && chosen && state.engineVersion && (
        <>
          <style>{`${sheetCss(state.pageSize, { project: project.name, variant: chosen, revision: String(state.revision), date: today() })}
@media print { .lw-sheet-noprint, .top-bar, .status-line { display: none !important; } }`}</style>
          <DesignSheet project={project} variantId={chosen} result={result} revision={String(state.revision)} date={today()} pageSize={state.pageSize} engineVersion={state.engineVersion} />
        </>
      )}
    </section>
  );
}

/** "#/sheet/<projectId>[/<variantId>]" → ids, or null for any other hash. */
export function parseSheetRoute(hash: string): { projectId: string; variantId?: string } | null {
  const match = /^#\/sheet\/([^/]+)(?:\/([^/]+))?$/.exec(hash);
  if (!match) return null;
  return { projectId: decodeURIComponent(match[1]!), ...(match[2] ? { variantId: decodeURIComponent(match[2]) } : {}) };
}

export const sheetRouteHash = (projectId: string, variantId?: string): string =>
  `#/sheet/${encodeURIComponent(projectId)}${variantId ? `/${encodeURIComponent(variantId)}` : ""}`;
