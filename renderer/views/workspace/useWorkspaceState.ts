import { useSyncExternalStore } from "react";
import type { WorkspaceState, WorkspaceStore } from "../../state/workspace";

/** Re-renders the calling component whenever the workspace store publishes a new snapshot. */
export function useWorkspaceState(store: WorkspaceStore): WorkspaceState {
  return useSyncExternalStore(store.subscribe, store.getState, store.getState);
}
