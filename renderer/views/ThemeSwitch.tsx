import type { ProjectListStore, ThemeChoice } from "../state/projectListStore";
import { useStoreState } from "./useStoreState";

const NEXT: Record<ThemeChoice, ThemeChoice> = { system: "light", light: "dark", dark: "system" };
const LABEL: Record<ThemeChoice, string> = { system: "Theme: follow system", light: "Theme: light", dark: "Theme: dark" };

/** Cycles follow-system → light → dark. */
export function ThemeSwitch({ store }: { store: ProjectListStore }) {
  const { theme } = useStoreState(store);
  return (
    <button type="button" className="button-quiet" onClick={() => store.setTheme(NEXT[theme])} title="Switch theme">
      {LABEL[theme]}
    </button>
  );
}
