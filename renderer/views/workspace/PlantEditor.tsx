import { useEffect, useState, type ReactNode } from "react";
import type { PlantSpec } from "../../../shared-engine/api/contract";
import {
  complexText,
  linearSignalCounts,
  matrixOf,
  parseNumberText,
  parseVectorText,
  renameSignalCommand,
  resizeDimensions,
  resizeEntryGrid,
  setZeroPoleGainPart,
  zeroPoleGainField,
  setModel,
  setModelCommand,
  setUnitCommand,
  signalNames,
  signalUnits,
  stateSpaceDimensions,
  transferFunctionEntry,
  transferFunctionSize,
  withTransferFunctionEntry,
  zeroPoleGainEntry,
  zeroPoleGainSize,
  TF_GRID_LIMIT,
  type ComplexSpec,
  type MatrixName,
  type ZeroPoleGainEntry,
  type ModelSpec,
  type PlantDimensions,
  type SignalKind,
  type WorkspaceState,
  type WorkspaceStore,
} from "../../state/workspace";
import { MatrixGrid } from "./MatrixGrid";
import { RadioChoices } from "./RadioChoices";

interface Props {
  store: WorkspaceStore;
  state: WorkspaceState;
  plant: PlantSpec;
}

const KIND_LABEL: Record<SignalKind, string> = { states: "States", inputs: "Inputs", outputs: "Outputs", disturbances: "Disturbances" };
const CAPTION: Record<MatrixName, string> = {
  A: "state → state rate",
  B: "input → state rate",
  F: "disturbance → state rate",
  C: "state → output",
  D: "input → output",
  E: "disturbance → output",
};

function defaultModel(type: ModelSpec["type"], sampleTime: number | null): ModelSpec {
  if (type === "transfer-function") return { type, numerator: [1], denominator: [1, 1], sampleTime };
  if (type === "zero-pole-gain") return { type, zeros: [], poles: [-1], gain: 1, sampleTime };
  return { type: "state-space", A: [[-1]], B: [[1]], C: [[1]], D: [[0]], sampleTime };
}

/** The plant: its form, dimensions, signal names and units, and the matrices or coefficients. */
export function PlantEditor({ store, state, plant }: Props) {
  const model = plant.model;
  return (
    <div className="plant-editor">
      <fieldset className="form-row">
        <legend>Model form</legend>
        <RadioChoices
          name={`form-${plant.id}`}
          options={[["state-space", "State space (A, B, F; C, D, E)"], ["transfer-function", "Transfer function"], ["zero-pole-gain", "Zeros, poles and gain"]] as const}
          value={model.type}
          onChoose={(type, text) => setModelCommand(store, plant.id, defaultModel(type, model.sampleTime), `started a new ${text.toLowerCase()} model`)}
        />
        <p className="muted hint">Switching the form starts a new model; Undo (Ctrl+Z) brings the previous one back.</p>
      </fieldset>
      <PlantSampleTime store={store} state={state} plant={plant} />
      {model.type === "state-space" && <StateSpaceEditor store={store} state={state} plant={plant} />}
      {model.type === "transfer-function" && <TransferFunctionEditor store={store} state={state} plant={plant} />}
      {model.type === "zero-pole-gain" && <ZeroPoleGainEditor store={store} state={state} plant={plant} />}
      {model.type === "nonlinear" && <p className="muted">This plant is given by nonlinear equations; this workspace designs on its linearization and does not edit the equations yet.</p>}
    </div>
  );
}

function PlantSampleTime({ store, state, plant }: Props) {
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

function DimensionControls({ store, plant, dims }: { store: WorkspaceStore; plant: PlantSpec; dims: PlantDimensions }) {
  return (
    <SizeForm
      sizes={dims}
      kinds={Object.keys(KIND_LABEL) as SignalKind[]}
      min={(kind) => (kind === "disturbances" ? 0 : 1)}
      max={60}
      onApply={(draft) => resizeDimensions(store, plant.id, draft)}
    />
  );
}

/**
 * Number fields for signal counts with an "Apply sizes" button (enabled once a count changed).
 * With `invalidMessage`, counts outside [min, max] or not whole are marked, explained and not
 * applied.
 */
function SizeForm<K extends SignalKind>({ sizes, kinds, min, max, onApply, invalidMessage }: {
  sizes: Record<K, number>;
  kinds: readonly K[];
  min: (kind: K) => number;
  max: number;
  onApply: (draft: Record<K, number>) => void;
  invalidMessage?: string;
}) {
  const [draft, setDraft] = useState(sizes);
  useEffect(() => setDraft(sizes), kinds.map((k) => sizes[k]));
  const changed = kinds.some((k) => draft[k] !== sizes[k]);
  const valid = (k: K) => invalidMessage === undefined || (Number.isInteger(draft[k]) && draft[k] >= min(k) && draft[k] <= max);
  const allValid = kinds.every(valid);
  return (
    <form
      className="form-row dimension-row"
      onSubmit={(e) => {
        e.preventDefault();
        if (allValid) onApply(draft);
      }}
    >
      {kinds.map((kind) => (
        <label key={kind} className="dimension">
          {KIND_LABEL[kind]}
          <input
            type="number"
            className="text-input num tiny"
            min={min(kind)}
            max={max}
            value={draft[kind]}
            aria-invalid={valid(kind) ? undefined : true}
            onChange={(e) => setDraft({ ...draft, [kind]: Math.round(Number(e.target.value)) })}
          />
        </label>
      ))}
      <button type="submit" className="button-quiet small" disabled={!changed || !allValid}>
        Apply sizes
      </button>
      {!allValid && <span className="error-text" role="alert">{invalidMessage}</span>}
    </form>
  );
}

/**
 * Names and units of a linear plant's signals, stored in the model's `names`/`units`: every kind
 * of a state-space plant; the inputs and outputs of a transfer-function or zero-pole-gain plant
 * (their states belong to the realization). A refused name keeps the typed text, marked.
 */
function SignalTable({ store, state, plant }: Props) {
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

function StateSpaceEditor({ store, state, plant }: Props) {
  if (plant.model.type !== "state-space") return null;
  const model = plant.model;
  const dims = stateSpaceDimensions(model);
  const names = (k: SignalKind) => signalNames(model.names, k, dims[k]);
  const units = (k: SignalKind) => signalUnits(model.units, k, dims[k]);
  const matrices: MatrixName[] = dims.disturbances > 0 ? ["A", "B", "F", "C", "D", "E"] : ["A", "B", "C", "D"];
  return (
    <>
      <DimensionControls store={store} plant={plant} dims={dims} />
      <SignalTable store={store} state={state} plant={plant} />
      <p className="muted hint equation">
        dx/dt = A x + B u + F w, y = C x + D u + E w {model.sampleTime !== null ? "(sampled: x[k+1] on the left)" : ""}
      </p>
      <div className="matrix-list">
        {matrices.map((m) => {
          const [rk, ck] = { A: ["states", "states"], B: ["states", "inputs"], F: ["states", "disturbances"], C: ["outputs", "states"], D: ["outputs", "inputs"], E: ["outputs", "disturbances"] }[m] as [SignalKind, SignalKind];
          return (
            <MatrixGrid
              key={m}
              store={store}
              state={state}
              plantId={plant.id}
              name={m}
              matrix={matrixOf(model, m)}
              rowNames={names(rk)}
              rowUnits={units(rk)}
              columnNames={names(ck)}
              columnUnits={units(ck)}
              caption={CAPTION[m]}
            />
          );
        })}
      </div>
    </>
  );
}

/**
 * A text field of the plant's coefficients. `parse` turns the text into the new model; or
 * `onCommit` runs a workspace command whose draft key is `${plant.id}:${field}`.
 */
function CoefficientField({ store, state, plant, field, label, shortLabel, value, parse, onCommit }: Props & {
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
interface GridSignal {
  name: string;
  unit: string;
}

function gridSignals(model: { names?: { inputs?: string[]; outputs?: string[] }; units?: { inputs?: string[]; outputs?: string[] } }, outputs: number, inputs: number): { inputs: GridSignal[]; outputs: GridSignal[] } {
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
function EntryGrid({ testId, className, signals, cell }: { testId: string; className?: string; signals: { inputs: GridSignal[]; outputs: GridSignal[] }; cell: (i: number, j: number, input: string, output: string) => ReactNode }) {
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
function GridSize({ store, plant, outputs, inputs }: { store: WorkspaceStore; plant: PlantSpec; outputs: number; inputs: number }) {
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

function TransferFunctionEditor(props: Props) {
  const model = props.plant.model;
  if (model.type !== "transfer-function") return null;
  const { outputs, inputs } = transferFunctionSize(model);
  const vec = (v: number[]) => v.join(" ");
  const parser = (i: number, j: number, which: "numerator" | "denominator") => (t: string) => {
    const r = parseVectorText(t);
    if (!r.ok) return r;
    if (which === "denominator" && (r.values[0] ?? 0) === 0) return { ok: false as const, error: "The leading denominator coefficient must not be zero." };
    return { ok: true as const, model: withTransferFunctionEntry(model, i, j, which, r.values) };
  };
  const single = outputs === 1 && inputs === 1;
  return (
    <div className="coefficients">
      <GridSize store={props.store} plant={props.plant} outputs={outputs} inputs={inputs} />
      <SignalTable {...props} />
      <p className="muted hint">Coefficients, highest power of s (or z) first, e.g. “1 3 2” for s² + 3s + 2.{single ? "" : " One transfer function per output (row) and input (column); “0” over “1” where an input does not reach an output."}</p>
      {single ? (
        <>
          <CoefficientField {...props} field="numerator" label="Numerator" value={vec(transferFunctionEntry(model, 0, 0).numerator)} parse={parser(0, 0, "numerator")} />
          <CoefficientField {...props} field="denominator" label="Denominator" value={vec(transferFunctionEntry(model, 0, 0).denominator)} parse={parser(0, 0, "denominator")} />
        </>
      ) : (
        <EntryGrid
          testId="tf-grid"
          signals={gridSignals(model, outputs, inputs)}
          cell={(i, j, inp, out) => {
            const e = transferFunctionEntry(model, i, j);
            return (
              <>
                <CoefficientField {...props} field={`tf.${i}.${j}.numerator`} label={`Numerator ${inp} → ${out}`} shortLabel="num" value={vec(e.numerator)} parse={parser(i, j, "numerator")} />
                <CoefficientField {...props} field={`tf.${i}.${j}.denominator`} label={`Denominator ${inp} → ${out}`} shortLabel="den" value={vec(e.denominator)} parse={parser(i, j, "denominator")} />
              </>
            );
          }}
        />
      )}
    </div>
  );
}

function ZeroPoleGainEditor(props: Props) {
  const model = props.plant.model;
  if (model.type !== "zero-pole-gain") return null;
  const { store, plant } = props;
  const { outputs, inputs } = zeroPoleGainSize(model);
  const list = (v: ComplexSpec[]) => v.map(complexText).join(", ");
  const single = outputs === 1 && inputs === 1;
  const fields = (i: number, j: number, labels: (part: string) => { label: string; shortLabel?: string }) => {
    const e = zeroPoleGainEntry(model, i, j);
    const shown: Record<keyof ZeroPoleGainEntry, string> = { zeros: list(e.zeros), poles: list(e.poles), gain: String(e.gain) };
    return (["zeros", "poles", "gain"] as const).map((part) => (
      <CoefficientField
        key={part}
        {...props}
        field={zeroPoleGainField(i, j, part)}
        {...labels(part)}
        value={shown[part]}
        onCommit={(t) => setZeroPoleGainPart(store, plant.id, i, j, part, t)}
      />
    ));
  };
  const capital = (part: string) => part[0]!.toUpperCase() + part.slice(1);
  return (
    <div className="coefficients">
      <GridSize store={store} plant={plant} outputs={outputs} inputs={inputs} />
      <SignalTable {...props} />
      <p className="muted hint">
        Comma-separated; complex values as “−2+3i”, or a pair as “−2±3i”; empty for none.
        {single ? "" : " One entry k·∏(s − z)/∏(s − p) per output (row) and input (column); gain 0 where an input does not reach an output."}
      </p>
      {single ? (
        fields(0, 0, (part) => ({ label: capital(part) }))
      ) : (
        <EntryGrid
          testId="zpk-grid"
          className="zpk-grid"
          signals={gridSignals(model, outputs, inputs)}
          cell={(i, j, inp, out) => fields(i, j, (part) => ({ label: `${capital(part)} ${inp} → ${out}`, shortLabel: part }))}
        />
      )}
    </div>
  );
}
