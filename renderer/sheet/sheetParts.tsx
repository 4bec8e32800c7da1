/**
 * Small building blocks of the design sheet shared by its sections: labelled matrices, pole
 * tables and term/value lists.
 */
import { fullDigits, poleRows, rounded, type LabelledMatrix } from "./sheetModel";

export function MatrixTable({ m, precision }: { m: LabelledMatrix; precision: "full" | "rounded" }) {
  return (
    <table className="lw-sheet-matrix">
      <caption>
        <span className="mono">{m.symbol}</span> <span className="muted">— {m.caption}{precision === "full" ? ", full precision" : precision === "rounded" && m.entryUnit ? ", rounded to 4 digits" : ""}</span>
      </caption>
      <thead>
        <tr>
          <th scope="col" />
          {m.columnLabels.map((c, j) => <th key={j} scope="col">{c}</th>)}
        </tr>
      </thead>
      <tbody>
        {m.values.map((row, i) => (
          <tr key={i}>
            <th scope="row">{m.rowLabels[i] ?? `row ${i + 1}`}</th>
            {row.map((v, j) => {
              const unit = m.entryUnit?.(i, j);
              return <td key={j} className="num">{precision === "full" ? fullDigits(v) : rounded(v)}{unit && precision === "rounded" ? <span className="muted"> {unit}</span> : null}</td>;
            })}
          </tr>
        ))}
      </tbody>
    </table>
  );
}

export function PoleTable({ title, poles, sampleTime }: { title: string; poles: readonly { re: number; im: number }[]; sampleTime: number | null }) {
  const rows = poleRows(poles, sampleTime);
  const sampled = sampleTime !== null;
  return (
    <div className="lw-sheet-keep">
      <h3>{title}</h3>
      {sampled && <p className="muted">Sampled poles z are mapped to equivalent continuous poles through s = ln(z)/T with T = {fullDigits(sampleTime)} s; ζ, ωn and τ are read from s.</p>}
      <table className="lw-sheet-wide">
        <thead>
          <tr>
            <th>#</th>
            <th>{sampled ? "pole z" : "pole s (1/s)"}</th>
            {sampled && <th>|z|</th>}
            {sampled && <th>s = ln(z)/T (1/s)</th>}
            <th>damping ratio ζ</th>
            <th>natural frequency ωn (rad/s)</th>
            <th>time constant τ (s)</th>
          </tr>
        </thead>
        <tbody>
          {rows.map((r, i) => (
            <tr key={i}>
              <td className="num">{i + 1}</td>
              <td className="num">{r.pole}</td>
              {sampled && <td className="num">{r.magnitude}</td>}
              {sampled && <td className="num">{r.equivalent}</td>}
              <td className="num">{r.dampingRatio}</td>
              <td className="num">{r.naturalFrequency}</td>
              <td className="num">{r.timeConstant}</td>
            </tr>
          ))}
        </tbody>
      </table>
    </div>
  );
}

export function KeyValues({ rows }: { rows: readonly { term: string; value: string }[] }) {
  return (
    <table className="lw-sheet-kv lw-sheet-wide">
      <tbody>
        {rows.map((r, i) => (
          <tr key={i}><th scope="row">{r.term}</th><td className="num">{r.value}</td></tr>
        ))}
      </tbody>
    </table>
  );
}
