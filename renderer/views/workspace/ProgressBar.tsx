import type { EngineMethod } from "../../../shared-engine/api/contract";
import type { LongTaskState } from "../../state/workspace";

interface Props {
  task: LongTaskState<EngineMethod>;
  /** What runs, e.g. "Nonlinear simulation". */
  label: string;
  onCancel: () => void;
  testId?: string;
}

/** Progress of a long engine request with its percentage in words (not only a bar) and a Cancel button. */
export function ProgressBar({ task, label, onCancel, testId }: Props) {
  if (task.status !== "running") {
    if (task.status === "cancelled") return <p className="muted small-text" role="status" data-testid={testId}>{label}: cancelled; the last finished result is still shown.</p>;
    if (task.status === "failed") return <p className="error-text small-text" role="alert" data-testid={testId}>{label} failed: {task.error}</p>;
    return null;
  }
  const percent = Math.round(task.progress * 100);
  return (
    <div className="long-task" data-testid={testId}>
      <progress max={100} value={percent} aria-label={`${label} progress`} />
      <span className="small-text num" role="status">
        {label}: {percent} % {task.progressLabel ? `(${task.progressLabel})` : ""}
      </span>
      <button type="button" className="button-quiet small" onClick={onCancel}>
        Cancel
      </button>
    </div>
  );
}
