import type { VariantResult } from "../../../shared-engine/api/contract";
import { formatComplex, formatReal } from "../../../shared-engine/format";

type Plant = NonNullable<VariantResult["plant"]>;

const list = (values: readonly { re: number; im: number }[] | undefined) => (values && values.length ? values.map((z) => formatComplex(z, 5)).join(", ") : "none");

function stabilityWord(p: { re: number; im: number }, sampleTime: number | null): string {
  const onBoundary = sampleTime ? Math.abs(Math.hypot(p.re, p.im) - 1) < 1e-9 : Math.abs(p.re) < 1e-12;
  if (onBoundary) return "on the stability boundary";
  const stable = sampleTime ? Math.hypot(p.re, p.im) < 1 : p.re < 0;
  return stable ? "stable" : "unstable";
}

function Property({ name, value, good, explain }: { name: string; value: boolean | undefined; good: string; explain: string }) {
  if (value === undefined) return null;
  return (
    <li className={value ? "prop-ok" : "prop-bad"}>
      <span className="prop-mark" aria-hidden="true">
        {value ? "✓" : "✗"}
      </span>
      <strong>{name}:</strong> {value ? "yes" : "no"} — <span className="muted">{value ? good : explain}</span>
    </li>
  );
}

/** What the plant is: poles and zeros, and whether the inputs can move and the outputs see every mode, in words. */
export function StructurePanel({ plant }: { plant: Plant | undefined }) {
  if (!plant) return <p className="muted">The structure appears when the plant has been evaluated.</p>;
  const ts = plant.sampleTime;
  const d = plant.dimensions;
  return (
    <div className="structure">
      <p>
        {d.states} {d.states === 1 ? "state" : "states"}, {d.inputs} {d.inputs === 1 ? "input" : "inputs"}, {d.outputs} {d.outputs === 1 ? "output" : "outputs"}, {d.disturbances}{" "}
        {d.disturbances === 1 ? "disturbance" : "disturbances"}; {ts === null ? "continuous time" : `sampled every ${formatReal(ts)} s`}.
      </p>
      <h3>Poles</h3>
      <ul className="pole-list num">
        {plant.poles.map((p, i) => (
          <li key={i}>
            {formatComplex(p, 6)} <span className="muted">— {stabilityWord(p, ts)}</span>
          </li>
        ))}
      </ul>
      <p>
        <strong>Open loop:</strong> {plant.stable === undefined ? "—" : plant.stable ? "stable (every pole decays)." : "not stable: at least one pole does not decay, so feedback is needed."}
      </p>
      <h3>Transmission zeros</h3>
      <p className="num">{list(plant.zeros)}</p>
      <ul className="property-list">
        <Property name="Controllable" value={plant.controllable} good="the inputs can move every mode." explain={`the inputs cannot move the mode(s) ${list(plant.uncontrollableModes)}.`} />
        <Property
          name="Stabilizable"
          value={plant.stabilizable}
          good="every mode the inputs cannot move decays by itself, so a stabilizing state feedback exists."
          explain="a mode the inputs cannot move does not decay; no state feedback can stabilize it."
        />
        <Property name="Observable" value={plant.observable} good="the outputs see every mode." explain={`the outputs do not see the mode(s) ${list(plant.unobservableModes)}.`} />
        <Property
          name="Detectable"
          value={plant.detectable}
          good="every mode the outputs miss decays by itself, so an observer can converge."
          explain="a mode the outputs miss does not decay; no observer can track it."
        />
      </ul>
    </div>
  );
}
