import { useMemo } from "react";
import { BodePlot } from "../../plots/BodePlot";
import { PoleZeroMap } from "../../plots/PoleZeroMap";
import { ResponsePlot } from "../../plots/ResponsePlot";
import type { BodeSeries } from "../../plots/bodeModel";
import type { PoleZeroSeries } from "../../plots/poleZeroModel";
import type { ResponseSeries } from "../../plots/responseModel";
import { buildComparisonTable, type ComparedVariant } from "../../state/compare/compareTable";
import { MAX_COMPARED, type ProjectToolsState, type ProjectToolsStore } from "../../state/compare/projectToolsStore";
import { diffSpecs } from "../../state/compare/specDiff";
import { variantLabel } from "../../state/compare/variantCommands";
import { CompareTableView } from "./CompareTable";
import { SpecDiffList } from "./SpecDiffList";
import { VariantSwatch } from "./VariantSwatch";

/** Side-by-side comparison of 2–4 variants: metrics table, overlaid plots and the parameter diff. */
export function CompareView({ state, store }: { state: ProjectToolsState; store: ProjectToolsStore }) {
  const document = state.stored?.document;
  const compared: ComparedVariant[] = useMemo(() => {
    if (!document) return [];
    return document.variants
      .map((v, index) => ({ v, index }))
      .filter(({ v }) => state.selected.includes(v.id))
      .map(({ v, index }) => ({ variantId: v.id, name: variantLabel(v), styleIndex: index, result: state.evaluation.results[v.id] ?? null }));
  }, [document, state.selected, state.evaluation.results]);
  const table = useMemo(() => buildComparisonTable(compared, document?.requirements ?? []), [compared, document]);
  const differences = useMemo(() => diffSpecs(compared.map((c) => document!.variants.find((v) => v.id === c.variantId))), [compared, document]);

  if (!document) return null;
  if (document.variants.length < 2) {
    return <p className="empty-state muted">This project has {document.variants.length === 0 ? "no design variants" : "one design variant"}; duplicate a variant in the Variants tab to compare two.</p>;
  }
  const poleSeries: PoleZeroSeries[] = compared.flatMap((c) =>
    c.result?.closedLoopPoles ? [{ name: c.name, poles: c.result.closedLoopPoles, zeros: c.result.plant?.zeros ?? [], styleIndex: c.styleIndex }] : [],
  );
  const bodeSeries: BodeSeries[] = compared.flatMap((c) =>
    c.result?.bode ? [{ name: c.name, frequency: c.result.bode.frequency, magnitudeDb: c.result.bode.magnitudeDb, phaseDeg: c.result.bode.phaseDeg, margins: c.result.margins ?? null, styleIndex: c.styleIndex }] : [],
  );
  const stepSeries: ResponseSeries[] = compared.flatMap((c) =>
    c.result?.step
      ? [{ name: c.name, time: c.result.step.time, output: c.result.step.output, outputNames: c.result.step.outputNames, ...(c.result.step.control ? { control: c.result.step.control } : {}), metrics: c.result.step, styleIndex: c.styleIndex }]
      : [],
  );
  const sampleTime = compared.map((c) => c.result?.discrete?.sampleTime ?? c.result?.plant?.sampleTime ?? null).find((t) => t !== null) ?? null;
  const evaluating = state.evaluation.status === "running";

  return (
    <div className="compare-view">
      <fieldset className="compare-pick">
        <legend>Variants to compare (2 to {MAX_COMPARED})</legend>
        {document.variants.map((v, index) => (
          <label key={v.id} className="compare-pick-item">
            <input type="checkbox" checked={state.selected.includes(v.id)} onChange={() => store.toggleSelected(v.id)} />
            <VariantSwatch styleIndex={index} />
            {variantLabel(v)}
            {v.baseline && <span className="tag">baseline</span>}
          </label>
        ))}
        <span className="muted" role="status" data-testid="evaluation-status">
          {evaluating ? "Designing…" : state.evaluation.status === "failed" ? `Design failed: ${state.evaluation.error}` : state.evaluation.status === "done" ? `Designed from revision ${state.evaluation.revision}` : ""}
        </span>
      </fieldset>

      <h2 className="section-title">Metrics</h2>
      <CompareTableView table={table} />

      <h2 className="section-title">Plots</h2>
      <div className="compare-plots">
        {poleSeries.length > 0 ? <PoleZeroMap series={poleSeries} sampleTime={sampleTime} title="Closed-loop poles × and zeros ○" width={500} height={400} fileName="compare-poles" /> : <PlotPlaceholder what="pole-zero map" />}
        {stepSeries.length > 0 ? <ResponsePlot series={stepSeries} title="Closed-loop step response" width={500} height={400} fileName="compare-step" /> : <PlotPlaceholder what="step responses" />}
        {bodeSeries.length > 0 ? <BodePlot series={bodeSeries} title="Loop at the plant input" width={500} height={440} fileName="compare-bode" /> : <PlotPlaceholder what="Bode plot (request frequencies and margins at the plant input)" />}
      </div>

      <h2 className="section-title">Parameters that differ</h2>
      <SpecDiffList differences={differences} columns={table.columns} />
    </div>
  );
}

function PlotPlaceholder({ what }: { what: string }) {
  return (
    <div className="plot-placeholder muted" role="note">
      No {what} for the compared variants yet.
    </div>
  );
}
