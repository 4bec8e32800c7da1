import { useEffect, useMemo, useState, useSyncExternalStore } from "react";
import type { ComplexValue, EngineBridge, ProjectFile, VariantResult, VariantSpec } from "../../../shared-engine/api/contract";
import { ParameterLocusPlot, RootLocusPlot } from "../../plots";
import { createLocusController, lqrWeightLocusParams, observerSpeedLocusParams, plantOfVariant, rootLocusParams, type LocusPick } from "../../state/workspace";
import { ProgressBar } from "./ProgressBar";
import { RadioChoices } from "./RadioChoices";

interface Props {
  bridge: EngineBridge;
  document: ProjectFile;
  variant: VariantSpec;
  result: VariantResult | null;
  width: number;
}

const fmtPole = (p: ComplexValue) => `${Number(p.re.toPrecision(6))} ${p.im < 0 ? "−" : "+"} ${Number(Math.abs(p.im).toPrecision(6))}j`;

function PickReport({ pick, symbol, testId }: { pick: LocusPick | null; symbol: string; testId: string }) {
  if (!pick) return null;
  return (
    <p className="small-text" role="status" data-testid={testId}>
      {pick.error ? <span className="error-text">{pick.error}</span> : (
        <>{symbol} = <span className="num">{Number(pick.value.toPrecision(6))}</span>: closed-loop poles <span className="num">{pick.poles.map(fmtPole).join(", ")}</span>
          {pick.poles.some((p) => p.re >= 0) ? " (unstable)" : " (all in the left half-plane)"}</>
      )}
    </p>
  );
}

/** Root locus (plant or designed loop) and the LQR-weight and observer-speed loci, each computed on request. */
export function LocusPanel({ bridge, document, variant, result, width }: Props) {
  const locus = useMemo(() => createLocusController(bridge), [bridge]);
  useEffect(() => () => locus.dispose(), [locus]);
  const ls = useSyncExternalStore(locus.subscribe, locus.getState, locus.getState);
  const rl = useSyncExternalStore(locus.rootLocus.subscribe, locus.rootLocus.getState, locus.rootLocus.getState);
  const lq = useSyncExternalStore(locus.lqrLocus.subscribe, locus.lqrLocus.getState, locus.lqrLocus.getState);
  const ob = useSyncExternalStore(locus.observerLocus.subscribe, locus.observerLocus.getState, locus.observerLocus.getState);
  const [gainText, setGainText] = useState("1");
  const [problem, setProblem] = useState<string | null>(null);
  const plant = plantOfVariant(document, variant);
  const ts = result?.discrete?.sampleTime ?? null;
  const plotWidth = Math.max(360, Math.min(width, 640));
  const attempt = (f: () => void) => {
    try {
      setProblem(null);
      f();
    } catch (error) {
      setProblem(error instanceof Error ? error.message : String(error));
    }
  };
  return (
    <div className="locus-panel" data-testid="locus-panel">
      {problem && <p className="error-text small-text" role="alert">{problem}</p>}
      <section aria-labelledby="root-locus-title">
        <h2 id="root-locus-title" className="section-title">Root locus (one input, one output)</h2>
        <fieldset className="form-row">
          <legend className="visually-hidden">Loop</legend>
          <RadioChoices
            name="locus-loop"
            options={[["designed", "Designed loop, broken at the plant input (k = 1 is the design)"], ["plant", "Plant alone, u = −k·y"]] as const}
            value={ls.loop}
            onChoose={(loop) => locus.setLoop(loop)}
          />
        </fieldset>
        <div className="form-row">
          <button type="button" className="button-accent" onClick={() => attempt(() => void locus.rootLocus.run(rootLocusParams(ls.loop, plant, variant, result)))}>Compute root locus</button>
          <label htmlFor="locus-gain">Gain k</label>
          <input id="locus-gain" className="text-input num cell-input" value={gainText} onChange={(e) => setGainText(e.target.value)}
            onKeyDown={(e) => e.key === "Enter" && Number.isFinite(Number(gainText)) && void locus.pickGain(Number(gainText))} />
          <button type="button" className="button-quiet small" onClick={() => Number.isFinite(Number(gainText)) && void locus.pickGain(Number(gainText))}>Show poles at k</button>
        </div>
        <ProgressBar task={rl} label="Root locus" onCancel={() => locus.rootLocus.cancel()} />
        {rl.result && (
          <RootLocusPlot locus={rl.result} sampleTime={ts} width={plotWidth} height={380} currentGain={ls.gainPick?.value ?? null} fileName={`${variant.id}-root-locus`}
            title={ls.loop === "designed" ? "Root locus of the designed loop (hover: gain; click: pick)" : "Root locus of the plant (hover: gain; click: pick)"}
            onPickGain={(k) => {
              setGainText(String(Number(k.toPrecision(6))));
              void locus.pickGain(k);
            }} />
        )}
        <PickReport pick={ls.gainPick} symbol="k" testId="gain-pick" />
      </section>
      <section aria-labelledby="lqr-locus-title">
        <h2 id="lqr-locus-title" className="section-title">LQR weight locus, R = ρ·R₀</h2>
        <button type="button" className="button-quiet" onClick={() => attempt(() => void locus.lqrLocus.run(lqrWeightLocusParams(plant, variant, result)))}>Compute weight locus</button>
        <ProgressBar task={lq} label="Weight locus" onCancel={() => locus.lqrLocus.cancel()} />
        {lq.result && (
          <ParameterLocusPlot locus={{ values: lq.result.rho, branches: lq.result.branches }} parameterName="Weight ρ" symbol="ρ" sampleTime={ts} width={plotWidth} height={340}
            currentValue={ls.rhoPick?.value ?? 1} onPickValue={(v) => locus.pickRho(v)} fileName={`${variant.id}-weight-locus`} />
        )}
        <PickReport pick={ls.rhoPick} symbol="ρ" testId="rho-pick" />
      </section>
      <section aria-labelledby="observer-locus-title">
        <h2 id="observer-locus-title" className="section-title">Observer speed locus</h2>
        <button type="button" className="button-quiet" onClick={() => attempt(() => void locus.observerLocus.run(observerSpeedLocusParams(plant, variant, result)))}>Compute observer locus</button>
        <ProgressBar task={ob} label="Observer locus" onCancel={() => locus.observerLocus.cancel()} />
        {ob.result && (
          <>
            <p className="muted small-text">Nominal poles: {(ob.resultParams as { nominalFrom?: string } | null)?.nominalFrom ?? "as given"}.</p>
            <ParameterLocusPlot locus={{ values: ob.result.factors, branches: ob.result.branches }} parameterName="Speed factor f" symbol="f" width={plotWidth} height={340}
              currentValue={ls.factorPick?.value ?? 1} onPickValue={(v) => locus.pickFactor(v)} fileName={`${variant.id}-observer-locus`} />
          </>
        )}
        <PickReport pick={ls.factorPick} symbol="f" testId="factor-pick" />
      </section>
    </div>
  );
}
