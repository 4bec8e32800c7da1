import { formatDiffValue, type SpecDifference } from "../../state/compare/specDiff";
import type { CompareColumn } from "../../state/compare/compareTable";
import { VariantSwatch } from "./VariantSwatch";

/** The parameters in which the compared variants differ, by JSON path. */
export function SpecDiffList({ differences, columns }: { differences: readonly SpecDifference[]; columns: readonly CompareColumn[] }) {
  if (differences.length === 0) return <p className="muted">The compared variants have identical specifications.</p>;
  return (
    <table className="compare-table diff-table" data-testid="spec-diff">
      <thead>
        <tr>
          <th scope="col">Parameter</th>
          {columns.map((c) => (
            <th scope="col" key={c.variantId}>
              <span className="compare-head">
                <VariantSwatch styleIndex={c.styleIndex} />
                {c.name}
              </span>
            </th>
          ))}
        </tr>
      </thead>
      <tbody>
        {differences.map((d) => (
          <tr key={d.path}>
            <th scope="row" className="num">{d.path}</th>
            {d.values.map((v, i) => (
              <td key={columns[i]!.variantId} className="num">
                {formatDiffValue(v)}
              </td>
            ))}
          </tr>
        ))}
      </tbody>
    </table>
  );
}
