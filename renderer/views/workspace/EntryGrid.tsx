/**
 * Building blocks of the entry-per-pair plant forms (transfer function, zeros-poles-gain): a
 * coefficient text field, the outputs × inputs grid headed by signal names and units, and the
 * grid-size form.
 */
import { useEffect, useState, type ReactNode } from "react";
import type { PlantSpec } from "../../../shared-engine/api/contract";
import { resizeEntryGrid, setModel, signalNames, signalUnits, TF_GRID_LIMIT, type ModelSpec, type WorkspaceStore } from "../../state/workspace";
import type { PlantEditorProps } from "./plantEditorProps";
import { SizeForm } from "./SizeForm";

/**
 * A text field of the plant's coefficients. `parse` turns the text into the new model; or
 * `onCommit` runs a workspace command whose draft key is `${plant.id}:${field}`.
 */
export function CoefficientField({ store, state, plant, field, label, shortLabel, value, parse, onCommit }: PlantEditorProps & {
  field: string;
  label: string;
  shortLabel?: string;
  value: string;
  parse?: (t: string) => { ok: true; model: ModelSpec } | { ok: false; error: string };
  onCommit?: (t: string) => void;
}) {
  const key = `${plant.id}:${field}`;
  const draft = state.drafts[key];
  const [text, setText] = useState(draft?.text ?? value);
  useEffect(() => setText(draft?.text ?? value), [value, draft?.text]);
  const commit = () => {
    if (onCommit) return onCommit(text);
    store.editText(key, text, `set the ${label.toLowerCase()} of plant ${plant.id}`, (t) => {
      const r = parse ? parse(t) : { ok: false as const, error: "This field cannot be edited." };
      return r.ok ? { ok: true, apply: (doc) => setModel(doc, plant.id, r.model) } : r;
    });
  };
  const id = `coef-${plant.id}-${field}`;
  return (
    <div className="form-row coefficient-row">
      <label htmlFor={id}>{shortLabel ?? label}</label>
      <input id={id} className="text-input num wide" aria-label={shortLabel ? label : undefined} value={text} aria-invalid={draft ? true : undefined} onChange={(e) => setText(e.target.value)} onBlur={commit} onKeyDown={(e) => e.key === "Enter" && commit()} />
      {draft && (
        <span className="error-text" role="alert">
          {draft.error}
        </span>
      )}
    </div>
  );
}

/** Input (column) and output (row) labels of an entry grid: names from the model, units beside them. */
export interface GridSignal {
  name: string;
  unit: string;
}

export function gridSignals(model: { names?: { inputs?: string[]; outputs?: string[] }; units?: { inputs?: string[]; outputs?: string[] } }, outputs: number, inputs: number): { inputs: GridSignal[]; outputs: GridSignal[] } {
  const of = (kind: "inputs" | "outputs", count: number) => {
    const names = signalNames(model.names, kind, count);
    const units = signalUnits(model.units, kind, count);
    return names.map((name, k) => ({ name, unit: units[k] ?? "" }));
  };
  return { inputs: of("inputs", inputs), outputs: of("outputs", outputs) };
}

function SignalHeader({ signal, scope }: { signal: GridSignal; scope: "col" | "row" }) {
  return (
    <th scope={scope}>
      <span className="mono">{signal.name}</span>
      {signal.unit && <span className="muted small-text"> ({signal.unit})</span>}
    </th>
  );
}

/** One cell per (output, input) pair, outputs as rows and inputs as columns, headed by their names and units. */
export function EntryGrid({ testId, className, signals, cell }: { testId: string; className?: string; signals: { inputs: GridSignal[]; outputs: GridSignal[] }; cell: (i: number, j: number, input: string, output: string) => ReactNode }) {
  return (
    <div className="tf-grid-scroll">
      <table className={className ? `tf-grid ${className}` : "tf-grid"} data-testid={testId}>
        <thead>
          <tr>
            <th scope="col" className="tf-corner">output ╲ input</th>
            {signals.inputs.map((u, j) => <SignalHeader key={j} signal={u} scope="col" />)}
          </tr>
        </thead>
        <tbody>
          {signals.outputs.map((y, i) => (
            <tr key={i}>
              <SignalHeader signal={y} scope="row" />
              {signals.inputs.map((u, j) => <td key={j}>{cell(i, j, u.name, y.name)}</td>)}
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

/** Outputs × inputs of an entry-per-pair plant (transfer function, zeros-poles-gain); applying keeps the entries that remain. */
export function GridSize({ store, plant, outputs, inputs }: { store: WorkspaceStore; plant: PlantSpec; outputs: number; inputs: number }) {
  return (
    <SizeForm
      sizes={{ outputs, inputs }}
      kinds={["outputs", "inputs"] as const}
      min={() => 1}
      max={TF_GRID_LIMIT}
      invalidMessage={`Outputs and inputs: whole numbers from 1 to ${TF_GRID_LIMIT}.`}
      onApply={(draft) => resizeEntryGrid(store, plant.id, draft.outputs, draft.inputs)}
    />
  );
}
