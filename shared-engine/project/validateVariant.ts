/**
 * Validation of a project file's variants against their plants: the design (state feedback,
 * integral action, observer), the analyses asked for (discretization, Bode, margins, step,
 * disturbance step) and, through validateNonlinear.ts, the nonlinear keys; every size checked
 * against the plant's dimensions.
 */
import { shape, type Checker, type Path } from "./checker";
import { checkNonlinearVariantKeys, type PlantDims } from "./validateNonlinear";
import { checkComplexList, checkId } from "./validationParts";

function checkSquareSymmetric(c: Checker, value: unknown, path: Path, size: number, what: string, optional = false): void {
  const M = c.matrix(value, path, { optional });
  if (!M) return;
  if (size >= 0 && (M.length !== size || M[0]!.length !== size)) {
    c.problem(path, `must be ${size}×${size} (${what}), is ${shape(M)}`);
    return;
  }
  for (let i = 0; i < M.length; i++) {
    for (let j = 0; j < i; j++) {
      const a = M[i]![j]!;
      const b = M[j]![i]!;
      if (Math.abs(a - b) > 1e-12 * Math.max(1, Math.abs(a), Math.abs(b))) {
        c.problem([...path, i, j], `must equal entry [${j}][${i}] (the matrix must be symmetric): ${a} vs ${b}`);
        return;
      }
    }
  }
}

/** One variant; `plants` maps plant ids to their dimensions (an id with n = −1 when its model is unknown). */
export function checkVariant(
  c: Checker,
  value: unknown,
  path: Path,
  plants: Map<string, PlantDims>,
): void {
  const v = c.object(value, path, [
    "id", "name", "description", "plant", "parent", "baseline", "discretize", "stateFeedback", "integralAction",
    "referenceFeedforward", "observer", "bode", "margins", "step", "disturbanceStep", "nonlinearCheck", "robustness", "notes",
  ]);
  if (!v) return;
  checkId(c, v.id, [...path, "id"]);
  c.string(v.name, [...path, "name"], { optional: true, maxLength: 200 });
  c.string(v.description, [...path, "description"], { optional: true });
  c.string(v.notes, [...path, "notes"], { optional: true });
  c.string(v.parent, [...path, "parent"], { optional: true });
  if (v.baseline !== undefined && typeof v.baseline !== "boolean") c.problem([...path, "baseline"], "must be true or false");
  if (v.referenceFeedforward !== undefined && typeof v.referenceFeedforward !== "boolean") c.problem([...path, "referenceFeedforward"], "must be true or false");
  const plantId = c.string(v.plant, [...path, "plant"], { nonEmpty: true });
  const dims = plantId !== undefined ? plants.get(plantId) : undefined;
  if (plantId !== undefined && !dims) c.problem([...path, "plant"], `names no plant ("${plantId}"); plants are: ${[...plants.keys()].join(", ") || "none"}`);
  const n = dims?.n ?? -1;
  const mIn = dims?.m ?? -1;
  const p = dims?.p ?? -1;

  if (v.discretize !== undefined) {
    const d = c.object(v.discretize, [...path, "discretize"], ["sampleTime", "method", "prewarpRadPerSec"]);
    if (d) {
      c.number(d.sampleTime, [...path, "discretize", "sampleTime"], { positive: true });
      c.oneOf(d.method, [...path, "discretize", "method"], ["zoh", "tustin", "bilinear"] as const);
      c.number(d.prewarpRadPerSec, [...path, "discretize", "prewarpRadPerSec"], { optional: true, positive: true });
      if (d.prewarpRadPerSec !== undefined && d.method === "zoh") c.problem([...path, "discretize", "prewarpRadPerSec"], "applies only to the tustin method");
      if (dims?.discrete) c.problem([...path, "discretize"], "the plant is already sampled (it has a sampleTime); remove discretize");
    }
  }

  const integratorCount = Array.isArray((v.integralAction as { outputs?: unknown } | undefined)?.outputs)
    ? ((v.integralAction as { outputs: unknown[] }).outputs.length)
    : 0;

  if (v.stateFeedback !== undefined) {
    const sf = c.object(v.stateFeedback, [...path, "stateFeedback"], ["method", "Q", "R", "N", "poles"]);
    if (sf) {
      const method = c.oneOf(sf.method, [...path, "stateFeedback", "method"], ["lqr", "poles"] as const);
      const nAug = n >= 0 ? n + integratorCount : -1;
      if (method === "lqr") {
        checkSquareSymmetric(c, sf.Q, [...path, "stateFeedback", "Q"], n, `states × states${integratorCount ? "; integrator weights go in integralAction.weights" : ""}`);
        checkSquareSymmetric(c, sf.R, [...path, "stateFeedback", "R"], mIn, "inputs × inputs");
        const N = c.matrix(sf.N, [...path, "stateFeedback", "N"], { optional: true });
        if (N && n >= 0 && (N.length !== n || N[0]!.length !== mIn)) c.problem([...path, "stateFeedback", "N"], `must be ${n}×${mIn} (states × inputs), is ${shape(N)}`);
        if (sf.poles !== undefined) c.problem([...path, "stateFeedback", "poles"], 'belongs to method "poles", not "lqr"');
      } else if (method === "poles") {
        const poles = checkComplexList(c, sf.poles, [...path, "stateFeedback", "poles"], { nonEmpty: true });
        if (poles && n >= 0 && poles.length !== n) {
          c.problem([...path, "stateFeedback", "poles"], `needs ${n} poles (one per state${integratorCount ? "; integrator poles go in integralAction.poles" : ""}), has ${poles.length}`);
        }
        for (const key of ["Q", "R", "N"]) if (sf[key] !== undefined) c.problem([...path, "stateFeedback", key], 'belongs to method "lqr", not "poles"');
        void nAug;
      }
    }
  }

  if (v.integralAction !== undefined) {
    const ia = c.object(v.integralAction, [...path, "integralAction"], ["outputs", "weights", "poles", "antiWindup"]);
    if (ia) {
      const outs = c.array(ia.outputs, [...path, "integralAction", "outputs"], { nonEmpty: true }) ?? [];
      outs.forEach((o, i) => {
        const opath = [...path, "integralAction", "outputs", i];
        if (typeof o === "number") {
          if (!Number.isInteger(o) || o < 0 || (p >= 0 && o >= p)) c.problem(opath, `output index ${o} is out of range (the plant has ${p} outputs, numbered from 0)`);
        } else if (typeof o === "string") {
          if (dims && !dims.outputs.includes(o)) c.problem(opath, `names no output ("${o}"); outputs are: ${dims.outputs.join(", ")}`);
        } else c.problem(opath, "must be an output name or a 0-based index");
      });
      const w = c.numberList(ia.weights, [...path, "integralAction", "weights"], { optional: true, positive: true });
      if (w && w.length !== outs.length) c.problem([...path, "integralAction", "weights"], `needs one weight per integrated output (${outs.length}), has ${w.length}`);
      const ip = ia.poles === undefined ? undefined : checkComplexList(c, ia.poles, [...path, "integralAction", "poles"]);
      if (ip && ip.length !== outs.length) c.problem([...path, "integralAction", "poles"], `needs one pole per integrated output (${outs.length}), has ${ip.length}`);
      c.oneOf(ia.antiWindup, [...path, "integralAction", "antiWindup"], ["back-calculation", "conditional", "none"] as const, { optional: true });
      if (outs.length > 0 && mIn >= 0 && outs.length > mIn) {
        c.problem([...path, "integralAction", "outputs"], `integrates ${outs.length} outputs but the plant has only ${mIn} inputs: at most one integrated output per input can be held at zero error`);
      }
      const sfMethod = (v.stateFeedback as { method?: unknown } | undefined)?.method;
      if (sfMethod === "poles" && ia.poles === undefined) c.problem([...path, "integralAction", "poles"], "is required when the state feedback is placed by poles");
      if (sfMethod === "lqr" && ia.poles !== undefined) c.problem([...path, "integralAction", "poles"], "applies to pole placement; with LQR give integralAction.weights");
      if (v.stateFeedback === undefined) c.problem([...path, "integralAction"], "needs a stateFeedback design to act through");
    }
  }

  if (v.observer !== undefined) {
    const o = c.object(v.observer, [...path, "observer"], ["method", "poles", "processNoise", "measurementNoise", "form"]);
    if (o) {
      const method = c.oneOf(o.method, [...path, "observer", "method"], ["poles", "kalman"] as const);
      if (method === "poles") {
        const poles = checkComplexList(c, o.poles, [...path, "observer", "poles"], { nonEmpty: true });
        if (poles && n >= 0 && poles.length !== n) c.problem([...path, "observer", "poles"], `needs ${n} poles (one per state), has ${poles.length}`);
      } else if (method === "kalman") {
        const q = dims ? (dims.q > 0 ? dims.q : dims.m) : -1;
        checkSquareSymmetric(c, o.processNoise, [...path, "observer", "processNoise"], q, dims && dims.q > 0 ? "disturbances × disturbances: noise enters through F" : "inputs × inputs: noise enters through B (the plant has no F)");
        checkSquareSymmetric(c, o.measurementNoise, [...path, "observer", "measurementNoise"], p, "outputs × outputs");
        c.oneOf(o.form, [...path, "observer", "form"], ["predictor", "current"] as const, { optional: true });
      }
    }
  }

  if (v.bode !== undefined) {
    const b = c.object(v.bode, [...path, "bode"], ["frequencies"]);
    if (b) c.numberList(b.frequencies, [...path, "bode", "frequencies"], { nonEmpty: true, positive: true });
  }
  if (v.margins !== undefined) {
    const mg = c.object(v.margins, [...path, "margins"], ["feedback", "at"]);
    if (mg) {
      if (mg.feedback !== undefined) c.oneOf(mg.feedback, [...path, "margins", "feedback"], ["unity-negative"] as const);
      if (mg.at !== undefined) c.oneOf(mg.at, [...path, "margins", "at"], ["plant-input"] as const);
      if ((mg.feedback === undefined) === (mg.at === undefined)) c.problem([...path, "margins"], 'needs exactly one of "feedback": "unity-negative" or "at": "plant-input"');
      if (mg.at !== undefined && v.stateFeedback === undefined) c.problem([...path, "margins", "at"], "needs a stateFeedback design (the loop is broken at the plant input)");
      if (mg.feedback !== undefined && dims && (dims.m !== 1 || dims.p !== 1)) c.problem([...path, "margins", "feedback"], `needs a single-input single-output plant (this one has ${dims.m} inputs and ${dims.p} outputs)`);
    }
  }
  checkNonlinearVariantKeys(c, v, path, dims);
  if (v.step !== undefined) {
    const s = c.object(v.step, [...path, "step"], ["times"]);
    if (s) checkTimes(c, s.times, [...path, "step", "times"]);
  }
  if (v.disturbanceStep !== undefined) {
    const dpath = [...path, "disturbanceStep"];
    const d = c.object(v.disturbanceStep, dpath, ["times", "disturbance", "size"]);
    if (d) {
      checkTimes(c, d.times, [...dpath, "times"]);
      c.number(d.size, [...dpath, "size"], { optional: true });
      if (d.size === 0) c.problem([...dpath, "size"], "must not be zero");
      if (dims && dims.q === 0) c.problem(dpath, "the plant has no disturbance inputs (give F and name its columns)");
      if (d.disturbance !== undefined) {
        if (typeof d.disturbance === "number") {
          if (!Number.isInteger(d.disturbance) || d.disturbance < 0 || (dims && dims.q >= 0 && d.disturbance >= dims.q)) {
            c.problem([...dpath, "disturbance"], `disturbance index ${d.disturbance} is out of range (the plant has ${dims?.q ?? "?"} disturbances, numbered from 0)`);
          }
        } else if (typeof d.disturbance !== "string") {
          c.problem([...dpath, "disturbance"], "must be a disturbance name or a 0-based index");
        }
      }
    }
  }
}

function checkTimes(c: Checker, value: unknown, path: Path): void {
  const times = c.numberList(value, path, { nonEmpty: true });
  if (!times) return;
  if (times.some((t) => t < 0)) c.problem(path, "must not be negative");
  for (let i = 1; i < times.length; i++) {
    if (!(times[i]! > times[i - 1]!)) {
      c.problem([...path, i], "times must increase strictly");
      break;
    }
  }
}
