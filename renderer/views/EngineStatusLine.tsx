import { formatComplex, type ProjectListStore } from "../state/projectListStore";
import { useStoreState } from "./useStoreState";

const TRANSPORT_LABEL = { worker: "Web Worker (browser mode)", ipc: "desktop engine process" } as const;

function matrixText(matrix: readonly (readonly number[])[]): string {
  return "[" + matrix.map((row) => "[" + row.map((v) => String(v).replace("-", "−")).join(", ") + "]").join(", ") + "]";
}

/** The bottom line: engine version reached through the bridge, and a one-click engine check. */
export function EngineStatusLine({ store }: { store: ProjectListStore }) {
  const { engine, engineCheck } = useStoreState(store);
  const statusText =
    engine.status === "ready"
      ? `Engine ${engine.version} ready`
      : engine.status === "connecting"
        ? "Engine starting…"
        : `Engine unavailable: ${engine.error}`;
  return (
    <footer className="status-line" aria-label="Engine status">
      <span className={`status-dot status-${engine.status}`} aria-hidden="true" />
      <span data-testid="engine-status">{statusText}</span>
      <span className="muted">via {TRANSPORT_LABEL[engine.transport]}</span>
      <span className="status-spacer" />
      <button
        type="button"
        className="button-quiet"
        onClick={() => void store.checkEngine()}
        disabled={engineCheck.status === "running"}
        aria-describedby="engine-check-result"
      >
        Check the engine
      </button>
      <output id="engine-check-result" className="engine-check" aria-live="polite" data-testid="engine-check">
        {engineCheck.status === "idle" && <span className="muted">eigenvalues of {matrixText(engineCheck.matrix)}</span>}
        {engineCheck.status === "running" && "computing…"}
        {engineCheck.status === "done" && engineCheck.eigenvalues && (
          <>
            eig {matrixText(engineCheck.matrix)} = <span className="num">{engineCheck.eigenvalues.map((z) => formatComplex(z)).join(", ")}</span>
          </>
        )}
        {engineCheck.status === "failed" && <span className="error-text">{engineCheck.error}</span>}
      </output>
    </footer>
  );
}
