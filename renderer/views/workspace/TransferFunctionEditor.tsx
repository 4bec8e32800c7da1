/** The transfer-function form of the plant editor: grid size, signal names, and the coefficients of each entry. */
import { parseVectorText, transferFunctionEntry, transferFunctionSize, withTransferFunctionEntry } from "../../state/workspace";
import { CoefficientField, EntryGrid, GridSize, gridSignals } from "./EntryGrid";
import type { PlantEditorProps } from "./plantEditorProps";
import { SignalTable } from "./SignalTable";

export function TransferFunctionEditor(props: PlantEditorProps) {
  const model = props.plant.model;
  if (model.type !== "transfer-function") return null;
  const { outputs, inputs } = transferFunctionSize(model);
  const vec = (v: number[]) => v.join(" ");
  const parser = (i: number, j: number, which: "numerator" | "denominator") => (t: string) => {
    const r = parseVectorText(t);
    if (!r.ok) return r;
    if (which === "denominator" && (r.values[0] ?? 0) === 0) return { ok: false as const, error: "The leading denominator coefficient must not be zero." };
    return { ok: true as const, model: withTransferFunctionEntry(model, i, j, which, r.values) };
  };
  const single = outputs === 1 && inputs === 1;
  return (
    <div className="coefficients">
      <GridSize store={props.store} plant={props.plant} outputs={outputs} inputs={inputs} />
      <SignalTable {...props} />
      <p className="muted hint">Coefficients, highest power of s (or z) first, e.g. “1 3 2” for s² + 3s + 2.{single ? "" : " One transfer function per output (row) and input (column); “0” over “1” where an input does not reach an output."}</p>
      {single ? (
        <>
          <CoefficientField {...props} field="numerator" label="Numerator" value={vec(transferFunctionEntry(model, 0, 0).numerator)} parse={parser(0, 0, "numerator")} />
          <CoefficientField {...props} field="denominator" label="Denominator" value={vec(transferFunctionEntry(model, 0, 0).denominator)} parse={parser(0, 0, "denominator")} />
        </>
      ) : (
        <EntryGrid
          testId="tf-grid"
          signals={gridSignals(model, outputs, inputs)}
          cell={(i, j, inp, out) => {
            const e = transferFunctionEntry(model, i, j);
            return (
              <>
                <CoefficientField {...props} field={`tf.${i}.${j}.numerator`} label={`Numerator ${inp} → ${out}`} shortLabel="num" value={vec(e.numerator)} parse={parser(i, j, "numerator")} />
                <CoefficientField {...props} field={`tf.${i}.${j}.denominator`} label={`Denominator ${inp} → ${out}`} shortLabel="den" value={vec(e.denominator)} parse={parser(i, j, "denominator")} />
              </>
            );
          }}
        />
      )}
    </div>
  );
}
