import { useEffect, useMemo, useSyncExternalStore } from "react";
import type { EngineBridge, PlantSpec, VariantResult } from "../../../shared-engine/api/contract";
import { formatReal } from "../../../shared-engine/format";
import { createStructureController, structureModelOf, WEAK_HANKEL_FRACTION } from "../../state/workspace/structureReport";
import "./structureDetails.css";

const num = (v: number | null, digits = 4, unit = "") => (v === null ? "—" : `${formatReal(v, digits)}${unit}`);

/**
 * The plant's modes in plain language beside the numbers (through the bridge): damping, natural
 * frequency, time constant, movability and visibility per mode; zeros; the modal coupling table;
 * Gramian measures; conditioning warnings.
 */
export function StructureDetails({ bridge, plant, result }: { bridge: EngineBridge; plant: PlantSpec | undefined; result: VariantResult | null }) {
  const controller = useMemo(() => createStructureController(bridge), [bridge]);
  useEffect(() => () => controller.dispose(), [controller]);
  const state = useSyncExternalStore(controller.subscribe, controller.getState, controller.getState);
  const source = useMemo(() => structureModelOf(plant, result), [plant, result?.plant?.linearization, result?.plant?.names]);
  const key = JSON.stringify(source);
  useEffect(() => {
    if ("model" in source) void controller.load(source.model);
  }, [controller, key]);
  if ("reason" in source) return <p className="muted">{source.reason}</p>;
  const r = state.report;
  return (
    <section className="structure-details" data-testid="structure-details" aria-busy={state.status === "working"}>
      <h3>Modes in words</h3>
      {state.status === "failed" && <p className="error-text" role="alert">✗ The structure could not be computed: {state.error}</p>}
      {!r && state.status === "working" && <p className="muted">Analysing the plant…</p>}
      {r && (
        <>
          <p data-testid="structure-summary">{r.summary}</p>
          <table className="mode-table num" data-testid="mode-table">
            <thead>
              <tr>
                <th scope="col">Pole</th>
                <th scope="col">Damping ζ</th>
                <th scope="col">ω<sub>n</sub> (rad/s)</th>
                <th scope="col">τ (s)</th>
                <th scope="col">Inputs move it</th>
                <th scope="col">Outputs see it</th>
              </tr>
            </thead>
            <tbody>
              {r.modes.map((m, i) => (
                <tr key={i} className={m.stability === "stable" ? "" : "mode-unstable"}>
                  <th scope="row" title={m.stability}>
                    {m.label} {m.stability !== "stable" && <span className="tag-bad">{m.stability === "unstable" ? "unstable" : "boundary"}</span>}
                  </th>
                  <td>{num(m.damping, 3)}</td>
                  <td>{num(m.naturalFrequencyRadPerSec)}</td>
                  <td>{num(m.timeConstantSec)}</td>
                  <td>{m.controllable ? "yes" : <strong className="error-text">no</strong>}</td>
                  <td>{m.observable ? "yes" : <strong className="error-text">no</strong>}</td>
                </tr>
              ))}
            </tbody>
          </table>
          {r.modes.flatMap((m) => m.sentences).map((s, i) => (
            <p key={i} className="structure-sentence">{s}</p>
          ))}
          <h3>Zeros</h3>
          <p data-testid="zeros-sentence" className={r.zeros.some((z) => z.nonMinimumPhase) ? "warning-text" : ""}>
            {r.zeros.length > 0 && <span className="num">{r.zeros.map((z) => z.label).join(", ")}. </span>}
            {r.zerosSentence}
          </p>
          <h3>Coupling of states and modes</h3>
          {r.coupling ? (
            <>
              <p data-testid="coupling-sentence">{r.coupling.sentence}</p>
              <div className="table-scroll">
                <table className="coupling-table num" data-testid="coupling-table">
                  <caption className="muted">Participation of each state in each mode (%); dominant states in bold.</caption>
                  <thead>
                    <tr>
                      <th scope="col">Mode</th>
                      {r.coupling.states.map((s) => <th key={s} scope="col">{s}</th>)}
                      <th scope="col">Dominant</th>
                    </tr>
                  </thead>
                  <tbody>
                    {r.coupling.rows.map((row, i) => (
                      <tr key={i}>
                        <th scope="row">{row.label}</th>
                        {row.participationPct.map((p, k) => (
                          <td key={k} className={row.dominantStates.includes(r.coupling!.states[k]!) ? "dominant" : ""}>{formatReal(p, 3)}</td>
                        ))}
                        <td className="dominant-names">{row.dominantStates.join(", ")}</td>
                      </tr>
                    ))}
                  </tbody>
                </table>
              </div>
              {r.coupling.conditionWarning && <p className="warning-text" role="note">⚠ {r.coupling.conditionWarning}</p>}
            </>
          ) : (
            <p className="muted">{r.couplingError ?? "No modal form."}</p>
          )}
          <h3>Gramian measures</h3>
          {r.gramians ? (
            <>
              <p className="num" data-testid="hankel-values">
                Hankel singular values: {r.gramians.hankelSingularValues.map((v) => formatReal(v, 4)).join(", ")}
              </p>
              {r.gramians.sentences.map((s, i) => <p key={i}>{s}</p>)}
              <p className="muted small-text">“Weak” means below {WEAK_HANKEL_FRACTION} of the largest value.</p>
            </>
          ) : (
            <p className="muted">{r.gramiansNote}</p>
          )}
          {r.warnings.map((w, i) => <p key={i} className="warning-text">⚠ {w}</p>)}
        </>
      )}
    </section>
  );
}
