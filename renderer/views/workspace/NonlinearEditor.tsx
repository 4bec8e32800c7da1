import { useEffect, useMemo, useSyncExternalStore } from "react";
import type { EngineBridge, EquationProblem, PlantSpec } from "../../../shared-engine/api/contract";
import {
  createNonlinearEditor,
  nonlinearFieldKey,
  renameNonlinearRow,
  setEquation,
  setNonlinearNumber,
  setNonlinearUnit,
  setOperatingValue,
  toggleUnknown,
  addParameter,
  removeParameter,
  type NonlinearEditor as Editor,
  type NonlinearTable,
  type WorkspaceState,
  type WorkspaceStore,
} from "../../state/workspace";

interface Props {
  store: WorkspaceStore;
  state: WorkspaceState;
  bridge: EngineBridge;
  plant: PlantSpec;
  /** Shows another plant in the editor (the new linearized one). */
  onSelectPlant: (plantId: string) => void;
}

const COLUMNS: Record<NonlinearTable, { key: string; label: string }[]> = {
  states: [{ key: "min", label: "Lower bound" }, { key: "max", label: "Upper bound" }, { key: "initial", label: "Initial" }],
  inputs: [{ key: "min", label: "Min" }, { key: "max", label: "Max" }, { key: "rateLimit", label: "Rate limit (per s)" }],
  disturbances: [{ key: "nominal", label: "Nominal" }],
  parameters: [{ key: "value", label: "Value" }],
};
const TITLES: Record<NonlinearTable, string> = { states: "States", inputs: "Inputs", disturbances: "Disturbances", parameters: "Parameters" };

function TextCell({ value, label, draftError, onCommit, className }: { value: string; label: string; draftError?: string; onCommit: (text: string) => void; className?: string }) {
  return (
    <input className={`text-input ${className ?? ""}${draftError ? " invalid" : ""}`} aria-label={label} aria-invalid={draftError ? true : undefined} title={draftError ?? label}
      defaultValue={value} key={value} spellCheck={false}
      onBlur={(e) => e.target.value !== value && onCommit(e.target.value)}
      onKeyDown={(e) => e.key === "Enter" && (e.target as HTMLInputElement).blur()} />
  );
}

/** The caret under the offending character, and the message; monospace so the caret lines up. */
function ProblemMarker({ problems, text, id }: { problems: EquationProblem[]; text: string; id: string }) {
  if (problems.length === 0) return null;
  return (
    <div id={id} className="equation-problems" role="alert">
      {problems.map((p, i) => (
        <div key={i} data-testid="equation-problem">
          {p.column !== null && (
            <pre className="equation-caret" aria-hidden="true">{`${text}\n${" ".repeat(Math.max(0, p.column - 1))}^`}</pre>
          )}
          <span className="error-text small-text">{p.column !== null ? `Column ${p.column}: ` : ""}{p.message.replace(/^at column \d+: /, "")}</span>
        </div>
      ))}
    </div>
  );
}

function EquationField({ label, text, field, editor, onChange, testId }: { label: string; text: string; field: string; editor: Editor; onChange: (t: string) => void; testId: string }) {
  const problems = editor.problemsOf(field);
  const id = `${testId}-problems`;
  return (
    <div className="equation-row">
      <label className="equation-label num" htmlFor={testId}>{label}</label>
      <input id={testId} data-testid={testId} className={`text-input equation-input${problems.length ? " invalid" : ""}`} value={text} spellCheck={false}
        aria-invalid={problems.length ? true : undefined} aria-describedby={problems.length ? id : undefined} onChange={(e) => onChange(e.target.value)} />
      <ProblemMarker problems={problems} text={text} id={id} />
    </div>
  );
}

/** Tables of the plant's signals and parameters, its equations with live checking, and the operating point. */
export function NonlinearEditor({ store, state, bridge, plant, onSelectPlant }: Props) {
  const editor = useMemo(() => createNonlinearEditor({ store, bridge, plantId: plant.id, onSelectPlant }), [store, bridge, plant.id]);
  useEffect(() => () => editor.dispose(), [editor]);
  const es = useSyncExternalStore(editor.subscribe, editor.getState, editor.getState);
  if (plant.model.type !== "nonlinear") return <p className="muted">Plant {plant.id} is linear; the Plant tab edits it.</p>;
  const m = plant.model;
  const draftError = (key: string) => state.drafts[key]?.error;
  const op = m.operatingPoint;
  const opValue = (kind: "states" | "inputs" | "disturbances" | "outputSetpoints", name: string) => op[kind]?.[name];
  const checkText = { idle: "", waiting: "Checking soon…", checking: "Checking…", done: es.check.ok ? "Equations check out." : `${es.check.problems.length} ${es.check.problems.length === 1 ? "problem" : "problems"} (marked below).`, failed: `The check failed: ${es.check.error}` }[es.check.status];

  return (
    <div className="nonlinear-editor" data-testid="nonlinear-editor">
      {(Object.keys(TITLES) as NonlinearTable[]).map((table) => (
        <fieldset key={table} className="nl-table">
          <legend>{TITLES[table]}</legend>
          <table>
            <thead>
              <tr>
                <th scope="col">Name</th>
                <th scope="col">Unit</th>
                {COLUMNS[table].map((c) => <th key={c.key} scope="col">{c.label}</th>)}
                {table === "parameters" && <th scope="col"><span className="visually-hidden">Remove</span></th>}
              </tr>
            </thead>
            <tbody>
              {(m[table] as unknown as Record<string, unknown>[]).map((row, i) => (
                <tr key={`${i}:${String(row.name)}`}>
                  <td><TextCell className="name-input" value={String(row.name)} label={`${TITLES[table]} ${i + 1} name`} draftError={draftError(nonlinearFieldKey(plant.id, table, i, "name"))} onCommit={(t) => renameNonlinearRow(store, plant.id, table, i, t)} /></td>
                  <td><TextCell className="unit-input" value={String(row.unit ?? "")} label={`Unit of ${String(row.name)}`} onCommit={(t) => setNonlinearUnit(store, plant.id, table, i, t)} /></td>
                  {COLUMNS[table].map((c) => {
                    const key = nonlinearFieldKey(plant.id, table, i, c.key);
                    const draft = state.drafts[key];
                    const v = row[c.key];
                    return (
                      <td key={c.key}>
                        <TextCell className="num cell-input" value={draft?.text ?? (typeof v === "number" ? String(v) : "")} label={`${c.label} of ${String(row.name)}`} draftError={draft?.error} onCommit={(t) => setNonlinearNumber(store, plant.id, table, i, c.key, t)} />
                      </td>
                    );
                  })}
                  {table === "parameters" && (
                    <td><button type="button" className="button-quiet small" aria-label={`Remove parameter ${String(row.name)}`} onClick={() => removeParameter(store, plant.id, i)}>Remove</button></td>
                  )}
                </tr>
              ))}
            </tbody>
          </table>
          {table === "parameters" && <button type="button" className="button-quiet small" onClick={() => addParameter(store, plant.id)}>Add a parameter</button>}
        </fieldset>
      ))}

      <fieldset className="nl-equations">
        <legend>Equations</legend>
        <p className="small-text" role="status" data-testid="equation-check-status">{checkText}</p>
        {m.states.map((s) => (
          <EquationField key={s.name} label={`d${s.name}/dt =`} text={m.stateEquations[s.name] ?? ""} field={`stateEquations.${s.name}`} editor={editor} testId={`equation-${s.name}`}
            onChange={(t) => setEquation(store, plant.id, { state: s.name }, t)} />
        ))}
        {m.outputs.map((y, i) => (
          <EquationField key={i} label={`${y.name} =`} text={y.equation} field={`outputs[${i}].equation`} editor={editor} testId={`equation-output-${i}`}
            onChange={(t) => setEquation(store, plant.id, { output: i }, t)} />
        ))}
        {es.check.problems.filter((p) => !p.field.startsWith("stateEquations.") && !/^outputs\[\d+\]\.equation$/.test(p.field)).map((p, i) => (
          <p key={i} className="error-text small-text" role="alert">{p.field}: {p.message}</p>
        ))}
      </fieldset>

      <fieldset className="nl-operating-point" data-testid="operating-point">
        <legend>Operating point</legend>
        <p className="muted hint">Tick what to solve for (one unknown per state equation and per output set-point); the other values are held. For unknowns, the value is the starting guess.</p>
        <table>
          <thead><tr><th scope="col">Signal</th><th scope="col">Solve for</th><th scope="col">Value or guess</th></tr></thead>
          <tbody>
            {[...m.states.map((s) => ["states", s.name] as const), ...m.inputs.map((u) => ["inputs", u.name] as const)].map(([kind, name]) => {
              const key = `${plant.id}:nl:op:${kind}:${name}`;
              const value = opValue(kind, name);
              return (
                <tr key={name}>
                  <th scope="row" className="num">{name}</th>
                  <td><input type="checkbox" aria-label={`Solve for ${name}`} checked={op.unknowns.includes(name)} onChange={(e) => toggleUnknown(store, plant.id, name, e.target.checked)} /></td>
                  <td><TextCell className="num cell-input" value={state.drafts[key]?.text ?? (value === undefined ? "" : String(value))} label={`Value of ${name}`} draftError={state.drafts[key]?.error} onCommit={(t) => setOperatingValue(store, plant.id, kind, name, t)} /></td>
                </tr>
              );
            })}
            {m.disturbances.map((w) => (
              <tr key={w.name}>
                <th scope="row" className="num">{w.name}</th>
                <td className="muted small-text">held</td>
                <td><TextCell className="num cell-input" value={String(opValue("disturbances", w.name) ?? "")} label={`Value of ${w.name}`} onCommit={(t) => setOperatingValue(store, plant.id, "disturbances", w.name, t)} /></td>
              </tr>
            ))}
            {m.outputs.map((y) => (
              <tr key={y.name}>
                <th scope="row" className="num">{y.name}</th>
                <td className="muted small-text">set-point</td>
                <td><TextCell className="num cell-input" value={String(opValue("outputSetpoints", y.name) ?? "")} label={`Set-point of ${y.name} (empty: none)`} onCommit={(t) => setOperatingValue(store, plant.id, "outputSetpoints", y.name, t)} /></td>
              </tr>
            ))}
          </tbody>
        </table>
        <div className="form-row">
          <button type="button" className="button-accent" onClick={() => void editor.solveOperatingPoint()} disabled={es.operatingPoint.status === "solving"}>Solve operating point</button>
          <button type="button" className="button-quiet" onClick={() => void editor.linearizeHere()} disabled={es.linearize.status === "working"}>Linearize here</button>
        </div>
        <OperatingPointReport editor={es} />
      </fieldset>
    </div>
  );
}

function OperatingPointReport({ editor }: { editor: ReturnType<Editor["getState"]> }) {
  const { operatingPoint: op, linearize } = editor;
  const fmt = (x: number) => String(Number(x.toPrecision(8)));
  return (
    <div data-testid="operating-point-result" aria-live="polite">
      {op.status === "solving" && <p className="muted small-text">Solving…</p>}
      {op.status === "failed" && <p className="error-text small-text" role="alert">No operating point: {op.error}</p>}
      {op.status === "done" && op.result && (
        <dl className="diag-numbers">
          {op.result.operatingPoint.names.states.map((n, i) => <div key={n}><dt>{n}</dt><dd className="num">{fmt(op.result!.operatingPoint.states[i]!)}</dd></div>)}
          {op.result.operatingPoint.names.inputs.map((n, i) => <div key={n}><dt>{n}</dt><dd className="num">{fmt(op.result!.operatingPoint.inputs[i]!)}</dd></div>)}
          {op.result.operatingPoint.names.outputs.map((n, i) => <div key={n}><dt>{n}</dt><dd className="num">{fmt(op.result!.operatingPoint.outputs[i]!)}</dd></div>)}
          <div><dt>Residual max |f|</dt><dd className="num" data-testid="operating-point-residual">{op.result.residual.toExponential(2)}</dd></div>
          <div><dt>Newton iterations</dt><dd className="num">{op.result.iterations}</dd></div>
        </dl>
      )}
      {linearize.status === "failed" && <p className="error-text small-text" role="alert">Could not linearize: {linearize.error}</p>}
      {linearize.status === "done" && <p className="small-text" role="status">Added plant {linearize.plantId} (Undo removes it).</p>}
    </div>
  );
}
