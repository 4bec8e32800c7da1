/**
 * Design-sheet sections for the disturbance step, the nonlinear closed-loop check, the
 * robustness sweep and the per-input margins of multi-input loops. Each section is drawn only
 * when the result has its part; checks are shown with their PASS/FAIL.
 */
import { ResponsePlot } from "../plots/ResponsePlot";
import { channelRows, checkVerdict, disturbanceRows, nonlinearCheckRows, robustnessRows, sweptParameterRows } from "./checkSectionsSheet";
import { PoleMapFigure } from "./PoleMapFigure";
import { fullDigits } from "./sheetModel";
import type { SheetModel } from "./sheetModel";
import { KeyValues } from "./sheetParts";

const PLOT_WIDTH = 640;

function CheckLine({ model, name, label }: { model: SheetModel; name: string; label: string }) {
  const verdict = checkVerdict(model.input.result, name);
  if (!verdict) return <p className="muted">No <span className="mono">{name}</span> check was made.</p>;
  return (
    <table className="lw-sheet-wide">
      <thead><tr><th>Check</th><th>Detail</th><th>Result</th></tr></thead>
      <tbody>
        <tr>
          <td>{label} (<span className="mono">{name}</span>)</td>
          <td>{verdict.detail}</td>
          <td className={verdict.passed ? "lw-pass" : "lw-fail"}>{verdict.passed ? "PASS" : "FAIL"}</td>
        </tr>
      </tbody>
    </table>
  );
}

const labelWithUnit = (label: string, unit: string | undefined) => (unit ? `${label} (${unit})` : label);

export function DisturbanceSection({ model, number }: { model: SheetModel; number: number }) {
  const d = model.input.result.disturbanceStep;
  if (!d) return null;
  const { labels } = model;
  const w = labels.disturbances.indexOf(d.disturbance);
  const outputUnit = labels.outputUnits[labels.outputs.indexOf(d.outputNames[0] ?? "")] ?? labels.outputUnits[0] ?? "";
  return (
    <section className="lw-sheet-section">
      <h2>{number} Disturbance rejection</h2>
      <div className="lw-sheet-figure">
        <ResponsePlot
          variant="print"
          width={PLOT_WIDTH}
          height={d.control ? 420 : 300}
          title={`Response to a step of ${fullDigits(d.size)} in ${d.disturbance} (${d.loop === "closed-loop" ? "closed loop" : "open loop"}, deviations from rest)`}
          outputLabel={labelWithUnit("Output deviation", outputUnit)}
          controlLabel={labelWithUnit("Control input", labels.inputUnits[0])}
          series={[{ name: model.input.result.name, time: d.time, output: d.output, outputNames: d.outputNames, control: d.control, controlNames: labels.inputs, sampled: model.sampleTime !== null && model.sampleTime > 0 ? { period: model.sampleTime } : null }]}
        />
      </div>
      <KeyValues rows={disturbanceRows(model.input.result, outputUnit, w >= 0 ? labels.disturbanceUnits[w] ?? "" : "")} />
    </section>
  );
}

export function NonlinearCheckSection({ model, number }: { model: SheetModel; number: number }) {
  const n = model.input.result.nonlinear;
  if (!n) return null;
  const spec = model.plant.model.type === "nonlinear" ? model.plant.model : null;
  const firstInput = spec?.inputs.find((u) => u.name === n.inputNames[0]);
  const outputUnit = model.labels.outputUnits[model.labels.outputs.indexOf(n.outputNames[0] ?? "")] ?? "";
  return (
    <section className="lw-sheet-section">
      <h2>{number} Nonlinear check</h2>
      <p>The nonlinear equations under the designed state feedback (absolute values), drawn solid, over the linearized loop&apos;s prediction, drawn dashed. The control panel shows the input with its declared limits.</p>
      <div className="lw-sheet-figure">
        <ResponsePlot
          variant="print"
          width={PLOT_WIDTH}
          height={440}
          title="Nonlinear plant (solid) and linear prediction (dashed)"
          outputLabel={labelWithUnit("Output", outputUnit)}
          controlLabel={labelWithUnit("Input", firstInput?.unit)}
          series={[
            {
              name: "Nonlinear plant",
              time: n.time,
              output: n.output,
              outputNames: n.outputNames,
              control: n.input,
              controlNames: n.inputNames,
              controlLimits: firstInput ? { lower: firstInput.min ?? null, upper: firstInput.max ?? null } : null,
              styleIndex: 0,
              // A sampled controller on the continuous plant: only the held input follows the sampled rule.
              sampled: n.controller === "continuous" ? null : { period: n.controller, outputs: "continuous" },
            },
            { name: "Linear prediction", time: n.time, output: n.linearOutput, outputNames: n.outputNames, overlay: true, styleIndex: 1 },
          ]}
        />
      </div>
      <KeyValues rows={nonlinearCheckRows(model.input.result, model.variant)} />
      {n.warnings.length > 0 ? <ul>{n.warnings.map((w, i) => <li key={i}><strong>Simulation warning:</strong> {w}</li>)}</ul> : <p className="muted">The simulation reported no warnings.</p>}
      <CheckLine model={model} name="nonlinear-agrees" label="Nonlinear plant agrees with the linear prediction" />
    </section>
  );
}

export function RobustnessSection({ model, number }: { model: SheetModel; number: number }) {
  const r = model.input.result.robustness;
  if (!r) return null;
  const swept = sweptParameterRows(model.plant, model.variant);
  const nominal = model.input.result.closedLoopPoles ?? [];
  return (
    <section className="lw-sheet-section">
      <h2>{number} Robustness sweep</h2>
      <p>The designed gain is kept fixed while parameters change; at each sample the operating point is re-solved and the equations re-linearized.</p>
      <table className="lw-sheet-wide">
        <thead><tr><th>Varied parameter</th><th>Nominal</th><th>Variation</th><th>Range</th><th>Unit</th></tr></thead>
        <tbody>{swept.map((p) => <tr key={p.name}><td className="mono">{p.name}</td><td className="num">{p.nominal}</td><td className="num">{p.percent}</td><td className="num">{p.range}</td><td>{p.unit || "—"}</td></tr>)}</tbody>
      </table>
      <KeyValues rows={robustnessRows(model.input.result, model.variant)} />
      <PoleMapFigure
        width={PLOT_WIDTH}
        height={380}
        zoomHeight={360}
        sampleTime={r.sampleTime}
        title={`Closed-loop poles over the ${r.samples} parameter samples`}
        series={[{ name: "Swept closed loop (pole cloud)", poles: r.poleCloud, styleIndex: 0 }, { name: "Nominal design", poles: nominal, styleIndex: 1 }]}
        focus={{ poles: [...r.poleCloud, ...nominal] }}
        subject="the pole cloud"
      />
      <CheckLine model={model} name="robust-stability" label="Stable over the parameter range" />
    </section>
  );
}

/** Per-input margins of a multi-input loop; nothing for a single input. */
export function ChannelMarginsTable({ model }: { model: SheetModel }) {
  const rows = channelRows(model.input.result);
  if (rows.length === 0) return null;
  return (
    <div className="lw-sheet-keep">
      <h3>Margins per input (the loop broken at one input, the other loops closed)</h3>
      <table className="lw-sheet-wide">
        <thead><tr><th>Input</th><th>Gain margin</th><th>Phase margin</th><th>Delay margin</th><th>Sensitivity peak Ms</th></tr></thead>
        <tbody>{rows.map((r) => <tr key={r.input}><td className="mono">{r.input}</td><td className="num">{r.gain}</td><td className="num">{r.phase}</td><td className="num">{r.delay}</td><td className="num">{r.sensitivityPeak}</td></tr>)}</tbody>
      </table>
    </div>
  );
}
