import { useEffect, useMemo, useState, useSyncExternalStore } from "react";
import type { EngineBridge, ProjectFile, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { PoleZeroMap, ResponsePlot } from "../../plots";
import { createLongTask, nonlinearModelOf, nonlinearSimulateParams, robustnessParams } from "../../state/workspace";
import { ProgressBar } from "./ProgressBar";

interface Props {
  bridge: EngineBridge;
  document: ProjectFile;
  variant: VariantSpec;
  result: VariantResult | null;
  styleIndex: number;
  width: number;
}

/** The variant's gains on the nonlinear equations: closed-loop simulation against the linear prediction, and the parameter sweep. */
export function NonlinearCheckPanel({ bridge, document, variant, result, styleIndex, width }: Props) {
  const simulate = useMemo(() => createLongTask(bridge, "nonlinear.simulate"), [bridge]);
  const sweep = useMemo(() => createLongTask(bridge, "nonlinear.robustness"), [bridge]);
  useEffect(() => () => { simulate.dispose(); sweep.dispose(); }, [simulate, sweep]);
  useEffect(() => { simulate.reset(); sweep.reset(); }, [variant.id, simulate, sweep]);
  const sim = useSyncExternalStore(simulate.subscribe, simulate.getState, simulate.getState);
  const rob = useSyncExternalStore(sweep.subscribe, sweep.getState, sweep.getState);
  const [problem, setProblem] = useState<string | null>(null);
  const plant = document.plants.find((p) => p.id === variant.plant);
  if (plant?.model.type !== "nonlinear") return <p className="muted">The nonlinear checks need a plant given by equations; this variant uses {variant.plant}.</p>;
  const model = nonlinearModelOf(document, variant.plant);
  const input = model.inputs[0];
  // A sampled controller on the continuous plant: only the held input follows the sampled drawing (as on the sheet).
  const period = variant.discretize?.sampleTime;
  const heldInput = period ? { period, outputs: "continuous" as const } : null;
  const attempt = (f: () => void) => {
    try {
      setProblem(null);
      f();
    } catch (error) {
      setProblem(error instanceof Error ? error.message : String(error));
    }
  };
  const r = sim.result;
  const transpose = (rows: number[][]) => (rows[0] ?? []).map((_, j) => rows.map((row) => row[j]!));
  const d = r?.largestDivergence;
  return (
    <div className="nonlinear-check" data-testid="nonlinear-check">
      {problem && <p className="error-text small-text" role="alert">{problem}</p>}
      <section aria-labelledby="nl-sim-title">
        <h2 id="nl-sim-title" className="section-title">Nonlinear simulation against the linear prediction</h2>
        <button type="button" className="button-accent" disabled={sim.status === "running"} onClick={() => attempt(() => void simulate.run(nonlinearSimulateParams(document, variant, result)))}>Run nonlinear check</button>
        <ProgressBar task={sim} label="Nonlinear simulation" onCancel={() => simulate.cancel()} testId="simulate-progress" />
        {r && (
          <>
            <p className="small-text" data-testid="divergence" role="status">
              {d ? <>Largest divergence: <span className="num">{Number(d.size.toPrecision(4))}</span> on {d.output} at t = <span className="num">{Number(d.time.toPrecision(4))}</span> s.</> : "No outputs to compare."}
              {r.saturated ? " The input reached its limits (saturation), so the linear prediction no longer applies there." : " The input stayed within its limits."}
              {r.stoppedEarly ? ` Stopped early at t = ${r.stoppedEarly.time} s: ${r.stoppedEarly.reason}.` : ""}
            </p>
            <div data-testid="nonlinear-overlay">
              <ResponsePlot
                title="Nonlinear plant (solid) and linear prediction (dashed)"
                series={[
                  { name: "Nonlinear", time: r.time, output: transpose(r.outputs), outputNames: r.names.outputs, control: transpose(r.inputs), controlNames: r.names.inputs,
                    controlLimits: input ? { lower: input.min ?? null, upper: input.max ?? null } : null, styleIndex,
                    sampled: heldInput },
                  { name: "Linear prediction", time: r.time, output: transpose(r.linear.outputs), outputNames: r.names.outputs, control: transpose(r.linear.inputs), overlay: true, styleIndex,
                    sampled: heldInput },
                ]}
                width={width} height={360} fileName={`${variant.id}-nonlinear-check`} />
            </div>
          </>
        )}
      </section>
      <section aria-labelledby="nl-sweep-title">
        <h2 id="nl-sweep-title" className="section-title">Robustness over parameter changes</h2>
        <button type="button" className="button-quiet" disabled={rob.status === "running"} onClick={() => attempt(() => void sweep.run(robustnessParams(document, variant, result)))}>Run parameter sweep</button>
        <ProgressBar task={rob} label="Parameter sweep" onCancel={() => sweep.cancel()} testId="sweep-progress" />
        {rob.result && (
          <>
            <p className="small-text" role="status" data-testid="sweep-summary">
              {rob.result.allStable ? "✓ Stable at every sample" : "✗ Not stable at every sample"} ({rob.result.samples.length} samples over {rob.result.parameterNames.join(", ")}, {rob.result.failedSamples} failed).
              Worst gain margin {rob.result.worstGainMarginDb === null ? "—" : `${rob.result.worstGainMarginDb.toFixed(1)} dB`}, worst phase margin {rob.result.worstPhaseMarginDeg === null ? "—" : `${rob.result.worstPhaseMarginDeg.toFixed(1)}°`}. {rob.result.marginsNote}
            </p>
            <PoleZeroMap title="Closed-loop poles over the sweep" width={Math.min(width, 560)} height={320} fileName={`${variant.id}-pole-cloud`} sampleTime={rob.result.sampleTime}
              series={[{ name: "Swept closed loop", poles: rob.result.samples.flatMap((s) => s.poles), styleIndex }, { name: "Nominal design", poles: result?.closedLoopPoles ?? [], styleIndex: styleIndex + 1 }]} />
          </>
        )}
      </section>
    </div>
  );
}
