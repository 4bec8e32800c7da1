/**
 * The design sheet: the printable record of one design variant that a reviewer signs off. Same
 * component in the app (print with the browser) and in `loopwright sheet` (rendered to static
 * HTML, printed by headless Chromium). Plots use their print variant (white, darker lines).
 */
import { formatCount } from "../../shared-engine/format";
import { BodePlot } from "../plots/BodePlot";
import { ResponsePlot } from "../plots/ResponsePlot";
import type { PoleZeroSeries } from "../plots/poleZeroModel";
import { ChannelMarginsTable, DisturbanceSection, NonlinearCheckSection, RobustnessSection } from "./CheckSections";
import { LimitsTable, NonlinearPlantSection } from "./NonlinearPlantSection";
import { PoleMapFigure } from "./PoleMapFigure";
import { KeyValues, MatrixTable, PoleTable } from "./sheetParts";
import {
  SIGN_OFF_ROLES,
  assumptions,
  buildSheetModel,
  fullDigits,
  gainMatrices,
  methodParameters,
  optional,
  plantMatrices,
  requirementRows,
  rounded,
  type SheetInput,
  type SheetModel,
} from "./sheetModel";

/** Cautions printed on every sheet (also checked by tests). */
export const SHEET_CAUTIONS = [
  "Simulation is not validation: these results come from a linear model and must be confirmed on the real equipment by qualified people.",
  "Keep independent safety interlocks (limits, trips, emergency stops) that do not depend on this controller.",
  "Follow the applicable codes and standards and licensed engineering practice before any controller runs on equipment.",
] as const;

const PLOT_WIDTH = 640;

/** The plots' sampled option for a loop sampled every T seconds (null: continuous). */
const sampledEvery = (T: number | null | undefined): { period: number } | null => (typeof T === "number" && T > 0 ? { period: T } : null);

function MarginsSection({ model }: { model: SheetModel }) {
  const m = model.input.result.margins;
  if (!m) return <p>Margins were not requested for this variant (set <span className="mono">margins</span> in the variant).</p>;
  const db = (x: number) => (x > 0 ? `${rounded(20 * Math.log10(x))} dB` : "—");
  const rows = [
    { term: "Loop broken at", value: m.loop === "plant-input" ? "the plant input (all loops closed elsewhere)" : "unity negative feedback around the plant" },
    { term: "Gain margin", value: m.gainDb === null ? "unbounded (the phase never crosses −180°)" : `${rounded(m.gainDb)} dB at ${optional(m.phaseCrossover, "rad/s")}` },
    { term: "Phase margin", value: m.phaseDeg === null ? "none (the gain never crosses 0 dB)" : `${rounded(m.phaseDeg)}° at ${optional(m.gainCrossover, "rad/s")}` },
    { term: "Delay margin", value: optional(m.delayMargin, "s", 4, "unbounded") },
    {
      term: "Disk margin",
      value: m.diskMargin ? `α = ${rounded(m.diskMargin.alpha)}: gain ${rounded(m.diskMargin.gainRangeDb[0])} to +${rounded(m.diskMargin.gainRangeDb[1])} dB, or phase ±${rounded(m.diskMargin.phaseDeg)}° (simultaneous variations within the disk)` : "not computed",
    },
    { term: "Sensitivity peak Ms", value: `${rounded(m.sensitivityPeak)} (${db(m.sensitivityPeak)})` },
    { term: "Compl. sensitivity peak Mt", value: `${rounded(m.complementarySensitivityPeak)} (${db(m.complementarySensitivityPeak)})` },
    { term: "Closed loop stable", value: m.closedLoopStable ? "yes" : "NO" },
  ];
  if (m.stateFeedbackLoop) rows.push({ term: "State-feedback loop alone", value: `gain ${optional(m.stateFeedbackLoop.gainDb, "dB", 4, "unbounded")}, phase ${optional(m.stateFeedbackLoop.phaseDeg, "°", 4, "none")}` });
  return <KeyValues rows={rows} />;
}

function StepSection({ model }: { model: SheetModel }) {
  const s = model.input.result.step;
  if (!s) return <p>No step response was requested for this variant (set <span className="mono">step.times</span>).</p>;
  const metrics = [
    { term: "Step applied at", value: `${s.input} (${s.loop})` },
    { term: "Rise time (10–90 %)", value: optional(s.riseTime, "s") },
    { term: "Settling time (2 %)", value: optional(s.settlingTime, "s") },
    { term: "Overshoot", value: `${rounded(s.overshootPct)} %` },
    { term: "Peak", value: `${rounded(s.peak)} at ${rounded(s.peakTime)} s` },
    { term: "Final value", value: optional(s.steadyStateValue, "") },
    { term: "Steady-state error", value: optional(s.steadyStateError, "") },
    ...(s.peakInput !== undefined ? [{ term: "Peak control input", value: rounded(s.peakInput) }] : []),
    { term: "Status", value: s.status },
  ];
  return (
    <>
      <div className="lw-sheet-figure">
        <ResponsePlot
          variant="print"
          width={PLOT_WIDTH}
          height={s.control ? 460 : 320}
          title={`Step response, ${s.loop}`}
          outputLabel={model.labels.outputUnits[0] ? `Output (${model.labels.outputUnits[0]})` : "Output"}
          controlLabel={model.labels.inputUnits[0] ? `Control input (${model.labels.inputUnits[0]})` : "Control input"}
          series={[{ name: model.input.result.name, time: s.time, output: s.output, outputNames: s.outputNames, control: s.control, controlNames: model.labels.inputs, metrics: { riseTime: s.riseTime, settlingTime: s.settlingTime, overshootPct: s.overshootPct, peak: s.peak, peakTime: s.peakTime, steadyStateValue: s.steadyStateValue }, sampled: sampledEvery(model.sampleTime) }]}
        />
      </div>
      <KeyValues rows={metrics} />
    </>
  );
}

function SignOffBlock({ model }: { model: SheetModel }) {
  const { matching, stale } = model.signOff;
  return (
    <div className="lw-sheet-keep">
      <table className="lw-sheet-wide lw-sheet-signoff">
        <thead>
          <tr><th>Step</th><th>Name</th><th>Role / title</th><th>Date</th><th>Signature</th></tr>
        </thead>
        <tbody>
          {SIGN_OFF_ROLES.map((role) => {
            const recorded = matching.filter((s) => s.role === role);
            if (recorded.length === 0) {
              return (
                <tr key={role}>
                  <th scope="row">{role[0]!.toUpperCase() + role.slice(1)}</th>
                  <td><span className="lw-sheet-line" /></td>
                  <td><span className="lw-sheet-line" /></td>
                  <td><span className="lw-sheet-line" /></td>
                  <td><span className="lw-sheet-line" /></td>
                </tr>
              );
            }
            return recorded.map((s, i) => (
              <tr key={`${role}${i}`}>
                <th scope="row">{role[0]!.toUpperCase() + role.slice(1)}</th>
                <td>{s.name}</td>
                <td>{role}{s.comment ? ` — ${s.comment}` : ""}</td>
                <td className="num">{s.date}</td>
                <td>recorded for <span className="mono">{s.fingerprint}</span><br /><span className="lw-sheet-line" /></td>
              </tr>
            ));
          })}
        </tbody>
      </table>
      {stale.length > 0 && (
        <>
          <p><strong>Sign-offs recorded for an earlier design of this variant</strong> (their fingerprint differs; they do not apply to this sheet):</p>
          <table className="lw-sheet-wide">
            <thead><tr><th>Role</th><th>Name</th><th>Date</th><th>Fingerprint signed</th></tr></thead>
            <tbody>
              {stale.map((s, i) => <tr key={i}><td>{s.role}</td><td>{s.name}</td><td className="num">{s.date}</td><td className="mono">{s.fingerprint}</td></tr>)}
            </tbody>
          </table>
        </>
      )}
    </div>
  );
}

function ChangedBanner({ model }: { model: SheetModel }) {
  if (!model.signOff.changedSinceSignOff) return null;
  const signed = [...new Set(model.signOff.stale.map((s) => s.fingerprint))].join(", ");
  return (
    <div className="lw-sheet-banner" role="alert">
      NOT THE SIGNED DESIGN — changed since sign-off
      <small>Signed fingerprint {signed}; this design is {model.fingerprint}.</small>
    </div>
  );
}

/** Numbers of the optional result sections (after 8 Step response) and of the first section after them. */
function sectionNumbers(result: SheetInput["result"]): { disturbance: number; nonlinear: number; robustness: number; next: number } {
  let next = 9;
  const take = (present: boolean): number => (present && !result.error ? next++ : 0);
  const disturbance = take(result.disturbanceStep !== undefined);
  const nonlinear = take(result.nonlinear !== undefined);
  const robustness = take(result.robustness !== undefined);
  return { disturbance, nonlinear, robustness, next };
}

export function DesignSheet(props: SheetInput) {
  const model = buildSheetModel(props);
  const { project, result } = props;
  const { plant, variant, labels, sampleTime } = model;
  const spec = plant.model;
  const requirements = requirementRows(project, result);
  const gains = gainMatrices(result, variant, labels);
  const otherChecks = result.checks.filter((c) => !c.name.startsWith("requirement:"));
  const checkNumbers = sectionNumbers(result);
  const pzSeries: PoleZeroSeries[] = [
    ...(result.closedLoopPoles ? [{ name: "closed loop", poles: result.closedLoopPoles, styleIndex: 0 }] : []),
    ...(result.plant ? [{ name: "plant (open loop)", poles: result.plant.poles, zeros: result.plant.zeros ?? [], styleIndex: 1 }] : []),
    ...(result.observerPoles ? [{ name: "observer", poles: result.observerPoles, styleIndex: 2 }] : []),
  ];
  return (
    <article className="lw-sheet" aria-label={`Design sheet for ${variant.name ?? variant.id}`}>
      <header className="lw-sheet-title">
        <div>
          <h1>Design sheet: {variant.name ?? variant.id}</h1>
          <div>{project.name}</div>
        </div>
        <div className="lw-sheet-ident">
          <div>variant <span className="mono">{variant.id}</span> · revision {props.revision} · {props.date}</div>
          <div>engine {props.engineVersion} · {props.pageSize === "a4" ? "A4" : "US Letter"}</div>
          <div>fingerprint <span className="lw-sheet-fingerprint">{model.fingerprint}</span></div>
        </div>
      </header>
      <ChangedBanner model={model} />

      <section className="lw-sheet-section">
        <h2>1 Purpose and scope</h2>
        {project.description && <p>{project.description}</p>}
        {plant.description && <p><strong>Plant:</strong> {plant.description}</p>}
        {variant.description && <p><strong>This variant:</strong> {variant.description}</p>}
        {project.notes && <p><strong>Project notes:</strong> {project.notes}</p>}
        {variant.notes && <p><strong>Variant notes:</strong> {variant.notes}</p>}
        {!project.description && !project.notes && !variant.description && !variant.notes && <p className="muted">No description or notes recorded in the project.</p>}
      </section>

      <section className="lw-sheet-section">
        <h2>2 Plant: {plant.name ?? plant.id}</h2>
        <p>
          {formatCount(labels.states.length, "state")}, {formatCount(labels.inputs.length, "input")}, {formatCount(labels.outputs.length, "output")}, {formatCount(labels.disturbances.length, "disturbance")};{" "}
          {spec.sampleTime === null ? "continuous time" : `sampled, T = ${fullDigits(spec.sampleTime)} s`}.{spec.type === "nonlinear" ? " Linearized model δx′ = Aδx + Bδu + Fδw, δy = Cδx + Dδu + Eδw." : " Model x′ = Ax + Bu + Fw, y = Cx + Du + Ew."}
          {result.plant && ` ${result.plant.controllable ? "Controllable" : result.plant.stabilizable ? "Stabilizable, not controllable" : "NOT stabilizable"}; ${result.plant.observable ? "observable" : result.plant.detectable ? "detectable, not observable" : "NOT detectable"}.`}
        </p>
        {spec.type === "state-space" ? (
          <div className="lw-sheet-matrices">{plantMatrices(spec, labels).map((m) => <MatrixTable key={m.symbol} m={m} precision="full" />)}</div>
        ) : spec.type === "transfer-function" ? (
          <KeyValues rows={[{ term: "Numerator (highest power first)", value: JSON.stringify(spec.numerator) }, { term: "Denominator", value: JSON.stringify(spec.denominator) }]} />
        ) : spec.type === "zero-pole-gain" ? (
          <KeyValues rows={[{ term: "Zeros", value: JSON.stringify(spec.zeros) }, { term: "Poles", value: JSON.stringify(spec.poles) }, { term: "Gain", value: typeof spec.gain === "number" ? fullDigits(spec.gain) : JSON.stringify(spec.gain) }]} />
        ) : (
          <NonlinearPlantSection model={model} spec={spec} />
        )}
        {result.discrete && (
          <>
            <h3>Discretized model ({result.discrete.method === "zoh" ? "zero-order hold" : "Tustin"}, T = {fullDigits(result.discrete.sampleTime)} s), as designed</h3>
            <div className="lw-sheet-matrices">{plantMatrices(result.discrete, labels, "d").map((m) => <MatrixTable key={m.symbol} m={m} precision="full" />)}</div>
          </>
        )}
        {result.plant && <PoleTable title="Open-loop plant poles" poles={result.plant.poles} sampleTime={sampleTime} />}
      </section>

      <section className="lw-sheet-section">
        <h2>3 Assumptions and limits</h2>
        <ul>{assumptions(plant, variant, result).map((a, i) => <li key={i}>{a}</li>)}</ul>
        {spec.type === "nonlinear" && <LimitsTable spec={spec} />}
      </section>

      <section className="lw-sheet-section">
        <h2>4 Design method and parameters</h2>
        <KeyValues rows={methodParameters(variant)} />
      </section>

      {result.error ? (
        <section className="lw-sheet-section">
          <h2>5 Result</h2>
          <p className="lw-sheet-error">NOT DESIGNED: {result.error.message} [{result.error.kind}]</p>
        </section>
      ) : (
        <>
          <section className="lw-sheet-section">
            <h2>5 Resulting gains</h2>
            {gains.length === 0 && <p>No gains: the variant has no state feedback.</p>}
            {gains.map((m) => (
              <div key={m.symbol} className="lw-sheet-keep">
                <MatrixTable m={m} precision="full" />
                <MatrixTable m={m} precision="rounded" />
              </div>
            ))}
          </section>

          <section className="lw-sheet-section">
            <h2>6 Closed-loop poles</h2>
            {result.closedLoopPoles && <PoleTable title="State-feedback loop (with integrators when present)" poles={result.closedLoopPoles} sampleTime={sampleTime} />}
            {result.observerPoles && <PoleTable title="Observer" poles={result.observerPoles} sampleTime={sampleTime} />}
            {pzSeries.length > 0 && (
              <PoleMapFigure
                width={PLOT_WIDTH}
                height={400}
                zoomHeight={360}
                series={pzSeries}
                sampleTime={sampleTime}
                title={`Pole-zero map (${sampleTime === null ? "s-plane" : `z-plane, T = ${fullDigits(sampleTime)} s`})`}
                focus={{ poles: [...(result.plant?.poles ?? []), ...(result.observerPoles ?? [])], anchors: result.closedLoopPoles ?? result.observerPoles ?? result.plant?.poles ?? [] }}
                subject={result.closedLoopPoles ? "the closed-loop poles" : "the poles"}
              />
            )}
          </section>

          <section className="lw-sheet-section">
            <h2>7 Margins at the plant input and sensitivity peaks</h2>
            <MarginsSection model={model} />
            <ChannelMarginsTable model={model} />
            {result.bode ? (
              <div className="lw-sheet-figure">
                <BodePlot
                  variant="print"
                  width={PLOT_WIDTH}
                  height={420}
                  title={result.bode.loop === "plant-input" ? "Bode plot of the loop broken at the plant input" : `Bode plot of the plant, ${result.bode.input} → ${result.bode.output}`}
                  series={[{ name: result.name, frequency: result.bode.frequency, magnitudeDb: result.bode.magnitudeDb, phaseDeg: result.bode.phaseDeg, margins: result.margins ?? null }]}
                />
              </div>
            ) : (
              <p className="muted">No Bode plot: the variant requests no frequency grid (set <span className="mono">bode.frequencies</span>).</p>
            )}
          </section>

          <section className="lw-sheet-section">
            <h2>8 Step response</h2>
            <StepSection model={model} />
          </section>
          <DisturbanceSection model={model} number={checkNumbers.disturbance} />
          <NonlinearCheckSection model={model} number={checkNumbers.nonlinear} />
          <RobustnessSection model={model} number={checkNumbers.robustness} />
        </>
      )}

      <section className="lw-sheet-section">
        <h2>{checkNumbers.next} Requirements checklist</h2>
        {requirements.length === 0 ? <p>The project states no requirements.</p> : (
          <table className="lw-sheet-wide lw-sheet-requirements">
            <thead><tr><th>Requirement</th><th>Description</th><th>Limit</th><th>Value</th><th>Result</th></tr></thead>
            <tbody>
              {requirements.map((r) => (
                <tr key={r.id}>
                  <td className="mono">{r.id}</td><td>{r.description}</td><td className="num">{r.limit}</td><td className="num">{r.value}</td>
                  <td className={r.status === "pass" ? "lw-pass" : "lw-fail"}>{r.status === "pass" ? "PASS" : r.status === "fail" ? "FAIL" : "NOT EVALUATED"}</td>
                </tr>
              ))}
            </tbody>
          </table>
        )}
      </section>

      <section className="lw-sheet-section">
        <h2>{checkNumbers.next + 1} Diagnostics</h2>
        <KeyValues
          rows={[
            ...(result.design ? [{ term: "Method", value: result.design.method }, { term: "Gain norm ‖K‖F", value: rounded(result.design.gainNorm, 6) }] : []),
            ...(result.design?.eigenvectorCondition !== undefined ? [{ term: "Eigenvector condition κ(V)", value: rounded(result.design.eigenvectorCondition, 4) }] : []),
            ...(result.design?.maxPoleError !== undefined ? [{ term: "Largest pole placement error", value: result.design.maxPoleError.toExponential(2) }] : []),
            ...(result.riccati ? [{ term: "Riccati residual ‖Res‖F/‖X‖F", value: result.riccati.residual.toExponential(2) }, { term: "Riccati condition indicator", value: result.riccati.conditionIndicator.toExponential(2) }] : []),
            ...(result.kalman ? [{ term: "Kalman Riccati residual", value: result.kalman.residual.toExponential(2) }] : []),
          ]}
        />
        {otherChecks.length > 0 && (
          <table className="lw-sheet-wide">
            <thead><tr><th>Check</th><th>Detail</th><th>Result</th></tr></thead>
            <tbody>{otherChecks.map((c) => <tr key={c.name}><td className="mono">{c.name}</td><td>{c.detail}</td><td className={c.passed ? "lw-pass" : "lw-fail"}>{c.passed ? "PASS" : "FAIL"}</td></tr>)}</tbody>
          </table>
        )}
        {result.warnings.length > 0 ? <ul>{result.warnings.map((w, i) => <li key={i}><strong>Warning:</strong> {w}</li>)}</ul> : <p>No warnings.</p>}
      </section>

      <section className="lw-sheet-section lw-sheet-keep">
        <h2>{checkNumbers.next + 2} Fingerprint and sign-off</h2>
        <p>
          Design fingerprint <span className="lw-sheet-fingerprint">{model.fingerprint}</span> — SHA-256 of the plant, the variant and the engine version ({props.engineVersion}) in canonical JSON. A sign-off applies only to the design with this fingerprint.
        </p>
        <ChangedBanner model={model} />
        <SignOffBlock model={model} />
      </section>

      <section className="lw-sheet-cautions lw-sheet-keep" aria-label="Cautions">
        <h2>Cautions</h2>
        <ul>{SHEET_CAUTIONS.map((c) => <li key={c}>{c}</li>)}</ul>
      </section>
    </article>
  );
}
