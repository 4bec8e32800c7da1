import { useEffect, useRef } from "react";

/** Every keyboard shortcut of the workspace. Keep in step with the handlers in WorkspaceView and the plots. */
export const WORKSPACE_SHORTCUTS: readonly { keys: string; action: string }[] = [
  { keys: "?", action: "Open or close this list of shortcuts" },
  { keys: "Ctrl+Z", action: "Undo the last change (the button shows what it undoes)" },
  { keys: "Ctrl+Shift+Z or Ctrl+Y", action: "Redo" },
  { keys: "Alt+1 … Alt+7", action: "Go to the tabs Plant, Structure, Design, Equations, Locus, Check, Responses" },
  { keys: "← / → on a tab", action: "Move to the previous or next tab" },
  { keys: "Tab / Shift+Tab", action: "Move between fields, buttons and plot marks" },
  { keys: "Enter in a field", action: "Apply the typed value (a value that does not parse stays, marked, with its message)" },
  { keys: "Escape in a field", action: "Go back to the last applied value" },
  { keys: "Arrow keys on a focused pole", action: "Move a design pole (its conjugate follows)" },
  { keys: "Escape", action: "Close this list" },
];

interface Props {
  open: boolean;
  onClose: () => void;
}

export function ShortcutsHelp({ open, onClose }: Props) {
  const closeButton = useRef<HTMLButtonElement>(null);
  useEffect(() => {
    if (open) closeButton.current?.focus();
  }, [open]);
  if (!open) return null;
  return (
    <div className="shortcuts-help" role="dialog" aria-modal="false" aria-labelledby="shortcuts-title" data-testid="shortcuts-help"
      onKeyDown={(e) => {
        if (e.key === "Escape") {
          e.stopPropagation();
          onClose();
        }
      }}>
      <div className="shortcuts-head">
        <h2 id="shortcuts-title">Keyboard shortcuts</h2>
        <button ref={closeButton} type="button" className="button-quiet small" onClick={onClose}>
          Close
        </button>
      </div>
      <table className="shortcuts-table">
        <thead>
          <tr>
            <th scope="col">Keys</th>
            <th scope="col">What they do</th>
          </tr>
        </thead>
        <tbody>
          {WORKSPACE_SHORTCUTS.map((s) => (
            <tr key={s.keys}>
              <td><kbd>{s.keys}</kbd></td>
              <td>{s.action}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}
