import { useMemo } from "react";
import { BodePlot } from "../../plots/BodePlot";
import { PoleZeroMap } from "../../plots/PoleZeroMap";
import { ResponsePlot } from "../../plots/ResponsePlot";
import type { BodeSeries } from "../../plots/bodeModel";
import { buildComparisonTable, formatNumber, type ComparedVariant } from "../../state/compare/compareTable";
import { MAX_COMPARED, type ProjectToolsState, type ProjectToolsStore } from "../../state/compare/projectToolsStore";
import { diffSpecs } from "../../state/compare/specDiff";
import { variantLabel } from "../../state/compare/variantCommands";
import { CompareTableView } from "./CompareTable";
import { comparisonSteps, poleMapsByDomain, poleZoomFor, type PoleMapGroup } from "./comparisonPlots";
import { SpecDiffList } from "./SpecDiffList";
import { VariantSwatch } from "./VariantSwatch";

/**
 * Side-by-side comparison of 2–4 variants: metrics table, overlaid plots (one pole-zero map per
 * time domain, see comparisonPlots.ts) and the parameter diff. The status line says which
 * revision the results are from, and when they are older than the revision shown.
 */
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
  // One pole map per time domain present (why not one s-plane map: see comparisonPlots.ts).
  const poleMaps = useMemo(() => poleMapsByDomain(compared), [compared]);
  const steps = useMemo(() => comparisonSteps(compared), [compared]);
  const differences = useMemo(() => diffSpecs(compared.map((c) => document!.variants.find((v) => v.id === c.variantId))), [compared, document]);

  if (!document) return null;
  if (document.variants.length < 2) {
    return <p className="empty-state muted">This project has {document.variants.length === 0 ? "no design variants" : "one design variant"}; duplicate a variant in the Variants tab to compare two.</p>;
  }
  const loops = comparisonBode(compared, state);
  const evaluating = state.evaluation.status === "running";
  // Results of an older revision than the one shown (another window saved meanwhile): the store
  // redesigns on its own shortly; until then the status says so and offers to do it at once.
  const stale = !evaluating && state.evaluation.status !== "idle" && state.evaluation.revision !== state.stored!.revision;

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
        <span className="muted" role="status" data-testid="evaluation-status" data-stale={stale || undefined}>
          {evaluationStatus(state, stale)}
        </span>
        {stale && (
          <button type="button" className="button-quiet" data-testid="redesign" onClick={() => void store.evaluate()}>
            Redesign now
          </button>
        )}
      </fieldset>

      <h2 className="section-title">Metrics</h2>
      <CompareTableView table={table} />

      <h2 className="section-title">Plots</h2>
      <div className="compare-plots">
        {poleMaps.length > 0 ? (
          poleMaps.map((g) => <DomainPoleMaps key={g.key} group={g} />)
        ) : (
          <PlotPlaceholder what="pole-zero map" />
        )}
        {steps.series.length > 0 ? (
          <div className="compare-step">
            <ResponsePlot series={steps.series} title="Closed-loop step response" width={500} height={400} fileName="compare-step" />
            {steps.note && (
              <p className="muted" role="note" data-testid="step-caption">
                {steps.note}
              </p>
            )}
          </div>
        ) : (
          <PlotPlaceholder what="step responses" />
        )}
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

/** The status line: designing, failed, designed from revision N, or out of date (stale). */
function evaluationStatus(state: ProjectToolsState, stale: boolean): string {
  const { evaluation } = state;
  if (evaluation.status === "running") {
    // While a newer revision is designed, the table and plots still show the previous results.
    const shown = state.stored!.revision;
    const previous = evaluation.revision >= 0 && evaluation.revision !== shown && Object.keys(evaluation.results).length > 0;
    return `Designing revision ${shown}…${previous ? ` (the results below are from revision ${evaluation.revision} until then)` : ""}`;
  }
  if (stale) {
    const what = evaluation.status === "failed" ? `The design of revision ${evaluation.revision} failed` : `Designed from revision ${evaluation.revision}`;
    return `${what}; revision ${state.stored!.revision} was saved in another window since, so these results are out of date until it is redesigned (shortly, on its own).`;
  }
  if (evaluation.status === "failed") return `Design failed: ${evaluation.error}`;
  if (evaluation.status === "done") return `Designed from revision ${evaluation.revision}`;
  return "";
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

const MAP_WIDTH = 500;
const MAP_HEIGHT = 400;

/** One domain's pole map, and a zoom map beside it when its poles crowd into a speck. */
function DomainPoleMaps({ group }: { group: PoleMapGroup }) {
  const zoom = useMemo(() => poleZoomFor(group, MAP_WIDTH, MAP_HEIGHT), [group]);
  const kind = group.sampleTime === null ? "s" : "z";
  const fileName = group.sampleTime === null ? "compare-poles-s-plane" : `compare-poles-z-plane-T${group.sampleTime}`;
  return (
    <>
      <div className="compare-poles" data-testid={`pole-map-${kind}`} data-sample-time={group.sampleTime ?? undefined}>
        <PoleZeroMap
          series={group.series}
          sampleTime={group.sampleTime}
          title={group.title}
          width={MAP_WIDTH}
          height={MAP_HEIGHT}
          fileName={fileName}
          outline={zoom ? { x: zoom.window.x, y: zoom.window.y, label: "zoomed in the next map" } : null}
        />
      </div>
      {zoom && (
        <div className="compare-poles compare-poles-zoom" data-testid={`pole-zoom-${kind}`}>
          <PoleZeroMap series={group.series} sampleTime={group.sampleTime} title={zoom.title} width={MAP_WIDTH} height={MAP_HEIGHT} fileName={`${fileName}-zoom`} view={{ x: zoom.window.x, y: zoom.window.y }} caption={zoom.caption} />
        </div>
      )}
    </>
  );
}

function PlotPlaceholder({ what }: { what: string }) {
  return (
    <div className="plot-placeholder muted" role="note">
      No {what} for the compared variants yet.
    </div>
  );
}
