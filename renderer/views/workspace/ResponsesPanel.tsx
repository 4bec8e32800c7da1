import { useEffect, useMemo, useState, useSyncExternalStore } from "react";
import type { EngineBridge, PlantSpec, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { formatReal } from "../../../shared-engine/format";
import { ResponsePlot, type ResponseSeries } from "../../plots";
import {
  createResponsesController,
  disturbanceStepFromResult,
  inputLimitsOf,
  responseHorizon,
  responseModelOf,
  responseSeriesOf,
  type ResponseKind,
  type ResponseModel,
  type ResponseTarget,
} from "../../state/workspace/responses";
import { parseNumberText } from "../../state/workspace/parseMatrixText";
import { InputSequencePanel } from "./InputSequencePanel";
import "./structureDetails.css";

interface Props {
  bridge: EngineBridge;
  plant: PlantSpec | undefined;
  variant: VariantSpec;
  result: VariantResult | null;
  styleIndex: number;
  width: number;
}

const KINDS: { id: ResponseKind; label: string }[] = [
  { id: "disturbance", label: "Disturbance step" },
  { id: "initial", label: "Initial offsets" },
  { id: "sequence", label: "Input sequence" },
];

/** Disturbance step, initial-condition response and a pasted input sequence, on the closed loop or the plant alone. */
export function ResponsesPanel({ bridge, plant, variant, result, styleIndex, width }: Props) {
  const controller = useMemo(() => createResponsesController(bridge), [bridge]);
  useEffect(() => () => controller.dispose(), [controller]);
  const state = useSyncExternalStore(controller.subscribe, controller.getState, controller.getState);
  const [kind, setKind] = useState<ResponseKind>("disturbance");
  const [target, setTarget] = useState<ResponseTarget>("closed-loop");
  const [disturbance, setDisturbance] = useState(0);
  const [horizonText, setHorizonText] = useState<string | null>(null);
  const [offsetTexts, setOffsetTexts] = useState<Record<number, string>>({});
  let rm: ResponseModel | null = null;
  let modelError: string | null = null;
  try {
    rm = responseModelOf(plant, variant, result, target);
  } catch (error) {
    modelError = error instanceof Error ? error.message : String(error);
  }
  const defaultHorizon = responseHorizon(result);
  const horizonParse = horizonText === null ? { ok: true as const, value: defaultHorizon } : parseNumberText(horizonText);
  const horizon = horizonParse.ok && horizonParse.value > 0 ? horizonParse.value : null;
  const offsets = (rm?.stateNames ?? []).map((_, i) => {
    const p = parseNumberText(offsetTexts[i] ?? "0");
    return p.ok ? p.value : Number.NaN;
  });
  const limits = inputLimitsOf(plant, result);
  const fromRun = result && target === "closed-loop" ? disturbanceStepFromResult(result, rm?.inputNames ?? []) : null;

  // Show the design run's own disturbance step when there is one and nothing else was asked for.
  useEffect(() => {
    if (fromRun && kind === "disturbance" && controller.getState().sent === 0) controller.show(fromRun);
  }, [fromRun?.time, kind]);

  const data = state.data;
  const series: ResponseSeries[] = useMemo(
    () => (data ? [responseSeriesOf(data, variant.name ?? variant.id, styleIndex, limits)] : []),
    [data, variant.name, variant.id, styleIndex, limits[0]?.lower, limits[0]?.upper],
  );
  const busy = state.status === "working";
  return (
    <section className="responses-panel" data-testid="responses-panel">
      <div className="form-row" role="radiogroup" aria-label="Response">
        {KINDS.map((k) => (
          <label key={k.id} className="choice">
            <input type="radio" name="response-kind" checked={kind === k.id} onChange={() => setKind(k.id)} /> {k.label}
          </label>
        ))}
      </div>
      <div className="form-row" role="radiogroup" aria-label="Loop">
        <label className="choice">
          <input type="radio" name="response-target" checked={target === "closed-loop"} onChange={() => setTarget("closed-loop")} /> Closed loop (reference inputs)
        </label>
        <label className="choice">
          <input type="radio" name="response-target" checked={target === "plant"} onChange={() => setTarget("plant")} /> Plant alone
        </label>
        <label className="choice">
          Horizon (s)
          <input
            className="text-input short"
            aria-invalid={horizon === null}
            value={horizonText ?? String(Number(defaultHorizon.toPrecision(6)))}
            onChange={(e) => setHorizonText(e.target.value)}
            disabled={kind === "sequence"}
          />
        </label>
      </div>
      {modelError && <p className="muted">{modelError}</p>}
      {rm && kind === "disturbance" && (
        <div className="form-row">
          {rm.disturbanceNames.length === 0 ? (
            <p className="muted">This plant has no disturbance inputs.</p>
          ) : (
            <>
              <label htmlFor="response-disturbance">Disturbance</label>
              <select id="response-disturbance" className="text-input" value={disturbance} onChange={(e) => setDisturbance(Number(e.target.value))}>
                {rm.disturbanceNames.map((d, l) => <option key={l} value={l}>{d}</option>)}
              </select>
              <button type="button" className="button-accent small" disabled={busy || horizon === null} onClick={() => horizon !== null && void controller.disturbanceStep(rm!, target, disturbance, horizon)}>
                Compute a unit step
              </button>
            </>
          )}
        </div>
      )}
      {rm && kind === "initial" && (
        <div className="form-row">
          <div className="offset-grid" data-testid="initial-offsets">
            {rm.stateNames.map((s, i) => (
              <label key={i}>
                {s}
                <input className="text-input tiny" aria-label={`Initial offset of ${s}`} aria-invalid={!Number.isFinite(offsets[i]!)} value={offsetTexts[i] ?? "0"} onChange={(e) => setOffsetTexts({ ...offsetTexts, [i]: e.target.value })} />
              </label>
            ))}
          </div>
          <button type="button" className="button-accent small" data-testid="initial-simulate" disabled={busy || horizon === null} onClick={() => horizon !== null && void controller.initial(rm!, target, offsets, horizon)}>
            Release from these offsets
          </button>
        </div>
      )}
      {rm && kind === "sequence" && (
        <InputSequencePanel
          inputNames={target === "closed-loop" ? (rm.model.names?.inputs ?? rm.inputNames) : rm.inputNames}
          sampleTime={rm.sampleTime}
          horizonSec={defaultHorizon}
          busy={busy}
          onSimulate={(sequence) => void controller.sequence(rm!, target, sequence)}
        />
      )}
      {state.status === "failed" && <p className="error-text" role="alert" data-testid="response-error">✗ {state.error}</p>}
      {busy && <p className="muted" role="status">Computing the response…</p>}
      {data && (
        <div data-testid="response-plot">
          <ResponsePlot title={data.title} series={series} width={width} height={360} fileName={`${variant.id}-${data.kind}`} />
          {data.metrics && (
            <p className="metrics-line num" data-testid="response-metrics">
              Peak deviation {formatReal(data.metrics.peak, 4)} at {formatReal(data.metrics.peakTime, 4)} s; {data.metrics.settlingTime === null ? "not settled within the horizon" : `settled (±2 %) after ${formatReal(data.metrics.settlingTime, 4)} s`}
              {data.metrics.steadyStateValue !== null ? `; final value ${formatReal(data.metrics.steadyStateValue, 4)}` : ""}.
            </p>
          )}
          {data.notes.map((n, i) => <p key={i} className="response-notes muted">{n}</p>)}
        </div>
      )}
    </section>
  );
}
