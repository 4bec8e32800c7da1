import { useRef, useState } from "react";
import { importProjectFile, type ImportDependencies, type ImportOutcome } from "../../io";

/** "Open a project file…": imports it as a new project; a rejected file is listed with its field paths. */
export function ImportProjectButton({ deps, onImported }: { deps: ImportDependencies; onImported: (projectId: string) => void }) {
  const input = useRef<HTMLInputElement>(null);
  const [outcome, setOutcome] = useState<ImportOutcome | null>(null);
  const [busy, setBusy] = useState(false);
  return (
    <div className="import-row">
      <input
        ref={input}
        type="file"
        accept=".json,application/json"
        className="visually-hidden"
        aria-label="Project file to open"
        data-testid="import-file"
        onChange={async (e) => {
          const file = e.target.files?.[0];
          e.target.value = "";
          if (!file) return;
          setBusy(true);
          const result = await importProjectFile(file, deps);
          setBusy(false);
          setOutcome(result);
          if (result.ok) onImported(result.project.id);
        }}
      />
      <button type="button" className="button-quiet" disabled={busy} onClick={() => input.current?.click()}>
        Open a project file…
      </button>
      {outcome && (
        <div className={outcome.ok ? "muted" : "error-text"} role={outcome.ok ? "status" : "alert"} data-testid="import-outcome">
          {outcome.ok ? `Opened “${outcome.project.name}” as a new project.` : outcome.message}
          {!outcome.ok && outcome.problems.length > 0 && (
            <ul className="problem-list">
              {outcome.problems.slice(0, 12).map((p, i) => (
                <li key={i}>
                  <code>{p.path || "(file)"}</code> {p.message}
                </li>
              ))}
            </ul>
          )}
          <button type="button" className="button-quiet" aria-label="Dismiss" onClick={() => setOutcome(null)}>
            ×
          </button>
        </div>
      )}
    </div>
  );
}
