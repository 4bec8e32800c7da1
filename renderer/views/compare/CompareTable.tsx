import type { ComparisonTable } from "../../state/compare/compareTable";
import { VariantSwatch } from "./VariantSwatch";

/** The metrics table: one column per variant, the better value marked, the rule and requirements beside each row. */
export function CompareTableView({ table }: { table: ComparisonTable }) {
  return (
    <div className="compare-table-wrap">
      <table className="compare-table" data-testid="compare-table">
        <thead>
          <tr>
            <th scope="col">Metric</th>
            {table.columns.map((c) => (
              <th scope="col" key={c.variantId} data-variant-id={c.variantId}>
                <span className="compare-head">
                  <VariantSwatch styleIndex={c.styleIndex} />
                  {c.name}
                </span>
                {c.error && <span className="error-text compare-error">not designed: {c.error}</span>}
              </th>
            ))}
            <th scope="col">Better when</th>
          </tr>
        </thead>
        <tbody>
          {table.rows.map((row) => (
            <tr key={row.key} data-row={row.key}>
              <th scope="row">
                {row.label}
                {row.unit && <span className="muted"> ({row.unit})</span>}
                {row.requirements.map((req) => (
                  <span key={req.id} className="compare-requirement muted">
                    requirement: {req.text}
                  </span>
                ))}
              </th>
              {row.cells.map((cell, i) => (
                <td key={table.columns[i]!.variantId} className={`num${cell.best ? " cell-best" : ""}`}>
                  <span>{cell.text}</span>
                  {cell.best && (
                    <span className="best-mark" title="better by this row's rule">
                      {" "}
                      ★<span className="visually-hidden"> better</span>
                    </span>
                  )}
                  {row.requirements.map((req) => {
                    const outcome = req.outcomes[i]!;
                    const label = outcome.status === "pass" ? "pass" : outcome.status === "fail" ? "fail" : "not checked";
                    return (
                      <span key={req.id} className={`verdict verdict-${outcome.status}`} title={outcome.detail}>
                        {label}
                      </span>
                    );
                  })}
                </td>
              ))}
              <td className="muted rule-cell">{row.ruleText}</td>
            </tr>
          ))}
        </tbody>
      </table>
      <p className="muted hint">★ marks the better value of each row by the rule in the last column.</p>
    </div>
  );
}
