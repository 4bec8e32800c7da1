/**
 * The plant section's body for a plant typed as nonlinear equations: the equations as typed
 * (monospaced), the parameters, the solved operating point and the linearization there.
 */
import { MatrixTable } from "./sheetParts";
import { equationRows, linearizationMatrices, limitRows, operatingPointTable, parameterRows, type NonlinearModel } from "./nonlinearPlantSheet";
import type { SheetModel } from "./sheetModel";

const GROUP_LABEL = { state: "state", input: "input", disturbance: "disturbance", output: "output" } as const;

export function NonlinearPlantSection({ model, spec }: { model: SheetModel; spec: NonlinearModel }) {
  const result = model.input.result;
  const equations = equationRows(spec);
  const parameters = parameterRows(spec);
  const op = operatingPointTable(spec, result);
  const linearization = linearizationMatrices(result, model.labels);
  return (
    <>
      <p>Typed as nonlinear equations x′ = f(x, u, w, p), y = g(x, u, w, p); the design uses their exact linearization at the operating point below.</p>
      <h3>Equations (as typed)</h3>
      <table className="lw-sheet-wide lw-sheet-equations">
        <thead><tr><th>Left-hand side</th><th>Unit</th><th>Right-hand side</th></tr></thead>
        <tbody>
          {equations.map((e) => (
            <tr key={`${e.kind}:${e.lhs}`}>
              <td className="mono">{e.lhs}</td>
              <td>{e.unit || "—"}</td>
              <td className="mono lw-sheet-equation">{e.equation}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <h3>Parameters</h3>
      {parameters.length === 0 ? <p>The equations use no parameters.</p> : (
        <table className="lw-sheet-params">
          <thead><tr><th>Name</th><th>Value</th><th>Unit</th></tr></thead>
          <tbody>{parameters.map((p) => <tr key={p.name}><td className="mono">{p.name}</td><td className="num">{p.value}</td><td>{p.unit || "—"}</td></tr>)}</tbody>
        </table>
      )}
      <div className="lw-sheet-keep">
        <h3>Operating point</h3>
        {op ? (
          <>
            <table className="lw-sheet-wide">
              <thead><tr><th>Signal</th><th>Kind</th><th>Value</th><th>Unit</th><th>Obtained</th></tr></thead>
              <tbody>
                {op.rows.map((r) => (
                  <tr key={`${r.group}:${r.name}`}><td className="mono">{r.name}</td><td>{GROUP_LABEL[r.group]}</td><td className="num">{r.value}</td><td>{r.unit || "—"}</td><td>{r.role}</td></tr>
                ))}
              </tbody>
            </table>
            <p className="muted">Solved by Newton iteration in {op.iterations} iteration{op.iterations === 1 ? "" : "s"}; residual max |f| and max |y − set-point| = {op.residual}.</p>
          </>
        ) : <p>No operating point in the result (the design did not reach the plant step).</p>}
      </div>
      {linearization.length > 0 && (
        <div className="lw-sheet-keep">
          <h3>Linearization at the operating point</h3>
          <p className="muted">Exact Jacobians of the equations at the operating point, in deviation variables: δx′ = A δx + B δu + F δw, δy = C δx + D δu + E δw.</p>
          <div className="lw-sheet-matrices">{linearization.map((m) => <MatrixTable key={m.symbol} m={m} precision="full" />)}</div>
        </div>
      )}
    </>
  );
}

/** Declared actuator limits and state bounds as a table (nonlinear plants that declare any). */
export function LimitsTable({ spec }: { spec: NonlinearModel }) {
  const rows = limitRows(spec);
  if (rows.length === 0) return null;
  return (
    <table className="lw-sheet-wide">
      <thead><tr><th>Limit on</th><th>Signal</th><th>Minimum</th><th>Maximum</th><th>Rate limit</th><th>Unit</th></tr></thead>
      <tbody>
        {rows.map((r) => (
          <tr key={`${r.kind}:${r.name}`}><td>{r.kind}</td><td className="mono">{r.name}</td><td className="num">{r.min}</td><td className="num">{r.max}</td><td className="num">{r.rate}</td><td>{r.unit || "—"}</td></tr>
        ))}
      </tbody>
    </table>
  );
}
