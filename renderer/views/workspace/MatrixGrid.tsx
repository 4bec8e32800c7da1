import { useState } from "react";
import { cellKey, pasteMatrix, setMatrixCell, type MatrixName, type WorkspaceState, type WorkspaceStore } from "../../state/workspace";
import { NumberField } from "./NumberField";

interface Props {
  store: WorkspaceStore;
  state: WorkspaceState;
  plantId: string;
  name: MatrixName;
  matrix: number[][];
  rowNames: string[];
  rowUnits: string[];
  columnNames: string[];
  columnUnits: string[];
  caption: string;
}

const label = (name: string, unit: string) => (unit ? `${name} (${unit})` : name);

/**
 * One matrix of the plant as a grid with named, unit-labelled rows and columns. Each cell is a
 * number field; "Paste" opens a text area that accepts a spreadsheet selection or typed rows,
 * and pasting straight into any cell of the grid does the same for the whole matrix.
 */
export function MatrixGrid({ store, state, plantId, name, matrix, rowNames, rowUnits, columnNames, columnUnits, caption }: Props) {
  const [pasteOpen, setPasteOpen] = useState(false);
  const pasteKey = `${plantId}:${name}:paste`;
  const pasteDraft = state.drafts[pasteKey];
  const [pasteText, setPasteText] = useState("");
  const cols = matrix[0]?.length ?? 0;
  const invalid = Object.keys(state.drafts).filter((k) => k.startsWith(`${plantId}:${name}:`) && !k.endsWith(":paste"));
  return (
    <section className="matrix-block" aria-label={`Matrix ${name}`} data-matrix={name}>
      <div className="matrix-head">
        <h3>
          <span className="matrix-letter">{name}</span> <span className="muted">{caption}</span>
        </h3>
        <span className="muted num">
          {matrix.length}×{cols}
        </span>
        <button type="button" className="button-quiet small" aria-expanded={pasteOpen} onClick={() => setPasteOpen(!pasteOpen)}>
          Paste into {name}
        </button>
      </div>
      {pasteOpen && (
        <form
          className="paste-form"
          onSubmit={(e) => {
            e.preventDefault();
            if (pasteMatrix(store, plantId, name, pasteText)) setPasteOpen(false);
          }}
        >
          <label htmlFor={`paste-${plantId}-${name}`}>Rows of numbers for {name} (tabs, commas, spaces; rows by new lines or “;”)</label>
          <textarea
            id={`paste-${plantId}-${name}`}
            className="text-input num paste-area"
            rows={Math.min(6, Math.max(2, matrix.length))}
            value={pasteDraft?.text ?? pasteText}
            onChange={(e) => {
              setPasteText(e.target.value);
              if (pasteDraft) store.clearDraft(pasteKey);
            }}
            aria-invalid={pasteDraft ? true : undefined}
            aria-describedby={`paste-${plantId}-${name}-msg`}
          />
          <p id={`paste-${plantId}-${name}-msg`} className={pasteDraft ? "error-text" : "muted hint"} role={pasteDraft ? "alert" : undefined}>
            {pasteDraft ? pasteDraft.error : `Needs ${matrix.length} rows of ${cols} entries.`}
          </p>
          <button type="submit" className="button-accent small">
            Use these numbers
          </button>
        </form>
      )}
      {matrix.length > 0 && cols > 0 ? (
        <table className="matrix-grid">
          <thead>
            <tr>
              <th scope="col">
                <span className="visually-hidden">Row signal</span>
              </th>
              {columnNames.map((c, j) => (
                <th scope="col" key={j} className="num">
                  {label(c, columnUnits[j] ?? "")}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {matrix.map((row, i) => (
              <tr key={i}>
                <th scope="row" className="num">
                  {label(rowNames[i] ?? `${i + 1}`, rowUnits[i] ?? "")}
                </th>
                {row.map((value, j) => (
                  <td key={j}>
                    <NumberField
                      id={`cell-${plantId}-${name}-${i}-${j}`}
                      testId={`cell-${name}-${i}-${j}`}
                      value={value}
                      draft={state.drafts[cellKey(plantId, name, i, j)]}
                      label={`${name} row ${i + 1} (${rowNames[i]}), column ${j + 1} (${columnNames[j]})`}
                      onCommit={(text) => setMatrixCell(store, plantId, name, i, j, text)}
                      onPasteText={(text) => {
                        if (!pasteMatrix(store, plantId, name, text)) setPasteOpen(true);
                      }}
                    />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
        </table>
      ) : (
        <p className="muted hint">Empty: the plant has no {name === "F" || name === "E" ? "disturbances" : "signals"} on this side.</p>
      )}
      {invalid.length > 0 && (
        <p className="error-text" role="alert">
          {invalid.length === 1 ? "One entry" : `${invalid.length} entries`} of {name} could not be read and {invalid.length === 1 ? "keeps" : "keep"} the last valid value: {state.drafts[invalid[0]!]!.error}
        </p>
      )}
    </section>
  );
}
