/** The state-space form of the plant editor: dimensions, signal names, and the matrices A, B, F, C, D, E. */
import type { PlantSpec } from "../../../shared-engine/api/contract";
import { matrixOf, resizeDimensions, signalNames, signalUnits, stateSpaceDimensions, type MatrixName, type PlantDimensions, type SignalKind, type WorkspaceStore } from "../../state/workspace";
import { MatrixGrid } from "./MatrixGrid";
import type { PlantEditorProps } from "./plantEditorProps";
import { SignalTable } from "./SignalTable";
import { KIND_LABEL, SizeForm } from "./SizeForm";

const CAPTION: Record<MatrixName, string> = {
  A: "state → state rate",
  B: "input → state rate",
  F: "disturbance → state rate",
  C: "state → output",
  D: "input → output",
  E: "disturbance → output",
};

function DimensionControls({ store, plant, dims }: { store: WorkspaceStore; plant: PlantSpec; dims: PlantDimensions }) {
  return (
    <SizeForm
      sizes={dims}
      kinds={Object.keys(KIND_LABEL) as SignalKind[]}
      min={(kind) => (kind === "disturbances" ? 0 : 1)}
      max={60}
      onApply={(draft) => resizeDimensions(store, plant.id, draft)}
    />
  );
}

/** Dimensions, signal names and the matrices of a state-space plant, each matrix headed by the names of its rows and columns. */
export function StateSpaceEditor({ store, state, plant }: PlantEditorProps) {
  if (plant.model.type !== "state-space") return null;
  const model = plant.model;
  const dims = stateSpaceDimensions(model);
  const names = (k: SignalKind) => signalNames(model.names, k, dims[k]);
  const units = (k: SignalKind) => signalUnits(model.units, k, dims[k]);
  const matrices: MatrixName[] = dims.disturbances > 0 ? ["A", "B", "F", "C", "D", "E"] : ["A", "B", "C", "D"];
  return (
    <>
      <DimensionControls store={store} plant={plant} dims={dims} />
      <SignalTable store={store} state={state} plant={plant} />
      <p className="muted hint equation">
        dx/dt = A x + B u + F w, y = C x + D u + E w {model.sampleTime !== null ? "(sampled: x[k+1] on the left)" : ""}
      </p>
      <div className="matrix-list">
        {matrices.map((m) => {
          const [rk, ck] = { A: ["states", "states"], B: ["states", "inputs"], F: ["states", "disturbances"], C: ["outputs", "states"], D: ["outputs", "inputs"], E: ["outputs", "disturbances"] }[m] as [SignalKind, SignalKind];
          return (
            <MatrixGrid
              key={m}
              store={store}
              state={state}
              plantId={plant.id}
              name={m}
              matrix={matrixOf(model, m)}
              rowNames={names(rk)}
              rowUnits={units(rk)}
              columnNames={names(ck)}
              columnUnits={units(ck)}
              caption={CAPTION[m]}
            />
          );
        })}
      </div>
    </>
  );
}
