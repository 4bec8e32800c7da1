/** The zeros-poles-gain form of the plant editor: grid size, signal names, and the zeros, poles and gain of each entry. */
import { complexText, setZeroPoleGainPart, zeroPoleGainEntry, zeroPoleGainField, zeroPoleGainSize, type ComplexSpec, type ZeroPoleGainEntry } from "../../state/workspace";
import { CoefficientField, EntryGrid, GridSize, gridSignals } from "./EntryGrid";
import type { PlantEditorProps } from "./plantEditorProps";
import { SignalTable } from "./SignalTable";


export function ZeroPoleGainEditor(props: PlantEditorProps) {
  const model = props.plant.model;
  if (model.type !== "zero-pole-gain") return null;
  const { store, plant } = props;
  const { outputs, inputs } = zeroPoleGainSize(model);
  const list = (v: ComplexSpec[]) => v.map(complexText).join(", ");
  const single = outputs === 1 && inputs === 1;
  const fields = (i: number, j: number, labels: (part: string) => { label: string; shortLabel?: string }) => {
    const e = zeroPoleGainEntry(model, i, j);
    const shown: Record<keyof ZeroPoleGainEntry, string> = { zeros: list(e.zeros), poles: list(e.poles), gain: String(e.gain) };
    return (["zeros", "poles", "gain"] as const).map((part) => (
      <CoefficientField
        key={part}
        {...props}
        field={zeroPoleGainField(i, j, part)}
        {...labels(part)}
        value={shown[part]}
        onCommit={(t) => setZeroPoleGainPart(store, plant.id, i, j, part, t)}
      />
    ));
  };
  const capital = (part: string) => part[0]!.toUpperCase() + part.slice(1);
  return (
    <div className="coefficients">
      <GridSize store={store} plant={plant} outputs={outputs} inputs={inputs} />
      <SignalTable {...props} />
      <p className="muted hint">
        Comma-separated; complex values as “−2+3i”, or a pair as “−2±3i”; empty for none.
        {single ? "" : " One entry k·∏(s − z)/∏(s − p) per output (row) and input (column); gain 0 where an input does not reach an output."}
      </p>
      {single ? (
        fields(0, 0, (part) => ({ label: capital(part) }))
      ) : (
        <EntryGrid
          testId="zpk-grid"
          className="zpk-grid"
          signals={gridSignals(model, outputs, inputs)}
          cell={(i, j, inp, out) => fields(i, j, (part) => ({ label: `${capital(part)} ${inp} → ${out}`, shortLabel: part }))}
        />
      )}
    </div>
  );
}
