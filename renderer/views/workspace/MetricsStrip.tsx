import type { VariantResult } from "../../../shared-engine/api/contract";
import { formatReal } from "../../../shared-engine/format";

const fmt = (v: number | null | undefined, unit: string) => (v === null || v === undefined ? "—" : `${formatReal(v, 4)} ${unit}`.trim());

/** The headline numbers of the design, each with its unit: what the engineer checks first. */
export function MetricsStrip({ result }: { result: VariantResult | null }) {
  const s = result?.step;
  const m = result?.margins;
  const K = result?.gain?.K;
  return (
    <dl className="metrics-strip num" aria-label="Design summary">
      <div>
        <dt>Settling time</dt>
        <dd data-testid="metric-settling">{fmt(s?.settlingTime, "s")}</dd>
      </div>
      <div>
        <dt>Rise time</dt>
        <dd>{fmt(s?.riseTime, "s")}</dd>
      </div>
      <div>
        <dt>Overshoot</dt>
        <dd>{fmt(s?.overshootPct, "%")}</dd>
      </div>
      <div>
        <dt>Gain margin</dt>
        <dd>{m ? (m.gainDb === null ? "unbounded" : fmt(m.gainDb, "dB")) : "—"}</dd>
      </div>
      <div>
        <dt>Phase margin</dt>
        <dd>{m ? (m.phaseDeg === null ? "unbounded" : fmt(m.phaseDeg, "°")) : "—"}</dd>
      </div>
      <div className="gain-cell">
        <dt>Gain K</dt>
        <dd data-testid="gain-k">{K ? `[${K.map((row) => row.map((x) => formatReal(x, 5)).join(" ")).join("; ")}]` : "—"}</dd>
      </div>
    </dl>
  );
}
