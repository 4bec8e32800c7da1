/** The plant editor's panel of signal names and units (linear plants). */
import { useEffect, useState } from "react";
import { linearSignalCounts, renameSignalCommand, setUnitCommand, signalNames, signalUnits, type SignalKind } from "../../state/workspace";
import type { PlantEditorProps } from "./plantEditorProps";
import { KIND_LABEL } from "./SizeForm";

/**
 * Names and units of a linear plant's signals, stored in the model's `names`/`units`: every kind
 * of a state-space plant; the inputs and outputs of a transfer-function or zero-pole-gain plant
 * (their states belong to the realization). A refused name keeps the typed text, marked.
 */
export function SignalTable({ store, state, plant }: PlantEditorProps) {
  if (plant.model.type === "nonlinear") return null;
  const model = plant.model;
  const dims = linearSignalCounts(model);
  return (
    <details className="signal-table" open>
      <summary>Signal names and units</summary>
      {model.type !== "state-space" && <p className="muted hint">Inputs and outputs; the states are those of the realization the design computes.</p>}
      <div className="signal-columns">
        {(Object.keys(KIND_LABEL) as SignalKind[])
          .filter((k) => dims[k] > 0)
          .map((kind) => {
            const names = signalNames(model.names, kind, dims[kind]);
            const units = signalUnits(model.units, kind, dims[kind]);
            return (
              <fieldset key={kind} className="signal-kind">
                <legend>{KIND_LABEL[kind]}</legend>
                {names.map((name, i) => {
                  const key = `${plant.id}:name:${kind}:${i}`;
                  const draft = state.drafts[key];
                  return (
                    <div key={i} className="signal-row">
                      <TextCommitField value={draft?.text ?? name} invalid={!!draft} label={`Name of ${kind.slice(0, -1)} ${i + 1}`} onCommit={(t) => renameSignalCommand(store, plant.id, kind, i, t)} />
                      <TextCommitField value={units[i] ?? ""} label={`Unit of ${name}`} placeholder="unit" onCommit={(t) => setUnitCommand(store, plant.id, kind, i, t)} small />
                      {draft && <span className="error-text small-text">{draft.error}</span>}
                    </div>
                  );
                })}
              </fieldset>
            );
          })}
      </div>
    </details>
  );
}

function TextCommitField({ value, label, onCommit, invalid, placeholder, small }: { value: string; label: string; onCommit: (t: string) => void; invalid?: boolean; placeholder?: string; small?: boolean }) {
  const [text, setText] = useState(value);
  useEffect(() => setText(value), [value]);
  return (
    <input
      className={`text-input ${small ? "unit-input" : "name-input"}`}
      aria-label={label}
      aria-invalid={invalid ? true : undefined}
      value={text}
      placeholder={placeholder}
      onChange={(e) => setText(e.target.value)}
      onBlur={() => text !== value && onCommit(text)}
      onKeyDown={(e) => e.key === "Enter" && text !== value && onCommit(text)}
    />
  );
}
