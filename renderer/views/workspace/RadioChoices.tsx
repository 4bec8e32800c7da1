/** Exclusive choices as labelled radio buttons: the workspace's one markup for them. */
export function RadioChoices<V extends string>({
  name,
  options,
  value,
  onChoose,
}: {
  name: string;
  options: readonly (readonly [V, string])[];
  /** The chosen option; a value outside the options leaves every button unchecked. */
  value: string;
  onChoose: (value: V, label: string) => void;
}) {
  return (
    <>
      {options.map(([option, text]) => (
        <label key={option} className="choice">
          <input type="radio" name={name} checked={value === option} onChange={() => onChoose(option, text)} />
          {text}
        </label>
      ))}
    </>
  );
}
