/**
 * The "Design sheet" screen: pick a variant, read its sheet as it will print, print it
 * (window.print, with the sheet's own @page rules), and record a sign-off (role, name, date)
 * that stores the design fingerprint in the project document.
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

export interface DesignSheetDeps {
  bridge: EngineBridge;
  documents: DocumentStore;
  print?: () => void;
  today?: () => string;
}

export function DesignSheetView({ deps, projectId, variantId, onClose }: { deps: DesignSheetDeps; projectId: string; variantId?: string; onClose?: () => void }) {
  const store = useMemo(() => createDesignSheetStore(deps), [deps]);
  const state = useSyncExternalStore(store.subscribe, store.getState);
  const today = deps.today ?? (() => new Date().toISOString().slice(0, 10));
  const [role, setRole] = useState<SignOffRole>("prepared");
  const [name, setName] = useState("");
  const [date, setDate] = useState(today);
  useEffect(() => void store.load(projectId, variantId), [store, projectId, variantId]);
  const { project, result, variantId: chosen } = state;
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
        <button type="button" className="button-accent" disabled={state.phase !== "ready"} onClick={() => (deps.print ?? (() => window.print()))()}>Print</button>
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
