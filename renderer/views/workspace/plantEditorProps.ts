/** What every part of the plant editor receives: the store, its snapshot and the edited plant. */
import type { PlantSpec } from "../../../shared-engine/api/contract";
import type { WorkspaceState, WorkspaceStore } from "../../state/workspace";

export interface PlantEditorProps {
  store: WorkspaceStore;
  state: WorkspaceState;
  plant: PlantSpec;
}
