/**
 * Interconnection of models: series, parallel, feedback, append (block diagonal) and
 * augmentation of the outputs with the states. Every result is a new validated model; names
 * and units are carried along and made unique with a suffix where two parts share a name.
 */
import { Matrix, inverse } from "ml-matrix";
import { EngineError } from "../errors";
import { describeSampleTime, dimensions, stateSpaceFromMatrices, type SignalNames, type StateSpace } from "./stateSpace";

/**
 * Makes names unique: the first occurrence keeps its name, later ones get "_2", "_3", ...
 * (skipping suffixes already taken). Order is preserved.
 */
export function uniqueNames(names: readonly string[]): string[] {
  const taken = new Set<string>();
  const all = new Set(names);
  return names.map((name) => {
    if (!taken.has(name)) {
      taken.add(name);
      return name;
    }
    let k = 2;
    while (taken.has(`${name}_${k}`) || all.has(`${name}_${k}`)) k++;
    const renamed = `${name}_${k}`;
    taken.add(renamed);
    return renamed;
  });
}

function requireSameSampleTime(first: StateSpace, second: StateSpace, operation: string): number | null {
  const a = first.sampleTime;
  const b = second.sampleTime;
  // Equal periods typed or computed differently may differ in the last bits.
  const same = a === null || b === null ? a === b : Math.abs(a - b) <= 1e-12 * Math.max(a, b);
  if (!same) {
    throw new EngineError("invalid-argument", `${operation} needs equal sample times (first model is ${describeSampleTime(a)}, second is ${describeSampleTime(b)})`, {
      first: a,
      second: b,
    });
  }
  return a;
}

function blockDiagonal(a: Matrix, b: Matrix): Matrix {
  const out = Matrix.zeros(a.rows + b.rows, a.columns + b.columns);
  if (a.rows > 0 && a.columns > 0) out.setSubMatrix(a, 0, 0);
  if (b.rows > 0 && b.columns > 0) out.setSubMatrix(b, a.rows, a.columns);
  return out;
}

function stackRows(a: Matrix, b: Matrix): Matrix {
  const out = Matrix.zeros(a.rows + b.rows, a.columns);
  if (a.rows > 0 && a.columns > 0) out.setSubMatrix(a, 0, 0);
  if (b.rows > 0 && b.columns > 0) out.setSubMatrix(b, a.rows, 0);
  return out;
}

function stackColumns(a: Matrix, b: Matrix): Matrix {
  const out = Matrix.zeros(a.rows, a.columns + b.columns);
  if (a.rows > 0 && a.columns > 0) out.setSubMatrix(a, 0, 0);
  if (b.rows > 0 && b.columns > 0) out.setSubMatrix(b, 0, a.columns);
  return out;
}

function join(first: StateSpace, second: StateSpace, kind: keyof SignalNames): { names: string[]; units: string[] } {
  return { names: uniqueNames([...first.names[kind], ...second.names[kind]]), units: [...first.units[kind], ...second.units[kind]] };
}

function mul(a: Matrix, b: Matrix): Matrix {
  return a.rows === 0 || b.columns === 0 || a.columns === 0 ? Matrix.zeros(a.rows, b.columns) : a.mmul(b);
}

/**
 * Computes: the series connection u → first → second → y (u₂ = y₁), state x = [x₁; x₂]:
 *   A = [A₁ 0; B₂C₁ A₂], B = [B₁; B₂D₁], C = [D₂C₁ C₂], D = D₂D₁,
 *   F = [F₁ 0; B₂E₁ F₂], E = [D₂E₁ E₂] (disturbances w = [w₁; w₂]).
 * Requires: outputs of `first` = inputs of `second`; equal sample times.
 * Method: substitution (block formulas above). Cost: O((n₁+n₂)² + products). Accuracy: one
 *   product per block, backward stable.
 * Errors: "shape-mismatch" (signal counts), "invalid-argument" (sample times differ).
 * Example: series(1/(s+1), 2/(s+3)) has G(0) = 2/3; check against C(−A)⁻¹B + D.
 */
export function series(first: StateSpace, second: StateSpace): StateSpace {
  const sampleTime = requireSameSampleTime(first, second, "series connection");
  const d1 = dimensions(first);
  const d2 = dimensions(second);
  if (d1.p !== d2.m) {
    throw new EngineError("shape-mismatch", `series connection needs as many outputs of the first model as inputs of the second (first has ${d1.p} outputs, second has ${d2.m} inputs)`, {});
  }
  const A = blockDiagonal(first.A, second.A);
  const B2C1 = mul(second.B, first.C);
  if (B2C1.rows > 0 && B2C1.columns > 0) A.setSubMatrix(B2C1, d1.n, 0);
  const F = blockDiagonal(first.F, second.F);
  const B2E1 = mul(second.B, first.E);
  if (B2E1.rows > 0 && B2E1.columns > 0) F.setSubMatrix(B2E1, d1.n, 0);
  const states = join(first, second, "states");
  const disturbances = join(first, second, "disturbances");
  return stateSpaceFromMatrices({
    A,
    B: stackRows(first.B, mul(second.B, first.D)),
    C: stackColumns(mul(second.D, first.C), second.C),
    D: mul(second.D, first.D),
    F,
    E: stackColumns(mul(second.D, first.E), second.E),
    sampleTime,
    names: { states: states.names, inputs: [...first.names.inputs], outputs: [...second.names.outputs], disturbances: disturbances.names },
    units: { states: states.units, inputs: [...first.units.inputs], outputs: [...second.units.outputs], disturbances: disturbances.units },
  });
}

/**
 * Computes: the parallel connection y = y₁ + y₂ with a common input u:
 *   A = diag(A₁, A₂), B = [B₁; B₂], C = [C₁ C₂], D = D₁ + D₂, F = diag(F₁, F₂), E = [E₁ E₂].
 * Requires: equal input counts and equal output counts; equal sample times. Input and output
 *   names are taken from `first`.
 * Method: block formulas. Cost: O((n₁+n₂)²). Accuracy: exact except the sum D₁ + D₂.
 * Errors: "shape-mismatch", "invalid-argument" (sample times).
 * Example: parallel(1/(s+1), 1/(s+2)) has G(0) = 1.5.
 */
export function parallel(first: StateSpace, second: StateSpace): StateSpace {
  const sampleTime = requireSameSampleTime(first, second, "parallel connection");
  const d1 = dimensions(first);
  const d2 = dimensions(second);
  if (d1.m !== d2.m || d1.p !== d2.p) {
    throw new EngineError("shape-mismatch", `parallel connection needs equal input and output counts (first has ${d1.m} inputs and ${d1.p} outputs, second has ${d2.m} and ${d2.p})`, {});
  }
  const states = join(first, second, "states");
  const disturbances = join(first, second, "disturbances");
  return stateSpaceFromMatrices({
    A: blockDiagonal(first.A, second.A),
    B: stackRows(first.B, second.B),
    C: stackColumns(first.C, second.C),
    D: Matrix.add(first.D, second.D),
    F: blockDiagonal(first.F, second.F),
    E: stackColumns(first.E, second.E),
    sampleTime,
    names: { states: states.names, inputs: [...first.names.inputs], outputs: [...first.names.outputs], disturbances: disturbances.names },
    units: { states: states.units, inputs: [...first.units.inputs], outputs: [...first.units.outputs], disturbances: disturbances.units },
  });
}

/**
 * Computes: the closed loop of `forward` (u₁ → y₁) with `feedbackPath` (u₂ = y₁ → y₂) and
 *   u₁ = r + sign·y₂ (sign = −1: negative feedback). With M = I − sign·D₂D₁ (m₁×m₁):
 *   u₁ = M⁻¹(r + sign·(C₂x₂ + D₂C₁x₁ + D₂E₁w₁ + E₂w₂)), then x₁' = A₁x₁ + B₁u₁ + F₁w₁,
 *   x₂' = A₂x₂ + B₂y₁ + F₂w₂, y₁ = C₁x₁ + D₁u₁ + E₁w₁. Inputs r (names of the forward
 *   inputs), outputs y₁, states [x₁; x₂], disturbances [w₁; w₂].
 * Requires: forward outputs = feedbackPath inputs, feedbackPath outputs = forward inputs;
 *   equal sample times; M well conditioned (no algebraic loop).
 * Method: elimination of u₁ by one solve with M. Cost: O(m₁³ + (n₁+n₂)²(m₁+…)).
 * Accuracy: the condition number κ₁(M) is checked: the loop is rejected when
 *   κ₁(M) > 1/(1000·ε) (≈ 4.5e12): below that, relative errors from the elimination stay under
 *   about 1e-3 in the worst case.
 * Errors: "shape-mismatch", "invalid-argument" (sign not ±1, sample times), "singular"
 *   (algebraic loop: M = I − sign·D₂D₁ singular or nearly so; details.condition).
 * Example: feedback(1/s, static gain 1) → 1/(s+1): A = [[−1]]; check eigenvalue −1.
 */
export function feedback(forward: StateSpace, feedbackPath: StateSpace, sign: 1 | -1 = -1): StateSpace {
  if (sign !== 1 && sign !== -1) {
    throw new EngineError("invalid-argument", `feedback sign must be +1 or −1 (it is ${String(sign)})`, { argument: "sign" });
  }
  const sampleTime = requireSameSampleTime(forward, feedbackPath, "feedback connection");
  const d1 = dimensions(forward);
  const d2 = dimensions(feedbackPath);
  if (d1.p !== d2.m || d2.p !== d1.m) {
    throw new EngineError(
      "shape-mismatch",
      `feedback needs the feedback path to map the ${d1.p} forward outputs to the ${d1.m} forward inputs (feedback path has ${d2.m} inputs and ${d2.p} outputs)`,
      {},
    );
  }
  const m1 = d1.m;
  const M = Matrix.eye(m1).sub(mul(feedbackPath.D, forward.D).mul(sign));
  let Minv = Matrix.zeros(0, 0);
  if (m1 > 0) {
    const inv = inverseOrNull(M);
    const condition = inv === null ? Infinity : oneNorm(M) * oneNorm(inv);
    if (inv !== null) Minv = inv;
    if (!(condition <= 1 / (1000 * Number.EPSILON))) {
      throw new EngineError("singular", `algebraic loop: I ${sign === -1 ? "+" : "−"} D₂·D₁ is singular (condition number ${condition.toExponential(2)}); the feedthrough matrices make the loop ill-posed`, {
        condition,
      });
    }
  }
  // u₁ = Ku·[x₁; x₂] + Kr·r + Kw·[w₁; w₂]
  const Ku = mul(Minv, stackColumns(mul(feedbackPath.D, forward.C), feedbackPath.C).mul(sign));
  const Kr = Minv;
  const Kw = mul(Minv, stackColumns(mul(feedbackPath.D, forward.E), feedbackPath.E).mul(sign));
  // y₁ = Cy·x + Dy·r + Ey·w
  const Cy = Matrix.add(stackColumns(forward.C, Matrix.zeros(d1.p, d2.n)), mul(forward.D, Ku));
  const Dy = mul(forward.D, Kr);
  const Ey = Matrix.add(stackColumns(forward.E, Matrix.zeros(d1.p, d2.q)), mul(forward.D, Kw));
  const A = Matrix.add(blockDiagonal(forward.A, feedbackPath.A), stackRows(mul(forward.B, Ku), mul(feedbackPath.B, Cy)));
  const B = stackRows(mul(forward.B, Kr), mul(feedbackPath.B, Dy));
  const F = Matrix.add(blockDiagonal(forward.F, feedbackPath.F), stackRows(mul(forward.B, Kw), mul(feedbackPath.B, Ey)));
  const states = join(forward, feedbackPath, "states");
  const disturbances = join(forward, feedbackPath, "disturbances");
  return stateSpaceFromMatrices({
    A,
    B,
    C: Cy,
    D: Dy,
    F,
    E: Ey,
    sampleTime,
    names: { states: states.names, inputs: [...forward.names.inputs], outputs: [...forward.names.outputs], disturbances: disturbances.names },
    units: { states: states.units, inputs: [...forward.units.inputs], outputs: [...forward.units.outputs], disturbances: disturbances.units },
  });
}

/**
 * Computes: the block-diagonal union of two independent models: inputs [u₁; u₂], outputs
 *   [y₁; y₂], states [x₁; x₂], disturbances [w₁; w₂]; names made unique.
 * Requires: equal sample times. Method: block placement. Cost: O((n₁+n₂)²). Accuracy: exact.
 * Errors: "invalid-argument" (sample times differ).
 * Example: append(1/(s+1), 1/(s+2)) has D = 0 (2×2) and A = diag(−1, −2).
 */
export function append(first: StateSpace, second: StateSpace): StateSpace {
  const sampleTime = requireSameSampleTime(first, second, "append");
  const parts = (["states", "inputs", "outputs", "disturbances"] as const).map((kind) => [kind, join(first, second, kind)] as const);
  const names = Object.fromEntries(parts.map(([kind, j]) => [kind, j.names])) as unknown as SignalNames;
  const units = Object.fromEntries(parts.map(([kind, j]) => [kind, j.units])) as unknown as SignalNames;
  return stateSpaceFromMatrices({
    A: blockDiagonal(first.A, second.A),
    B: blockDiagonal(first.B, second.B),
    C: blockDiagonal(first.C, second.C),
    D: blockDiagonal(first.D, second.D),
    F: blockDiagonal(first.F, second.F),
    E: blockDiagonal(first.E, second.E),
    sampleTime,
    names,
    units,
  });
}

/**
 * Computes: the model with the states appended to the outputs: y_aug = [y; x], i.e.
 *   C_aug = [C; I], D_aug = [D; 0], E_aug = [E; 0]. The new outputs carry the state names and
 *   units (made unique against existing output names).
 * Requires: a valid model. Method: block placement. Cost: O(n(n+p)). Accuracy: exact.
 * Errors: none beyond model validation.
 * Example: augmentStates(double integrator) has 3 outputs [y1, x1, x2].
 */
export function augmentStates(model: StateSpace): StateSpace {
  const { n, m, q } = dimensions(model);
  return stateSpaceFromMatrices({
    ...model,
    C: stackRows(model.C, Matrix.eye(n)),
    D: stackRows(model.D, Matrix.zeros(n, m)),
    E: stackRows(model.E, Matrix.zeros(n, q)),
    names: { ...model.names, outputs: uniqueNames([...model.names.outputs, ...model.names.states]) },
    units: { ...model.units, outputs: [...model.units.outputs, ...model.units.states] },
  });
}

function oneNorm(M: Matrix): number {
  let best = 0;
  for (let j = 0; j < M.columns; j++) {
    let s = 0;
    for (let i = 0; i < M.rows; i++) s += Math.abs(M.get(i, j));
    best = Math.max(best, s);
  }
  return best;
}

/** M⁻¹ via LU, or null when LU meets an exact zero pivot or the inverse is not finite. */
function inverseOrNull(M: Matrix): Matrix | null {
  try {
    const inv = inverse(M);
    return inv.to1DArray().every(Number.isFinite) ? inv : null;
  } catch {
    return null;
  }
}
