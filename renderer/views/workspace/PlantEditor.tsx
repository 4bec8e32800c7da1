/**
 * The plant editor: the model form, the sample period, and the editor of the chosen form
 * (StateSpaceEditor, TransferFunctionEditor, ZeroPoleGainEditor; their signal names and units in
 * SignalTable).
 */
import { useEffect, useState } from "react";
import { parseNumberText, setModel, switchModelFormCommand, type ModelSpec } from "../../state/workspace";
import type { PlantEditorProps } from "./plantEditorProps";
import { RadioChoices } from "./RadioChoices";
import { StateSpaceEditor } from "./StateSpaceEditor";
import { TransferFunctionEditor } from "./TransferFunctionEditor";
import { ZeroPoleGainEditor } from "./ZeroPoleGainEditor";

export type { PlantEditorProps } from "./plantEditorProps";

function defaultModel(type: ModelSpec["type"], sampleTime: number | null): ModelSpec {
  if (type === "transfer-function") return { type, numerator: [1], denominator: [1, 1], sampleTime };
  if (type === "zero-pole-gain") return { type, zeros: [], poles: [-1], gain: 1, sampleTime };
  return { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime };
}

/** The plant: its form, dimensions, signal names and units, and the matrices or coefficients. */
export function PlantEditor({ store, state, plant }: PlantEditorProps) {
  const model = plant.model;
  return (
    <div className="plant-editor">
      <fieldset className="form-row">
        <legend>Model form</legend>
        <RadioChoices
          name={`form-${plant.id}`}
          options={[["state-space", "State space (A, B, F; C, D, E)"], ["transfer-function", "Transfer function"], ["zero-pole-gain", "Zeros, poles and gain"]] as const}
          value={model.type}
          onChoose={(type, text) => switchModelFormCommand(store, plant.id, defaultModel(type, model.sampleTime), `started a new ${text.toLowerCase()} model`)}
        />
        <p className="muted hint">Switching the form starts a new model (keeping the input and output names when their counts match); Undo (Ctrl+Z) brings the previous one back.</p>
      </fieldset>
      <PlantSampleTime store={store} state={state} plant={plant} />
      {model.type === "state-space" && <StateSpaceEditor store={store} state={state} plant={plant} />}
      {model.type === "transfer-function" && <TransferFunctionEditor store={store} state={state} plant={plant} />}
      {model.type === "zero-pole-gain" && <ZeroPoleGainEditor store={store} state={state} plant={plant} />}
      {model.type === "nonlinear" && <p className="muted">This plant is given by nonlinear equations; this workspace designs on its linearization and does not edit the equations yet.</p>}
    </div>
  );
}

function PlantSampleTime({ store, state, plant }: PlantEditorProps) {
  const key = `${plant.id}:sampleTime`;
  const draft = state.drafts[key];
  const shown = draft?.text ?? (plant.model.sampleTime === null ? "" : String(plant.model.sampleTime));
  const [text, setText] = useState(shown);
  useEffect(() => setText(shown), [shown]);
  const commit = () =>
    store.editText(key, text, `set the plant's sample period to ${text.trim() || "continuous"}`, (t) => {
      if (t.trim() === "") return { ok: true, apply: (doc) => setModel(doc, plant.id, { ...plant.model, sampleTime: null } as ModelSpec) };
      const n = parseNumberText(t);
      if (!n.ok || !(n.value > 0)) return { ok: false, error: "The sample period must be a positive number of seconds (or empty for a continuous plant)." };
      return { ok: true, apply: (doc) => setModel(doc, plant.id, { ...plant.model, sampleTime: n.value } as ModelSpec) };
    });
  return (
    <div className="form-row">
      <label htmlFor={`plant-ts-${plant.id}`}>Plant sample period (s)</label>
      <input
        id={`plant-ts-${plant.id}`}
        className="text-input num short"
        value={text}
        placeholder="continuous"
        aria-invalid={draft ? true : undefined}
        onChange={(e) => setText(e.target.value)}
        onBlur={commit}
        onKeyDown={(e) => e.key === "Enter" && commit()}
      />
      {draft ? <span className="error-text">{draft.error}</span> : <span className="muted hint">empty: continuous time</span>}
    </div>
  );
}
