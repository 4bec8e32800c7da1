import { useMemo } from "react";
import { BodePlot } from "../../plots/BodePlot";
import { PoleZeroMap } from "../../plots/PoleZeroMap";
import { ResponsePlot } from "../../plots/ResponsePlot";
import type { BodeSeries } from "../../plots/bodeModel";
import type { PoleZeroSeries } from "../../plots/poleZeroModel";
import type { ResponseSeries } from "../../plots/responseModel";
import { buildComparisonTable, formatNumber, type ComparedVariant } from "../../state/compare/compareTable";
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
  const loops = comparisonBode(compared, state);
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
        <div className="compare-bode">
          {loops.series.length > 0 ? <BodePlot series={loops.series} title="Loop at the plant input" width={500} height={440} fileName="compare-bode" /> : <PlotPlaceholder what="loop at the plant input" />}
          <p className="muted" role="note" data-testid="bode-caption">
            {loops.caption}
          </p>
          {loops.missing.length > 0 && (
            <ul className="muted" data-testid="bode-missing">
              {loops.missing.map((m, k) => (
                <li key={k}>
                  Not drawn: {m.name}: {m.reason}.
                </li>
              ))}
            </ul>
          )}
        </div>
      </div>

      <h2 className="section-title">Parameters that differ</h2>
      <SpecDiffList differences={differences} columns={table.columns} />
    </div>
  );
}

function sameIds(a: readonly string[], b: readonly string[]): boolean {
  return a.length === b.length && a.every((id, k) => id === b[k]);
}

// Four digits: a sampled loop's last point (0.999·π/T) must read differently from π/T.
const frequencyText = (w: number) => `${formatNumber(w, 4)} rad/s`;

/**
 * The Bode plot's series and caption. When the display-only loop evaluation matches the shown
 * evaluation and selection, every compared variant's loop at the plant input is drawn on the
 * shared range (a sampled one up to just below π/T), margins marked; while it runs or when it
 * failed, the document's own Bode responses are drawn, as its evaluation returned them.
 */
function comparisonBode(compared: readonly ComparedVariant[], state: ProjectToolsState): { series: BodeSeries[]; caption: string; missing: { name: string; reason: string }[] } {
  const loops = state.loops;
  const current = loops.status !== "idle" && loops.revision === state.evaluation.revision && sameIds(loops.selected, state.selected);
  const names = new Map(compared.map((c) => [c.variantId, c.name]));
  const missing = current ? loops.missing.map((m) => ({ name: names.get(m.variantId) ?? m.variantId, reason: m.reason })) : [];
  if (current && loops.status === "done") {
    const series: BodeSeries[] = compared.flatMap((c) => {
      const r = loops.results[c.variantId];
      return r?.bode ? [{ name: c.name, frequency: r.bode.frequency, magnitudeDb: r.bode.magnitudeDb, phaseDeg: r.bode.phaseDeg, margins: r.margins ?? null, styleIndex: c.styleIndex }] : [];
    });
    const sampled = compared.flatMap((c) => {
      const r = loops.results[c.variantId];
      const T = r?.discrete?.sampleTime ?? r?.plant?.sampleTime ?? null;
      return r?.bode && T ? [`${c.name} ends at ${frequencyText(r.bode.frequency[r.bode.frequency.length - 1]!)}, π/T = ${frequencyText(Math.PI / T)}`] : [];
    });
    const caption =
      series.length === 0
        ? "No compared variant has a loop at the plant input."
        : `${series.length} of ${compared.length} compared loops, broken at the first plant input, margins marked` +
          (loops.range ? `, over ${frequencyText(loops.range[0])} to ${frequencyText(loops.range[1])}` : "") +
          (sampled.length > 0 ? `; a sampled loop stops below its Nyquist frequency: ${sampled.join("; ")}` : "") +
          ".";
    return { series, caption, missing };
  }
  // Fallback while the loops are computed: the loops the document itself asks for (a variant
  // without state feedback answers with its plant's response, which is not this plot's loop).
  const series: BodeSeries[] = compared.flatMap((c) => {
    const bode = c.result?.bode;
    if (!bode || bode.loop !== "plant-input") return [];
    const margins = c.result?.margins?.loop === "plant-input" ? c.result.margins : null;
    return [{ name: c.name, frequency: bode.frequency, magnitudeDb: bode.magnitudeDb, phaseDeg: bode.phaseDeg, margins, styleIndex: c.styleIndex }];
  });
  const caption =
    current && loops.status === "failed"
      ? `The loops of the compared variants could not be computed (${loops.error}); showing the Bode responses the variants ask for.`
      : state.evaluation.status === "done"
        ? "Computing the loop at the plant input of every compared variant…"
        : "";
  return { series, caption, missing };
}

function PlotPlaceholder({ what }: { what: string }) {
  return (
    <div className="plot-placeholder muted" role="note">
      No {what} for the compared variants yet.
    </div>
  );
}
