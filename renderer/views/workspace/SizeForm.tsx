/** The signal-count form of the plant editor (state-space dimensions, entry-grid size). */
import { useEffect, useState } from "react";
import type { SignalKind } from "../../state/workspace";

/** Headings of the signal kinds, shared by the size form and the signal table. */
export const KIND_LABEL: Record<SignalKind, string> = { states: "States", inputs: "Inputs", outputs: "Outputs", disturbances: "Disturbances" };

/**
 * Number fields for signal counts with an "Apply sizes" button (enabled once a count changed).
 * With `invalidMessage`, counts outside [min, max] or not whole are marked, explained and not
 * applied.
 */
export function SizeForm<K extends SignalKind>({ sizes, kinds, min, max, onApply, invalidMessage }: {
  sizes: Record<K, number>;
  kinds: readonly K[];
  min: (kind: K) => number;
  max: number;
  onApply: (draft: Record<K, number>) => void;
  invalidMessage?: string;
}) {
  const [draft, setDraft] = useState(sizes);
  useEffect(() => setDraft(sizes), kinds.map((k) => sizes[k]));
  const changed = kinds.some((k) => draft[k] !== sizes[k]);
  const valid = (k: K) => invalidMessage === undefined || (Number.isInteger(draft[k]) && draft[k] >= min(k) && draft[k] <= max);
  const allValid = kinds.every(valid);
  return (
    <form
      className="form-row dimension-row"
      onSubmit={(e) => {
        e.preventDefault();
        if (allValid) onApply(draft);
      }}
    >
      {kinds.map((kind) => (
        <label key={kind} className="dimension">
          {KIND_LABEL[kind]}
          <input
            type="number"
            className="text-input num tiny"
            min={min(kind)}
            max={max}
            value={draft[kind]}
            aria-invalid={valid(kind) ? undefined : true}
            onChange={(e) => setDraft({ ...draft, [kind]: Math.round(Number(e.target.value)) })}
          />
        </label>
      ))}
      <button type="submit" className="button-quiet small" disabled={!changed || !allValid}>
        Apply sizes
      </button>
      {!allValid && <span className="error-text" role="alert">{invalidMessage}</span>}
    </form>
  );
}
