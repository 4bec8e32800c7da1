import type { EvaluationState } from "../../state/workspace";
import { formatReal } from "../../../shared-engine/format";

/** Always on screen: how good the numbers are (residuals, conditioning), checks with pass/fail in words, warnings. */
export function DiagnosticsPanel({ evaluation, onCancel, onRetry }: { evaluation: EvaluationState; onCancel: () => void; onRetry: () => void }) {
  const r = evaluation.result;
  const busy = evaluation.status === "running" || evaluation.status === "waiting";
  return (
    <section className="diagnostics" aria-label="Diagnostics" aria-live="polite">
      <div className="diag-status">
        {busy ? (
          <>
            <span className="spinner" aria-hidden="true" />
            <span data-testid="evaluation-status">Computing the design…</span>
            <button type="button" className="button-quiet small" onClick={onCancel}>
              Cancel
            </button>
          </>
        ) : evaluation.status === "failed" ? (
          <>
            <span className="error-text" data-testid="evaluation-status" role="alert">
              ✗ The design could not be computed: {evaluation.error}
            </span>
            <button type="button" className="button-quiet small" onClick={onRetry}>
              Try again
            </button>
          </>
        ) : (
          <span data-testid="evaluation-status" className="muted">
            {evaluation.status === "done" ? `Up to date (${evaluation.durationMs !== null ? Math.round(evaluation.durationMs) : "?"} ms)` : evaluation.error ?? "Not computed yet"}
          </span>
        )}
      </div>
      {r && (
        <>
          {r.error && (
            <p className="error-text" role="alert">
              ✗ {r.error.message}
            </p>
          )}
          <dl className="diag-numbers num">
            {r.design && (
              <>
                <dt>Gain size ‖K‖</dt>
                <dd data-testid="gain-norm">{formatReal(r.design.gainNorm, 5)}</dd>
              </>
            )}
            {r.design?.eigenvectorCondition !== undefined && (
              <>
                <dt>Eigenvector conditioning</dt>
                <dd>{formatReal(r.design.eigenvectorCondition, 3)}</dd>
              </>
            )}
            {r.design?.maxPoleError !== undefined && (
              <>
                <dt>Largest pole error</dt>
                <dd>{formatReal(r.design.maxPoleError, 3)}</dd>
              </>
            )}
            {r.riccati && (
              <>
                <dt>Riccati residual</dt>
                <dd>{formatReal(r.riccati.residual, 3)}</dd>
                <dt>Riccati conditioning</dt>
                <dd>{formatReal(r.riccati.conditionIndicator, 3)}</dd>
              </>
            )}
            {r.kalman && (
              <>
                <dt>Kalman residual</dt>
                <dd>{formatReal(r.kalman.residual, 3)}</dd>
              </>
            )}
          </dl>
          <ul className="check-list">
            {r.checks.map((c) => (
              <li key={c.name} className={c.passed ? "check-pass" : "check-fail"}>
                <span className="check-mark">{c.passed ? "✓ pass" : "✗ fail"}</span> <span>{c.detail}</span>
              </li>
            ))}
          </ul>
          {r.warnings.length > 0 && (
            <ul className="warning-list">
              {r.warnings.map((w, i) => (
                <li key={i}>⚠ {w}</li>
              ))}
            </ul>
          )}
        </>
      )}
    </section>
  );
}
