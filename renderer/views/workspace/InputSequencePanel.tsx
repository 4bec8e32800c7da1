import { useId, useMemo, useState } from "react";
import { exampleSequenceText, parseInputSequence, type InputSequence } from "../../state/workspace/inputSequence";

interface Props {
  inputNames: readonly string[];
  sampleTime: number | null;
  horizonSec: number;
  busy: boolean;
  onSimulate: (sequence: InputSequence) => void;
}

/** Paste or load a CSV input sequence (time column + one column per input); checked as typed, errors name the row and column. */
export function InputSequencePanel({ inputNames, sampleTime, horizonSec, busy, onSimulate }: Props) {
  const [text, setText] = useState("");
  const id = useId();
  const parsed = useMemo(() => (text.trim() === "" ? null : parseInputSequence(text, { inputs: inputNames.length, sampleTime })), [text, inputNames.length, sampleTime]);
  const onFile = (file: File | undefined) => {
    if (!file) return;
    void file.text().then(setText);
  };
  return (
    <div className="input-sequence" data-testid="input-sequence">
      <label htmlFor={`${id}-csv`}>
        Input sequence: a time column (s) then one column per input ({inputNames.join(", ")}); header optional; commas, semicolons or tabs.
        {sampleTime !== null && ` Times must be multiples of T = ${sampleTime} s.`}
      </label>
      <textarea
        id={`${id}-csv`}
        data-testid="sequence-text"
        value={text}
        spellCheck={false}
        aria-invalid={parsed !== null && !parsed.ok}
        aria-describedby={`${id}-status`}
        placeholder={`time,${inputNames.join(",")}\n0,0\n1,1\n…`}
        onChange={(e) => setText(e.target.value)}
      />
      <div className="form-row">
        <label className="button-quiet small">
          Load CSV…
          <input type="file" accept=".csv,.txt,text/csv,text/plain" className="visually-hidden" data-testid="sequence-file" onChange={(e) => onFile(e.target.files?.[0])} />
        </label>
        <button type="button" className="button-quiet small" onClick={() => setText(exampleSequenceText(inputNames, sampleTime, horizonSec))}>
          Insert an example
        </button>
        <button type="button" className="button-accent small" data-testid="sequence-simulate" disabled={!parsed?.ok || busy} onClick={() => parsed?.ok && onSimulate(parsed.sequence)}>
          Simulate
        </button>
      </div>
      <p id={`${id}-status`} data-testid="sequence-status" className={parsed && !parsed.ok ? "error-text" : "muted small-text"} role={parsed && !parsed.ok ? "alert" : undefined}>
        {parsed === null
          ? "Paste the sequence above, or load a CSV file."
          : parsed.ok
            ? `${parsed.sequence.times.length} samples from ${parsed.sequence.times[0]} s to ${parsed.sequence.times.at(-1)} s${parsed.sequence.header ? ` (columns ${parsed.sequence.header.join(", ")})` : ""}.`
            : `✗ ${parsed.error.message}`}
      </p>
    </div>
  );
}
