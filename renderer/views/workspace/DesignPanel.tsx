import { useEffect, useState } from "react";
import type { EngineBridge, PlantSpec, VariantSpec } from "../../../shared-engine/api/contract";
import { formatReal } from "../../../shared-engine/format";
import { downloadText } from "../../io";
import {
  applyBrysonRule,
  parseComplexListText,
  parseNumberText,
  parseMatrixText,
  polesOf,
  setDiscretization,
  setFeedbackMethod,
  setIntegralOutputs,
  setLqrWeight,
  setLqrWeightText,
  setObserver,
  setPolePart,
  partnerOf,
  sliderRange,
  sliderToWeight,
  updateVariant,
  weightToSlider,
  exportControllerSource,
  SLIDER_STEPS,
  type ControllerDownloadStatus,
  type PlantDimensions,
  type WorkspaceState,
  type WorkspaceStore,
} from "../../state/workspace";
import { NumberField } from "./NumberField";
import { RadioChoices } from "./RadioChoices";

interface Props {
  store: WorkspaceStore;
  state: WorkspaceState;
  variant: VariantSpec;
  dims: PlantDimensions;
  names: { states: string[]; inputs: string[]; outputs: string[] };
  bridge: EngineBridge;
  plant: PlantSpec;
}

/** The design of one variant: state feedback (poles or LQR), integral action, observer, sampling and the controller export. */
export function DesignPanel(props: Props) {
  const { store, variant, dims } = props;
  const method = variant.stateFeedback?.method ?? "none";
  return (
    <div className="design-panel">
      <fieldset className="form-row">
        <legend>State feedback</legend>
        <RadioChoices
          name={`method-${variant.id}`}
          options={[["poles", "Place poles"], ["lqr", "LQR weights"]] as const}
          value={method}
          onChoose={(m) => setFeedbackMethod(store, variant.id, m, dims)}
        />
      </fieldset>
      {method === "poles" && <PoleEditor {...props} />}
      {method === "lqr" && <LqrEditor {...props} />}
      <IntegralEditor {...props} />
      <ObserverEditor {...props} />
      <SamplingEditor {...props} />
      <ControllerExportRow {...props} />
    </div>
  );
}

function PoleEditor({ store, state, variant }: Props) {
  const poles = polesOf(variant);
  return (
    <section aria-label="Desired closed-loop poles">
      <p className="muted hint">Type the real and imaginary parts, or drag the poles on the pole-zero map. A complex pole’s conjugate follows it.</p>
      <table className="pole-table">
        <thead>
          <tr>
            <th scope="col">Pole</th>
            <th scope="col">Real part (1/s)</th>
            <th scope="col">Imaginary part (rad/s)</th>
            <th scope="col">
              <span className="visually-hidden">Pair</span>
            </th>
          </tr>
        </thead>
        <tbody>
          {poles.map((p, i) => {
            const partner = partnerOf(poles, i);
            return (
              <tr key={i} className={partner >= 0 && partner < i ? "pair-follower" : undefined}>
                <th scope="row">{i + 1}</th>
                <td>
                  <NumberField id={`pole-${i}-re`} testId={`pole-${i}-re`} value={p.re} draft={state.drafts[`${variant.id}:pole:${i}:re`]} label={`Pole ${i + 1} real part`} onCommit={(t) => setPolePart(store, variant.id, i, "re", t)} />
                </td>
                <td>
                  <NumberField id={`pole-${i}-im`} testId={`pole-${i}-im`} value={p.im} draft={state.drafts[`${variant.id}:pole:${i}:im`]} label={`Pole ${i + 1} imaginary part`} onCommit={(t) => setPolePart(store, variant.id, i, "im", t)} />
                </td>
                <td className="muted">{partner >= 0 ? `pair with ${partner + 1}` : "real"}</td>
              </tr>
            );
          })}
        </tbody>
      </table>
      {Object.entries(state.drafts)
        .filter(([k]) => k.startsWith(`${variant.id}:pole:`))
        .map(([k, d]) => (
          <p key={k} className="error-text" role="alert">
            {d.error}
          </p>
        ))}
    </section>
  );
}

let gestureCounter = 0;

function WeightRow({ store, state, variant, which, index, name, value }: Props & { which: "Q" | "R"; index: number; name: string; value: number }) {
  const [range] = useState(() => sliderRange(value));
  const [gesture, setGesture] = useState<string | null>(null);
  const id = `${which}-${index}`;
  return (
    <div className="weight-row">
      <label htmlFor={`slider-${id}`} className="weight-name">
        {which}
        <sub>{index + 1}</sub> {name}
      </label>
      <input
        id={`slider-${id}`}
        data-testid={`slider-${id}`}
        type="range"
        min={0}
        max={SLIDER_STEPS}
        step={1}
        value={weightToSlider(value, range[0], range[1])}
        aria-valuetext={`${formatReal(value, 3)} (log scale from 1e${range[0]} to 1e${range[1]})`}
        onPointerDown={() => setGesture(`s${++gestureCounter}`)}
        onPointerUp={() => setGesture(null)}
        onChange={(e) => setLqrWeight(store, variant.id, which, index, sliderToWeight(Number(e.target.value), range[0], range[1]), gesture ?? undefined)}
      />
      <NumberField id={`weight-${id}`} testId={`weight-${id}`} value={value} draft={state.drafts[`${variant.id}:${which}:${index}`]} label={`Weight ${which}${index + 1} on ${name}`} onCommit={(t) => setLqrWeightText(store, variant.id, which, index, t)} />
    </div>
  );
}

function LqrEditor(props: Props) {
  const { store, variant, names } = props;
  const sf = variant.stateFeedback;
  const [bryson, setBryson] = useState<{ states: string[]; inputs: string[] } | null>(null);
  const [brysonError, setBrysonError] = useState<string | null>(null);
  if (sf?.method !== "lqr") return null;
  const offDiagonal = [sf.Q, sf.R].some((m) => m.some((row, i) => row.some((x, j) => i !== j && x !== 0)));
  return (
    <section aria-label="LQR weights">
      <p className="muted hint">Diagonal weights on a log scale: a larger state weight asks for a faster, tighter state; a larger input weight asks for gentler inputs.</p>
      {offDiagonal && <p className="warning-box">Q or R has off-diagonal entries; the sliders change the diagonal only and keep the rest.</p>}
      <h4>State weights Q</h4>
      {names.states.map((n, i) => (
        <WeightRow key={`Q${i}`} {...props} which="Q" index={i} name={n} value={sf.Q[i]?.[i] ?? 0} />
      ))}
      <h4>Input weights R</h4>
      {names.inputs.map((n, i) => (
        <WeightRow key={`R${i}`} {...props} which="R" index={i} name={n} value={sf.R[i]?.[i] ?? 0} />
      ))}
      {bryson === null ? (
        <button type="button" className="button-quiet small" onClick={() => setBryson({ states: names.states.map(() => "1"), inputs: names.inputs.map(() => "1") })}>
          Start from largest acceptable deviations (Bryson’s rule)…
        </button>
      ) : (
        <form
          className="bryson-form"
          onSubmit={(e) => {
            e.preventDefault();
            const read = (list: string[]) => list.map((t) => parseNumberText(t));
            const s = read(bryson.states);
            const u = read(bryson.inputs);
            const bad = [...s, ...u].find((r) => !r.ok || !(r.value > 0));
            if (bad) {
              setBrysonError("Every largest deviation must be a positive number.");
              return;
            }
            const val = (r: ReturnType<typeof parseNumberText>) => (r.ok ? r.value : 1);
            if (applyBrysonRule(store, variant.id, s.map(val), u.map(val))) {
              setBryson(null);
              setBrysonError(null);
            }
          }}
        >
          <p className="muted hint">Weights become 1/(largest deviation)² (Bryson’s rule).</p>
          {names.states.map((n, i) => (
            <label key={`s${i}`} className="bryson-row">
              Largest deviation of {n}
              <input className="text-input num short" value={bryson.states[i]} onChange={(e) => setBryson({ ...bryson, states: bryson.states.map((x, k) => (k === i ? e.target.value : x)) })} />
            </label>
          ))}
          {names.inputs.map((n, i) => (
            <label key={`u${i}`} className="bryson-row">
              Largest deviation of {n}
              <input className="text-input num short" value={bryson.inputs[i]} onChange={(e) => setBryson({ ...bryson, inputs: bryson.inputs.map((x, k) => (k === i ? e.target.value : x)) })} />
            </label>
          ))}
          {brysonError && (
            <p className="error-text" role="alert">
              {brysonError}
            </p>
          )}
          <button type="submit" className="button-accent small">
            Set weights
          </button>
          <button type="button" className="button-quiet small" onClick={() => setBryson(null)}>
            Cancel
          </button>
        </form>
      )}
    </section>
  );
}

function IntegralEditor({ store, variant, dims, names }: Props) {
  if (!variant.stateFeedback) return null;
  const chosen = (variant.integralAction?.outputs ?? []).map((o) => (typeof o === "number" ? names.outputs[o] ?? String(o) : o));
  return (
    <fieldset className="form-row">
      <legend>Integral action (zero steady-state error on)</legend>
      {names.outputs.map((o) => (
        <label key={o} className="choice">
          <input
            type="checkbox"
            checked={chosen.includes(o)}
            onChange={(e) => setIntegralOutputs(store, variant.id, e.target.checked ? [...chosen, o] : chosen.filter((c) => c !== o), dims)}
          />
          {o}
        </label>
      ))}
      {variant.integralAction && (
        <span className="muted hint">
          {variant.stateFeedback.method === "lqr" ? `integrator weights ${(variant.integralAction.weights ?? []).map((w) => formatReal(w, 3)).join(", ")}` : "integrator poles set with the design"}
        </span>
      )}
    </fieldset>
  );
}

function ObserverEditor({ store, state, variant, dims }: Props) {
  const obs = variant.observer;
  const key = `${variant.id}:observer`;
  const draft = state.drafts[key];
  const text =
    obs?.method === "poles"
      ? obs.poles.map((p) => (typeof p === "number" ? String(p) : p.im === 0 ? String(p.re) : `${p.re}${p.im < 0 ? "-" : "+"}${Math.abs(p.im)}i`)).join(", ")
      : obs?.method === "kalman"
        ? `${JSON.stringify(obs.processNoise)} | ${JSON.stringify(obs.measurementNoise)}`
        : "";
  const [value, setValue] = useState(text);
  useEffect(() => setValue(text), [text]);
  const commit = () =>
    store.editText(key, value, `set the observer of variant ${variant.id}`, (t) => {
      if (obs?.method === "poles") {
        const r = parseComplexListText(t);
        if (!r.ok) return r;
        if (r.values.length !== dims.states) return { ok: false, error: `The observer needs ${dims.states} poles (one per state); ${r.values.length} given.` };
        return { ok: true, apply: (doc) => updateVariant(doc, variant.id, (v) => ({ ...v, observer: { method: "poles", poles: r.values } })) };
      }
      const [w, v] = t.split("|");
      const pw = parseMatrixText(w ?? "");
      const pv = parseMatrixText(v ?? "");
      if (!pw.ok) return { ok: false, error: `Process noise: ${pw.error}` };
      if (!pv.ok) return { ok: false, error: `Measurement noise: ${pv.error}` };
      return { ok: true, apply: (doc) => updateVariant(doc, variant.id, (x) => ({ ...x, observer: { method: "kalman", processNoise: pw.rows, measurementNoise: pv.rows, ...(obs?.method === "kalman" && obs.form ? { form: obs.form } : {}) } })) };
    });
  const eye = (k: number) => Array.from({ length: k }, (_, i) => Array.from({ length: k }, (_, j) => (i === j ? 1 : 0)));
  return (
    <fieldset className="form-row observer">
      <legend>Observer (estimate the states from the outputs)</legend>
      <RadioChoices
        name={`observer-${variant.id}`}
        options={[["none", "None (all states measured)"], ["poles", "By poles"], ["kalman", "By noise covariances (Kalman)"]] as const}
        value={obs?.method ?? "none"}
        onChoose={(m) => {
          const next = m === "none" ? null : m === "poles" ? { method: "poles" as const, poles: Array.from({ length: dims.states }, (_, i) => ({ re: -2 * (i + 1), im: 0 })) } : { method: "kalman" as const, processNoise: eye(dims.disturbances || dims.inputs), measurementNoise: eye(dims.outputs) };
          setObserver(store, variant.id, next);
          setValue(next === null ? "" : next.method === "poles" ? next.poles.map((p) => p.re).join(", ") : `${JSON.stringify(next.processNoise)} | ${JSON.stringify(next.measurementNoise)}`);
        }}
      />
      {obs && (
        <div className="form-row">
          <label htmlFor={`obs-${variant.id}`}>{obs.method === "poles" ? "Observer poles" : "Process noise | measurement noise"}</label>
          <input id={`obs-${variant.id}`} className="text-input num wide" value={draft?.text ?? value} aria-invalid={draft ? true : undefined} onChange={(e) => setValue(e.target.value)} onBlur={commit} onKeyDown={(e) => e.key === "Enter" && commit()} />
          {draft && (
            <span className="error-text" role="alert">
              {draft.error}
            </span>
          )}
        </div>
      )}
    </fieldset>
  );
}

function SamplingEditor({ store, state, variant }: Props) {
  const d = variant.discretize;
  const key = `${variant.id}:sampleTime`;
  const draft = state.drafts[key];
  return (
    <fieldset className="form-row">
      <legend>Sampling of the controller</legend>
      <label className="choice">
        <input type="checkbox" checked={!!d} onChange={(e) => setDiscretization(store, variant.id, e.target.checked ? { sampleTime: 0.1, method: "zoh" } : null)} />
        Sampled
      </label>
      {d && (
        <>
          <label htmlFor={`ts-${variant.id}`}>Period (s)</label>
          <NumberField
            id={`ts-${variant.id}`}
            value={d.sampleTime}
            draft={draft}
            label="Sample period in seconds"
            onCommit={(t) =>
              store.editNumber(key, t, `set the sample period of variant ${variant.id}`, (doc, value) => {
                if (!(value > 0)) throw new Error("The sample period must be positive.");
                return updateVariant(doc, variant.id, (v) => ({ ...v, discretize: { ...d, sampleTime: value } }));
              })
            }
          />
          <label htmlFor={`method-${variant.id}`}>Method</label>
          <select id={`method-${variant.id}`} className="text-input" value={d.method} onChange={(e) => setDiscretization(store, variant.id, { ...d, method: e.target.value as "zoh" | "tustin" })}>
            <option value="zoh">Zero-order hold</option>
            <option value="tustin">Tustin (bilinear)</option>
          </select>
          {draft && <span className="error-text">{draft.error}</span>}
        </>
      )}
    </fieldset>
  );
}

/** Downloads the sampled controller as one C99 source file (the same text as `loopwright controller --format c`). */
function ControllerExportRow({ bridge, plant, variant }: Props) {
  const [status, setStatus] = useState<ControllerDownloadStatus>({ state: "idle" });
  useEffect(() => setStatus({ state: "idle" }), [variant.id]);
  const sampled = variant.discretize !== undefined;
  const ready = sampled && variant.stateFeedback !== undefined;
  return (
    <fieldset className="form-row">
      <legend>Controller export</legend>
      <button
        type="button"
        className="button-quiet small"
        disabled={!ready || status.state === "working"}
        onClick={async () => {
          setStatus({ state: "working" });
          setStatus(await exportControllerSource(bridge, plant, variant, downloadText));
        }}
      >
        Download C source
      </button>
      {!sampled && <span className="muted">Sample the controller (above) to export it as C; the command line takes --period for a continuous design.</span>}
      {status.state === "done" && <span className="muted">{status.fileName}{status.checksPassed ? "" : ": a check failed, see the file's header"}</span>}
      {status.state === "failed" && <span className="error-text" role="alert">{status.message}</span>}
    </fieldset>
  );
}
