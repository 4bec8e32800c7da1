import { useEffect, useState } from "react";
import type { FieldDraft } from "../../state/workspace";

interface Props {
  /** The document's value (shown when there is no draft and the field is not being typed in). */
  value: number;
  draft: FieldDraft | undefined;
  label: string;
  /** Commits the text; the store keeps it as a draft when it does not parse. */
  onCommit: (text: string) => void;
  className?: string;
  id?: string;
  testId?: string;
  /** Multi-cell text pasted into the field (tabs or line breaks): handled by the owner instead. */
  onPasteText?: (text: string) => void;
}

/** Shortest text that reads back as the same number, with a true minus sign shown as ASCII for editing. */
export function numberText(value: number): string {
  return Number.isFinite(value) ? String(value) : "";
}

/**
 * A numeric text field that never loses what was typed: while focused it shows the typed text;
 * on Enter or blur the text is committed; an unparsable text stays, marked invalid, with the
 * message beside it.
 */
export function NumberField({ value, draft, label, onCommit, className, id, testId, onPasteText }: Props) {
  const shown = draft?.text ?? numberText(value);
  const [text, setText] = useState(shown);
  const [editing, setEditing] = useState(false);
  useEffect(() => {
    if (!editing) setText(shown);
  }, [shown, editing]);
  const errorId = id ? `${id}-error` : undefined;
  return (
    <span className={`number-field${draft ? " invalid" : ""}`}>
      <input
        id={id}
        data-testid={testId}
        className={`num cell-input ${className ?? ""}`}
        aria-label={label}
        aria-invalid={draft ? true : undefined}
        aria-describedby={draft && errorId ? errorId : undefined}
        title={draft ? draft.error : label}
        value={editing ? text : shown}
        inputMode="decimal"
        spellCheck={false}
        onFocus={() => {
          setText(shown);
          setEditing(true);
        }}
        onChange={(e) => setText(e.target.value)}
        onPaste={(e) => {
          const pasted = e.clipboardData.getData("text");
          if (onPasteText && /[\t\n;]/.test(pasted.trim())) {
            e.preventDefault();
            setEditing(false);
            onPasteText(pasted);
          }
        }}
        onBlur={() => {
          setEditing(false);
          if (text !== shown || draft) onCommit(text);
        }}
        onKeyDown={(e) => {
          if (e.key === "Enter") {
            e.preventDefault();
            onCommit(text);
          } else if (e.key === "Escape") {
            setText(shown);
          }
        }}
      />
      {draft && errorId && (
        <span id={errorId} className="visually-hidden">
          {draft.error}
        </span>
      )}
    </span>
  );
}
