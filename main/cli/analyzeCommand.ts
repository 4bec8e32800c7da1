/** `loopwright analyze FILE --plant ID`: structure, poles, zeros, DC gain, stability and modal coupling of one plant. */
import { dispatch, type EngineResult } from "../../shared-engine/api";
import { isEngineError } from "../../shared-engine/errors";
import { formatComplex, formatCount, formatReal, formatTable } from "../../shared-engine/format";
import { describeOptions, parseArgs, type OptionSpec } from "./args";
import { EXIT, usageError } from "./io";
import { matrixLines, optionalNumber, printJson, readProjectPlant } from "./projectPlant";
import type { Command } from "./commands";

const options: Record<string, OptionSpec> = {
  plant: { value: true, valueName: "ID", description: "the plant to analyze (may be left out when the file has one plant)" },
  json: { value: false, description: "print only JSON on stdout" },
};

type Section<M extends "analysis.modalForm" | "analysis.zeros"> = EngineResult<M> | { error: { kind: string; message: string } };

/** Modal form and zeros can fail for a valid plant (defective A, degenerate channel): report, do not abort. */
async function optionalSection<M extends "analysis.modalForm" | "analysis.zeros">(method: M, params: unknown): Promise<Section<M>> {
  try {
    return (await dispatch(method, params)) as EngineResult<M>;
  } catch (error) {
    if (isEngineError(error) && error.kind !== "internal") return { error: { kind: error.kind, message: error.message } };
    throw error;
  }
}

const list = (values: { re: number; im: number }[]): string => (values.length === 0 ? "none" : values.map((v) => formatComplex(v, 6)).join(", "));

export const analyze: Command = {
  name: "analyze",
  summary: "structure, poles, zeros, DC gain, stability and modal coupling of a plant in a project file",
  help: () =>
    `Usage: loopwright analyze FILE [--plant ID] [--json]\n\nReads one plant of a Loopwright project file and reports: controllability and\nobservability (with the modes that fail them), stabilizability and detectability, poles and\nstability, transmission zeros, DC gain, and the modal form's coupling report (participation\nof each state in each mode). Exit code 0 on success, 1 when the file or plant is invalid,\n2 for usage errors.\n\nOptions:\n${describeOptions(options)}\n`,
  async run(args, io) {
    const { options: opts, positionals } = parseArgs(args, options, "analyze");
    if (positionals.length !== 1) throw usageError("analyze needs exactly one project FILE");
    const plantOption = opts.get("plant");
    const { plant, model, warnings } = await readProjectPlant(positionals[0]!, typeof plantOption === "string" ? plantOption : undefined, io, "analyze");
    for (const w of warnings) io.stderr(`warning: ${w.path}: ${w.message}\n`);
    const structure = (await dispatch("analysis.structure", { model })) as EngineResult<"analysis.structure">;
    const poles = (await dispatch("analysis.poles", { model })) as EngineResult<"analysis.poles">;
    const zeros = await optionalSection("analysis.zeros", { model });
    const modal = model.A.length === 0 ? { error: { kind: "empty", message: "the plant has no states" } } : await optionalSection("analysis.modalForm", { model });
    const dimensions = { states: model.A.length, inputs: model.names.inputs.length, outputs: model.names.outputs.length, disturbances: model.names.disturbances.length };
    if (opts.has("json")) {
      printJson(io, { plant: plant.id, name: plant.name ?? plant.id, sampleTime: model.sampleTime, dimensions, structure, poles, zeros, modal });
      return EXIT.ok;
    }
    const lines: string[] = [];
    lines.push(`Plant ${plant.id}${plant.name && plant.name !== plant.id ? ` — ${plant.name}` : ""}`);
    lines.push(`  ${formatCount(dimensions.states, "state")}, ${formatCount(dimensions.inputs, "input")}, ${formatCount(dimensions.outputs, "output")}, ${formatCount(dimensions.disturbances, "disturbance")}; ${model.sampleTime === null ? "continuous" : `sampled at ${model.sampleTime} s`}`);
    lines.push("");
    lines.push("Structure");
    lines.push(`  controllable: ${structure.controllable ? "yes" : `no (controllable dimension ${structure.controllableDimension} of ${dimensions.states}; uncontrollable modes ${list(structure.uncontrollableModes)})`}`);
    lines.push(`  stabilizable: ${structure.stabilizable ? "yes" : `NO (unstable uncontrollable modes ${list(structure.unstableUncontrollableModes)})`}`);
    lines.push(`  observable:   ${structure.observable ? "yes" : `no (observable dimension ${structure.observableDimension} of ${dimensions.states}; unobservable modes ${list(structure.unobservableModes)})`}`);
    lines.push(`  detectable:   ${structure.detectable ? "yes" : `NO (unstable unobservable modes ${list(structure.unstableUnobservableModes)})`}`);
    lines.push("");
    const s = poles.stability;
    const verdict = s.stable ? "stable" : s.marginal ? "marginally stable (poles on the boundary)" : "UNSTABLE";
    lines.push(`Poles (${verdict}${s.spectralAbscissa !== null ? `; max Re = ${formatReal(s.spectralAbscissa, 6)}` : ""}${s.spectralRadius !== null ? `; max |z| = ${formatReal(s.spectralRadius, 6)}` : ""})`);
    const discrete = model.sampleTime !== null;
    const poleRows = poles.poles.map((p, i) => {
      const z = Math.hypot(p.re, p.im);
      const omega = discrete ? Math.abs(Math.log(Math.max(z, 1e-300)) / model.sampleTime!) : z;
      const damping = discrete ? null : z === 0 ? null : -p.re / z;
      return [String(i + 1), formatComplex(p, 6), formatReal(omega, 5), damping === null ? "—" : formatReal(damping, 4)];
    });
    lines.push(...formatTable([["#", "pole", discrete ? "|ln z|/T" : "|s| rad/s", "damping"], ...poleRows]).trimEnd().split("\n").map((l) => `  ${l}`));
    lines.push("");
    if ("error" in zeros) lines.push(`Transmission zeros: not available (${zeros.error.message})`);
    else {
      lines.push(`Transmission zeros: ${list(zeros.finite)}; ${zeros.infiniteCount} at infinity`);
      if (zeros.decouplingZeros.length > 0) lines.push(`  decoupling zeros (modes not reaching y from u): ${list(zeros.decouplingZeros)}`);
    }
    lines.push("");
    if (poles.dcGain.gain === null) lines.push(`DC gain: unbounded (${poles.dcGain.reason ?? "pole at the origin"})`);
    else lines.push("DC gain (rows: outputs, columns: inputs):", ...matrixLines(poles.dcGain.gain, "  "));
    lines.push("");
    if ("error" in modal) lines.push(`Modal coupling: not available (${modal.error.message})`);
    else {
      const c = modal.coupling;
      lines.push(`Modal coupling (off-diagonal ratio ${formatReal(c.offDiagonalRatio, 4)}, κ₂(T) ${optionalNumber(modal.condition, "", 4)}, residual ${modal.residual.toExponential(2)})`);
      const header = ["mode", ...c.states, "dominant"];
      const rows = c.modes.map((m) => [formatComplex(m.eigenvalue, 5), ...m.participation.map((x) => formatReal(x, 3)), m.dominantStates.join(", ")]);
      lines.push(...formatTable([header, ...rows]).trimEnd().split("\n").map((l) => `  ${l}`));
      for (const w of modal.diagnostics.warnings) lines.push(`  warning: ${w}`);
    }
    io.stdout(`${lines.join("\n")}\n`);
    return EXIT.ok;
  },
};
