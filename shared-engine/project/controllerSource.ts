/**
 * The controller export as portable C source: one self-contained C99 file that an engineer
 * compiles into the software that runs the controller every T seconds. The file has two parts:
 * the interface (sizes, index constants, the state struct and two prototypes; copy it into a
 * header when other files call the controller) and the implementation (the matrices as static
 * constants, `lw_<id>_init` and `lw_<id>_step`). Documented in docs/project-format.md
 * ("Controller export as C source").
 * WARNING: the generated names are what deployed code calls; changing the naming rules breaks
 * every project that regenerates its controller. Add an option instead.
 */
import { EngineError } from "../errors";
import { CONTROLLER_FORMAT, CONTROLLER_VERSION, type ControllerExport } from "./controllerExport";
import { asciiComment, cComment, cDoubleLiteral, cIdentifierPart, uniqueIdentifiers } from "./cSourceText";

export { asciiComment, cDoubleLiteral, cIdentifierPart, uniqueIdentifiers } from "./cSourceText";

/** The cautions every exported controller carries (the command line prints the same words). */
export const CONTROLLER_CAUTIONS: readonly string[] = [
  "Simulation is not validation: test the controller on the real equipment under supervision.",
  "Keep independent safety interlocks; this controller is not a safety function.",
  "Follow the applicable codes and licensed engineering practice before it runs on equipment.",
];

/** C99 guarantees 63 significant characters for macro and internal names, 31 for external names. */
const INTERNAL_NAME_LIMIT = 63;
const EXTERNAL_NAME_LIMIT = 31;

/** The generated file and the names it defines, for callers that show or check them. */
export interface ControllerSource {
  /** The C99 source text (ASCII only, "\n" line ends). */
  text: string;
  /** The identifier prefix: functions `<prefix>_init`/`<prefix>_step`, type `<prefix>_state`. */
  prefix: string;
  /** Index constants per signal, in signal order (names after sanitising and collisions). */
  constants: { references: string[]; measurements: string[]; commands: string[]; states: string[] };
}

type Matrices = ControllerExport["matrices"];

/** Checks the export as untrusted data (it may come from a file): shapes, finiteness, ranges. */
function checkExport(c: ControllerExport): { nr: number; p: number; m: number; nc: number } {
  const bad = (message: string, field: string): never => { throw new EngineError("invalid-argument", message, { field }); };
  if (c === null || typeof c !== "object" || c.format !== CONTROLLER_FORMAT || c.version !== CONTROLLER_VERSION) {
    bad(`the controller export must have format "${CONTROLLER_FORMAT}" and version ${CONTROLLER_VERSION}; no C source is made from anything else`, "format");
  }
  if (typeof c.sampleTime !== "number" || !(c.sampleTime > 0) || !Number.isFinite(c.sampleTime)) {
    bad(`the controller has no sampled form (sampleTime is ${String(c.sampleTime)}); C source needs a positive finite sample period`, "sampleTime");
  }
  const list = (v: unknown, field: string): unknown[] => (Array.isArray(v) ? v : bad(`${field} must be a list`, field));
  const nr = list(c.signals?.references, "signals.references").length;
  const p = list(c.signals?.measurements, "signals.measurements").length;
  const m = list(c.signals?.inputs, "signals.inputs").length;
  const nc = list(c.signals?.states, "signals.states").length;
  if (nr === 0 || p === 0 || m === 0) bad(`a controller needs references, measurements and inputs (it has ${nr}, ${p} and ${m})`, "signals");
  const names = [...c.signals.references, ...c.signals.measurements, ...c.signals.inputs];
  names.forEach((s, i) => { if (typeof s?.name !== "string" || typeof s.unit !== "string") bad(`signal ${i} needs a text name and unit`, "signals"); });
  if (c.signals.states.some((s) => typeof s !== "string")) bad("signals.states must be names", "signals.states");
  const number = (v: unknown, field: string): number => {
    if (typeof v !== "number") return bad(`${field} must be a number`, field);
    if (!Number.isFinite(v)) throw new EngineError("non-finite", `${field} is ${v}; a controller in C needs finite numbers`, { field });
    return v;
  };
  const shape: Record<keyof Matrices, [number, number]> = { Ac: [nc, nc], Bc: [nc, nr + p], Cc: [m, nc], Dc: [m, nr + p], Bsat: [nc, m] };
  for (const [key, [rows, cols]] of Object.entries(shape) as [keyof Matrices, [number, number]][]) {
    const M = list(c.matrices?.[key], `matrices.${key}`);
    if (M.length !== rows || M.some((row) => !Array.isArray(row) || row.length !== cols)) {
      throw new EngineError("shape-mismatch", `matrices.${key} must be ${rows}×${cols} (${nc} states, ${nr} references, ${p} measurements, ${m} inputs)`, { field: `matrices.${key}` });
    }
    (M as unknown[][]).forEach((row, i) => row.forEach((v, j) => number(v, `matrices.${key}[${i}][${j}]`)));
  }
  const vector = (v: unknown, n: number, field: string): void => {
    const xs = list(v, field);
    if (xs.length !== n) throw new EngineError("shape-mismatch", `${field} must have ${n} entries (it has ${xs.length})`, { field });
    xs.forEach((x, i) => number(x, `${field}[${i}]`));
  };
  vector(c.initialState, nc, "initialState");
  if (c.operatingPoint !== undefined) {
    vector(c.operatingPoint.references, nr, "operatingPoint.references");
    vector(c.operatingPoint.measurements, p, "operatingPoint.measurements");
    vector(c.operatingPoint.inputs, m, "operatingPoint.inputs");
  }
  if (list(c.limits, "limits").length !== m) throw new EngineError("shape-mismatch", `limits must have one entry per input (${m})`, { field: "limits" });
  c.limits.forEach((l, i) => {
    for (const key of ["min", "max", "rateLimit"] as const) if (l[key] !== null) number(l[key], `limits[${i}].${key}`);
    if (l.min !== null && l.max !== null && l.min > l.max) bad(`limits[${i}] has min ${l.min} above max ${l.max}`, `limits[${i}]`);
    if (l.rateLimit !== null && !(l.rateLimit > 0)) bad(`limits[${i}].rateLimit is ${l.rateLimit}; it must be positive`, `limits[${i}].rateLimit`);
  });
  const aw = c.antiWindup;
  if (!aw || !["back-calculation", "conditional", "none"].includes(aw.method)) bad(`antiWindup.method must be "back-calculation", "conditional" or "none"`, "antiWindup.method");
  if (aw.trackingGain !== null) number(aw.trackingGain, "antiWindup.trackingGain");
  list(aw.integratorStates, "antiWindup.integratorStates").forEach((s, i) => {
    if (!Number.isInteger(s) || (s as number) < 0 || (s as number) >= nc) bad(`antiWindup.integratorStates[${i}] must be a state index below ${nc}`, `antiWindup.integratorStates[${i}]`);
  });
  if (!/^[A-Za-z0-9._+-]*$/.test(String(c.fingerprint)) || !/^[A-Za-z0-9._+-]*$/.test(String(c.engineVersion))) {
    bad("fingerprint and engineVersion may hold only letters, digits and . _ + -", "fingerprint");
  }
  list(c.executionOrder, "executionOrder");
  return { nr, p, m, nc };
}

/**
 * Computes: the C99 source of a sampled controller export `c` (see `ControllerExport`): a state
 *   struct (xc: nc doubles, u_prev: the m commands applied at the last sample), an init function
 *   (xc = xc[0], u_prev = u0) and a step function called every T seconds that, in the export's
 *   execution order, forms δr = r − r0 and δy = y − y0 from absolute r (nr) and y (p), computes
 *   u_unsat = u0 + Cc·xc + Dc·[δr; δy], limits each command (min/max, then the rate window
 *   u_prev ± rateLimit·T, then min/max again: the order of the nonlinear check's sampled
 *   controller), updates xc ← Ac·xc + Bc·[δr; δy] + Bsat·(u − u_unsat) and, for conditional
 *   integration, keeps integrator state s at its old value when for some input i the product
 *   Cc[i][s]·(step of s) has the sign of u_unsat,i − u_i (pushes a limited input further out).
 *   It returns the number of limited commands, or −1 (state untouched, u = u_prev) when an
 *   input is NaN or infinite.
 * Requires: an export with format "loopwright-controller" version 1, a positive sample period,
 *   consistent shapes, finite numbers and at least one reference, measurement and input.
 * Method: straight code generation; numbers as 17-significant-digit literals (`cDoubleLiteral`,
 *   exact round trip); names sanitised by `uniqueIdentifiers` (prefix lw_<variant>, shortened
 *   to 23 characters so the external names stay within C99's 31; constants within 63).
 *   Conditional integration as in K. J. Åström & L. Rundqwist, "Integrator windup and how to
 *   avoid it", Proc. American Control Conference 1989 (the rule of `integratorUpdate`).
 * Cost: O(nc² + nc·(nr + p + m) + m·(nr + p)) characters; the C step costs the same in flops.
 * Accuracy: every number in the file reads back to the exported double exactly; the C step
 *   does the exported arithmetic in the documented order (the CLI test compiles it and checks
 *   it against an independent recursion to 1e-12 relative).
 * Errors: "invalid-argument" (not a version-1 controller export, no positive sample period, no
 *   references/measurements/inputs, bad limits, anti-windup method or integrator index, unsafe
 *   characters in the fingerprint), "shape-mismatch" (matrix or vector sizes), "non-finite"
 *   (NaN or Infinity anywhere); every error names the field in `details.field`.
 * Example:
 *   const src = controllerSource(controllerExport(rackPlant, observerVariant));
 *   // src.prefix === "lw_observer_sampled"; src.text contains "int lw_observer_sampled_step("
 */
export function controllerSource(c: ControllerExport): ControllerSource {
  const { nr, p, m, nc } = checkExport(c);
  const prefix = `lw_${cIdentifierPart(c.variant ?? "controller").toLowerCase().slice(0, EXTERNAL_NAME_LIMIT - "lw__init".length)}`;
  const P = prefix.toUpperCase();
  const constants = {
    references: uniqueIdentifiers(c.signals.references.map((s) => s.name), `${P}_REF_`, INTERNAL_NAME_LIMIT, true),
    measurements: uniqueIdentifiers(c.signals.measurements.map((s) => s.name), `${P}_MEAS_`, INTERNAL_NAME_LIMIT, true),
    commands: uniqueIdentifiers(c.signals.inputs.map((s) => s.name), `${P}_CMD_`, INTERNAL_NAME_LIMIT, true),
    states: uniqueIdentifiers(c.signals.states, `${P}_XC_`, INTERNAL_NAME_LIMIT, true),
  };
  const T = c.sampleTime;
  const op = c.operatingPoint ?? { references: new Array<number>(nr).fill(0), measurements: new Array<number>(p).fill(0), inputs: new Array<number>(m).fill(0) };
  const conditional = c.antiWindup.method === "conditional" && c.antiWindup.integratorStates.length > 0 && nc > 0;
  const unit = (u: string): string => (u === "" ? "" : ` [${u}]`);
  const show = (v: number): string => String(v); // shortest exact form, for the comment

  // ---- Header comment ---------------------------------------------------------------------
  const head: string[] = [
    `Controller of variant "${c.variant}" (plant "${c.plant}"), C99 source made by the Loopwright engine ${c.engineVersion}`,
    `from its controller export (format ${CONTROLLER_FORMAT}, version ${CONTROLLER_VERSION}).`,
    `Design fingerprint: ${c.fingerprint} (the one a sign-off records).`,
    `Sample period: T = ${show(T)} s (${c.designedIn === "discrete" ? "designed in discrete time" : "continuous design sampled by zero-order hold"}).`,
    "",
    "CAUTIONS",
    ...CONTROLLER_CAUTIONS.map((s) => `  - ${s}`),
    "",
    "SIGNALS (index constant = position: name [unit])",
    "  references r (absolute):",
    ...c.signals.references.map((s, i) => `    ${constants.references[i]} = ${i}: ${s.name}${unit(s.unit)}`),
    "  measurements y (absolute):",
    ...c.signals.measurements.map((s, i) => `    ${constants.measurements[i]} = ${i}: ${s.name}${unit(s.unit)}`),
    "  commands u (absolute, after limits):",
    ...c.signals.inputs.map((s, i) => `    ${constants.commands[i]} = ${i}: ${s.name}${unit(s.unit)}`),
    `  controller states xc (${nc}):`,
    ...(nc === 0 ? ["    none (a static gain)"] : c.signals.states.map((s, i) => `    ${constants.states[i]} = ${i}: ${s}`)),
    "",
    `OPERATING POINT (the equations run on deviations from it)${c.operatingPoint ? "" : ": none, a linear plant (r0 = y0 = u0 = 0)"}`,
    ...(c.operatingPoint ? [`  r0 = [${op.references.map(show).join(", ")}]`, `  y0 = [${op.measurements.map(show).join(", ")}]`, `  u0 = [${op.inputs.map(show).join(", ")}]`] : []),
    "",
    "EQUATIONS (sample k)",
    "  dr = r[k] - r0,  dy = y[k] - y0",
    "  u_unsat[k] = u0 + Cc*xc[k] + Dc*[dr; dy]",
    "  u[k]       = limits applied to u_unsat[k] (below)",
    "  xc[k+1]    = Ac*xc[k] + Bc*[dr; dy] + Bsat*(u[k] - u_unsat[k])",
    "",
    "LIMITS (applied in this order: min/max, the rate window u[k-1] +/- rateLimit*T with u[-1] = u0, min/max again)",
    ...c.limits.map((l, i) => `  ${c.signals.inputs[i]!.name}: min ${l.min === null ? "none" : show(l.min)}, max ${l.max === null ? "none" : show(l.max)}, rate ${l.rateLimit === null ? "none" : `${show(l.rateLimit)} per s`}`),
    `ANTI-WINDUP: ${c.antiWindup.method}${c.antiWindup.trackingGain !== null ? `, tracking gain Kt = ${show(c.antiWindup.trackingGain)} 1/s (in Bsat)` : ""}${conditional ? "; an integrator state keeps its old value when its step would push a limited command further out (sign of Cc[i][s]*step equals sign of u_unsat[i] - u[i])" : ""}`,
    "",
    "EXECUTION ORDER PER SAMPLE (from the export). Your code reads r and y and calls",
    `${prefix}_step, which forms the deviations, computes and limits u, then updates and stores`,
    "the state, in this order, and returns u: write u to the actuators as soon as it returns.",
    ...c.executionOrder.map((s, i) => `  ${i + 1}. ${s}`),
    "",
    "CHECKS AT EXPORT",
    ...c.checks.map((k) => `  ${k.passed ? "pass" : "FAIL"}  ${k.name}: ${k.detail}`),
    ...(c.warnings.length > 0 ? ["WARNINGS", ...c.warnings.map((w) => `  - ${w}`)] : []),
    "",
    "USE",
    `  ${prefix}_state s;  ${prefix}_init(&s);  then every T seconds:`,
    `  n = ${prefix}_step(&s, r, y, u);  with r, y, u double arrays indexed by the constants above.`,
    "  n is the number of commands the limits changed this sample, or -1 when an input was NaN or",
    "  infinite: then the state is unchanged and u holds the last applied commands; your code",
    "  decides the fail-safe action. One state object per running controller; no dynamic memory,",
    "  no globals written; plain double; needs only <math.h> (isfinite). Compiles with",
    "  cc -std=c99 -Wall -Wextra -Werror -pedantic. The interface part (up to IMPLEMENTATION) can",
    "  be copied into a header for callers in other files.",
    "  Names: signal names reduced to letters, digits and _ (accents dropped, other characters",
    "  as _), upper case, shortened to 63 characters; a repeated name gets _2, _3 in signal order.",
  ];
  const lines: string[] = ["/*", ...head.map((s) => asciiComment(s === "" ? " *" : ` * ${s}`).replace(/\s+$/, "")), " */", "#include <math.h>", ""];

  // ---- Interface ----------------------------------------------------------------------------
  const nv = nr + p;
  lines.push(
    "/* ---- INTERFACE ---- */",
    "#ifdef __cplusplus",
    'extern "C" {',
    "#endif",
    `#define ${P}_NUM_REFERENCES ${nr}`,
    `#define ${P}_NUM_MEASUREMENTS ${p}`,
    `#define ${P}_NUM_COMMANDS ${m}`,
    `#define ${P}_NUM_STATES ${nc}`,
    `#define ${P}_SAMPLE_TIME ${cDoubleLiteral(T)} /* s */`,
    `#define ${P}_FINGERPRINT "${c.fingerprint}"`,
    `#define ${P}_ENGINE_VERSION "${c.engineVersion}"`,
    ...c.signals.references.map((s, i) => `#define ${constants.references[i]} ${i} ${cComment(`${s.name}${unit(s.unit)}`)}`),
    ...c.signals.measurements.map((s, i) => `#define ${constants.measurements[i]} ${i} ${cComment(`${s.name}${unit(s.unit)}`)}`),
    ...c.signals.inputs.map((s, i) => `#define ${constants.commands[i]} ${i} ${cComment(`${s.name}${unit(s.unit)}`)}`),
    ...c.signals.states.map((s, i) => `#define ${constants.states[i]} ${i} ${cComment(s)}`),
    "",
    `typedef struct ${prefix}_state {`,
    ...(nc > 0 ? [`    double xc[${nc}];     /* controller state xc[k] */`] : []),
    `    double u_prev[${m}]; /* commands applied at the last sample, u[k-1] (u0 after init) */`,
    `} ${prefix}_state;`,
    "",
    `void ${prefix}_init(${prefix}_state *state);`,
    `int ${prefix}_step(${prefix}_state *state, const double r[${nr}], const double y[${p}], double u[${m}]);`,
    "#ifdef __cplusplus",
    "}",
    "#endif",
    "",
    "/* ---- IMPLEMENTATION ---- */",
  );
  const vectorConst = (name: string, values: readonly number[]): string => `static const double ${prefix}_${name}[${values.length}] = { ${values.map(cDoubleLiteral).join(", ")} };`;
  const matrixConst = (name: string, M: readonly (readonly number[])[]): string[] => [
    `static const double ${prefix}_${name}[${M.length}][${M[0]!.length}] = {`,
    ...M.map((row, i) => `    { ${row.map(cDoubleLiteral).join(", ")} }${i < M.length - 1 ? "," : ""}`),
    "};",
  ];
  lines.push(vectorConst("r0", op.references), vectorConst("y0", op.measurements), vectorConst("u0", op.inputs));
  if (nc > 0) lines.push(vectorConst("xc0", c.initialState), ...matrixConst("Ac", c.matrices.Ac), ...matrixConst("Bc", c.matrices.Bc), ...matrixConst("Cc", c.matrices.Cc));
  lines.push(...matrixConst("Dc", c.matrices.Dc));
  if (nc > 0) lines.push(...matrixConst("Bsat", c.matrices.Bsat));
  if (conditional) lines.push(`static const int ${prefix}_integrators[${c.antiWindup.integratorStates.length}] = { ${c.antiWindup.integratorStates.join(", ")} };`);

  // ---- init ----------------------------------------------------------------------------------
  lines.push(
    "",
    `void ${prefix}_init(${prefix}_state *state)`,
    "{",
    "    int i;",
    ...(nc > 0 ? [`    for (i = 0; i < ${nc}; ++i) state->xc[i] = ${prefix}_xc0[i];`] : []),
    `    for (i = 0; i < ${m}; ++i) state->u_prev[i] = ${prefix}_u0[i];`,
    "}",
    "",
  );

  // ---- step ----------------------------------------------------------------------------------
  const step: string[] = [
    `int ${prefix}_step(${prefix}_state *state, const double r[${nr}], const double y[${p}], double u[${m}])`,
    "{",
    `    double v[${nv}]; /* [dr; dy] */`,
    `    double u_unsat[${m}];`,
    ...(nc > 0 ? [`    double next[${nc}];`] : []),
    "    int i, j, limited = 0, finite = 1;",
    "    /* Guard: a NaN or infinite input must not enter the state; hold the last commands. */",
    `    for (i = 0; i < ${nr}; ++i) if (!isfinite(r[i])) finite = 0;`,
    `    for (i = 0; i < ${p}; ++i) if (!isfinite(y[i])) finite = 0;`,
    "    if (!finite) {",
    `        for (i = 0; i < ${m}; ++i) u[i] = state->u_prev[i];`,
    "        return -1;",
    "    }",
    "    /* Deviations from the operating point. */",
    `    for (i = 0; i < ${nr}; ++i) v[i] = r[i] - ${prefix}_r0[i];`,
    `    for (i = 0; i < ${p}; ++i) v[${nr} + i] = y[i] - ${prefix}_y0[i];`,
    "    /* u_unsat = u0 + Cc*xc + Dc*[dr; dy]. */",
    `    for (i = 0; i < ${m}; ++i) {`,
    `        double s = ${prefix}_u0[i];`,
    ...(nc > 0 ? [`        for (j = 0; j < ${nc}; ++j) s += ${prefix}_Cc[i][j] * state->xc[j];`] : []),
    `        for (j = 0; j < ${nv}; ++j) s += ${prefix}_Dc[i][j] * v[j];`,
    "        u_unsat[i] = s;",
    "    }",
    "    /* Limits per command: min/max, rate window around u[k-1], min/max again. */",
  ];
  c.limits.forEach((l, i) => {
    const clamp = (indent: string): string[] => [
      ...(l.min !== null ? [`${indent}if (a < ${cDoubleLiteral(l.min)}) a = ${cDoubleLiteral(l.min)};`] : []),
      ...(l.max !== null ? [`${indent}if (a > ${cDoubleLiteral(l.max)}) a = ${cDoubleLiteral(l.max)};`] : []),
    ];
    step.push(`    ${cComment(`${c.signals.inputs[i]!.name}${unit(c.signals.inputs[i]!.unit)}`)}`, "    {", `        double a = u_unsat[${i}];`, ...clamp("        "));
    if (l.rateLimit !== null) {
      step.push(
        "        {",
        `            const double change = ${cDoubleLiteral(l.rateLimit)} * ${P}_SAMPLE_TIME;`,
        `            const double low = state->u_prev[${i}] - change;`,
        `            const double high = state->u_prev[${i}] + change;`,
        "            if (a < low) a = low;",
        "            if (a > high) a = high;",
        "        }",
        ...clamp("        "),
      );
    }
    step.push(`        u[${i}] = a;`, "    }");
  });
  step.push(`    for (i = 0; i < ${m}; ++i) if (u[i] != u_unsat[i]) ++limited;`);
  if (nc > 0) {
    step.push(
      "    /* State update: xc[k+1] = Ac*xc + Bc*[dr; dy] + Bsat*(u - u_unsat). */",
      `    for (i = 0; i < ${nc}; ++i) {`,
      "        double s = 0.0;",
      `        for (j = 0; j < ${nc}; ++j) s += ${prefix}_Ac[i][j] * state->xc[j];`,
      `        for (j = 0; j < ${nv}; ++j) s += ${prefix}_Bc[i][j] * v[j];`,
      `        for (j = 0; j < ${m}; ++j) s += ${prefix}_Bsat[i][j] * (u[j] - u_unsat[j]);`,
      "        next[i] = s;",
      "    }",
    );
    if (conditional) {
      step.push(
        "    /* Conditional integration: hold an integrator whose step pushes a limited command further out. */",
        `    for (j = 0; j < ${c.antiWindup.integratorStates.length}; ++j) {`,
        `        const int s = ${prefix}_integrators[j];`,
        "        const double change = next[s] - state->xc[s];",
        `        for (i = 0; i < ${m}; ++i) {`,
        "            const double gap = u_unsat[i] - u[i];",
        `            const double push = ${prefix}_Cc[i][s] * change;`,
        "            if ((gap > 0.0 && push > 0.0) || (gap < 0.0 && push < 0.0)) {",
        "                next[s] = state->xc[s];",
        "                break;",
        "            }",
        "        }",
        "    }",
      );
    }
    step.push("    /* Store xc[k+1] and u[k]. */", `    for (i = 0; i < ${nc}; ++i) state->xc[i] = next[i];`);
  } else {
    step.push("    /* Store u[k] (no controller states). */");
  }
  step.push(
    `    for (i = 0; i < ${m}; ++i) state->u_prev[i] = u[i];`,
    "    return limited;",
    "}",
    "",
  );
  lines.push(...step);
  return { text: lines.join("\n"), prefix, constants };
}
