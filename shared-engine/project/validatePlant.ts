/**
 * Validation of a project file's plants: the model of each form (state space, transfer function;
 * zero-pole-gain in validateZeroPoleGain.ts, nonlinear in validateNonlinear.ts) with its shapes,
 * properness and signal names, reduced to the dimensions the variants are checked against.
 */
import { shape, type Checker, type Path } from "./checker";
import type { ModelSpec } from "./format";
import { checkNonlinearModel, type PlantDims } from "./validateNonlinear";
import { checkId, checkNames, checkSampleTime, defaultNames } from "./validationParts";
import { checkZeroPoleGain } from "./validateZeroPoleGain";

/**
 * One plant: id, name, description and model of any form. Returns the dimensions its variants are
 * checked against (n = −1 where the form leaves the state count to the realization), or null
 * when the model is too broken to tell.
 */
export function checkPlant(c: Checker, value: unknown, path: Path): PlantDims | null {
  const plant = c.object(value, path, ["id", "name", "description", "model"]);
  if (!plant) return null;
  checkId(c, plant.id, [...path, "id"]);
  c.string(plant.name, [...path, "name"], { optional: true, maxLength: 200 });
  c.string(plant.description, [...path, "description"], { optional: true });
  const mpath = [...path, "model"];
  const type = (plant.model as ModelSpec | undefined)?.type;
  if (type === "state-space") return checkStateSpace(c, plant.model, mpath);
  if (type === "transfer-function") return checkTransferFunction(c, plant.model, mpath);
  if (type === "zero-pole-gain") return checkZeroPoleGain(c, plant.model, mpath);
  if (type === "nonlinear") return checkNonlinearModel(c, plant.model, mpath);
  if (plant.model === undefined || plant.model === null || typeof plant.model !== "object") c.problem(mpath, "is required: an object with a \"type\"");
  else c.problem([...mpath, "type"], `must be "state-space", "transfer-function", "zero-pole-gain" or "nonlinear", is ${JSON.stringify(type)}`);
  return null;
}

function checkStateSpace(c: Checker, value: unknown, path: Path) {
  const m = c.object(value, path, ["type", "A", "B", "C", "D", "F", "E", "sampleTime", "names", "units"]);
  if (!m) return null;
  const discrete = checkSampleTime(c, m.sampleTime, [...path, "sampleTime"]);
  const A = c.matrix(m.A, [...path, "A"]);
  const B = c.matrix(m.B, [...path, "B"]);
  const C = c.matrix(m.C, [...path, "C"]);
  const D = c.matrix(m.D, [...path, "D"], { optional: true });
  const F = c.matrix(m.F, [...path, "F"], { optional: true });
  const E = c.matrix(m.E, [...path, "E"], { optional: true });
  if (!A || !B || !C) return null;
  const n = A.length;
  if (A[0]!.length !== n) c.problem([...path, "A"], `must be square, is ${shape(A)}`);
  const mIn = B[0]!.length;
  const p = C.length;
  if (B.length !== n) c.problem([...path, "B"], `must have ${n} rows like A, has ${B.length}`);
  if (C[0]!.length !== n) c.problem([...path, "C"], `must have ${n} columns like A has states, has ${C[0]!.length}`);
  if (D && (D.length !== p || D[0]!.length !== mIn)) c.problem([...path, "D"], `must be ${p}×${mIn} (outputs × inputs), is ${shape(D)}`);
  const q = F ? F[0]!.length : E ? E[0]!.length : 0;
  if (F && F.length !== n) c.problem([...path, "F"], `must have ${n} rows like A, has ${F.length}`);
  if (E && (E.length !== p || E[0]!.length !== q)) c.problem([...path, "E"], `must be ${p}×${q} (outputs × disturbances), is ${shape(E)}`);
  if (E && !F) c.problem([...path, "F"], "is required when E is given (the disturbances must enter the states or be omitted from E)");
  const counts = { states: n, inputs: mIn, outputs: p, disturbances: q };
  const outputs = checkNames(c, m, path, "names", counts);
  checkNames(c, m, path, "units", counts);
  return { n, m: mIn, p, q, outputs: outputs.length ? outputs : defaultNames("y", p), discrete: discrete === true };
}

function checkPolynomial(c: Checker, value: unknown, path: Path, denominator: boolean): number[] | undefined {
  const coeffs = c.numberList(value, path, { nonEmpty: true });
  if (coeffs && denominator && coeffs[0] === 0) {
    c.problem([...path, 0], "the leading denominator coefficient must not be zero (write coefficients highest power first, without leading zeros)");
  }
  if (coeffs && denominator && coeffs.every((v) => v === 0)) c.problem(path, "the denominator must not be zero");
  return coeffs;
}

function checkTransferFunction(c: Checker, value: unknown, path: Path) {
  const m = c.object(value, path, ["type", "numerator", "denominator", "sampleTime", "names", "units"]);
  if (!m) return null;
  const discrete = checkSampleTime(c, m.sampleTime, [...path, "sampleTime"]);
  const mimo = Array.isArray(m.numerator) && Array.isArray((m.numerator as unknown[])[0]);
  let p = 1;
  let inputs = 1;
  const pairs: [unknown, unknown, Path, Path][] = [];
  if (!mimo) {
    pairs.push([m.numerator, m.denominator, [...path, "numerator"], [...path, "denominator"]]);
  } else {
    const num = c.array(m.numerator, [...path, "numerator"], { nonEmpty: true }) ?? [];
    const den = c.array(m.denominator, [...path, "denominator"], { nonEmpty: true }) ?? [];
    p = num.length;
    inputs = Array.isArray(num[0]) ? (num[0] as unknown[]).length : 0;
    if (den.length !== p) c.problem([...path, "denominator"], `must have ${p} rows like numerator, has ${den.length}`);
    num.forEach((row, i) => {
      const r = c.array(row, [...path, "numerator", i]) ?? [];
      if (r.length !== inputs) c.problem([...path, "numerator", i], `has ${r.length} entries but row 0 has ${inputs}`);
      const drow = Array.isArray(den[i]) ? (den[i] as unknown[]) : [];
      r.forEach((entry, j) => pairs.push([entry, drow[j], [...path, "numerator", i, j], [...path, "denominator", i, j]]));
    });
  }
  for (const [num, den, npath, dpath] of pairs) {
    const n = checkPolynomial(c, num, npath, false);
    const d = checkPolynomial(c, den, dpath, true);
    if (n && d) {
      const degNum = n.length - 1 - leadingZeros(n);
      const degDen = d.length - 1;
      if (degNum > degDen) c.problem(npath, `improper transfer function: numerator degree ${degNum} is above denominator degree ${degDen}`);
    }
  }
  const counts = { states: -1, inputs, outputs: p, disturbances: 0 };
  const outputs = checkNames(c, m, path, "names", counts);
  checkNames(c, m, path, "units", counts);
  return { n: -1, m: inputs, p, q: 0, outputs: outputs.length ? outputs : defaultNames("y", p), discrete: discrete === true };
}

function leadingZeros(coeffs: number[]): number {
  let k = 0;
  while (k < coeffs.length - 1 && coeffs[k] === 0) k++;
  return k;
}
