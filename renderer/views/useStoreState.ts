import { useSyncExternalStore } from "react";
import type { ProjectListState, ProjectListStore } from "../state/projectListStore";

/** Re-renders the calling component whenever the store publishes a new snapshot. */
export function useStoreState(store: ProjectListStore): ProjectListState {
  return useSyncExternalStore(store.subscribe, store.getState, store.getState);
}
