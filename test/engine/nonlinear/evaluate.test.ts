import fc from "fast-check";
import { describe, expect, it } from "vitest";
import { EngineError } from "../../../shared-engine/errors";
import { compileExpression } from "../../../shared-engine/nonlinear";
import { expectAtMost } from "../../helpers/assertions";

function errorOf(fn: () => unknown): EngineError {
  try { fn(); } catch (error) { if (error instanceof EngineError) return error; throw error; }
  throw new Error("expected an EngineError");
}

/** Central difference with step h·max(1, |v|); error O(h²·f'''). */
function centralDifference(f: (env: Float64Array) => number, env: Float64Array, slot: number, h = 1e-5): number {
  const step = h * Math.max(1, Math.abs(env[slot]!));
  const plus = Float64Array.from(env); plus[slot] += step;
  const minus = Float64Array.from(env); minus[slot] -= step;
  return (f(plus) - f(minus)) / (2 * step);
}

const VARS = ["x", "y", "z"];
// Smooth expressions over the whole generated domain (x, y in [0.5, 2.5], z in [-2, 2]).
const SMOOTH = [
  "x^2 * sin(y) - exp(-z) / x",
  "log(x) + sqrt(y) * tanh(z)",
  "atan2(y, x) + atan(z) * cos(x * y)",
  "x ^ y + y ^ 2.5 - z ^ 3",
  "pos(z, 0.3) * x / (1 + y^2)",
  "tan(z / 3) + 1.5e-3 * x * y * z",
  "-(x - y)^2 / (z^2 + 1)",
];

describe("compileExpression", () => {
  it("evaluates on slot-indexed environments", () => {
    const f = compileExpression("a * b + c", ["c", "b", "a"]);
    expect(f.evaluate(Float64Array.of(1, 2, 3))).toBe(7);
    expect(f.usedSlots).toEqual([0, 1, 2]);
    expect(compileExpression("a", ["a", "b"]).usedSlots).toEqual([0]);
  });

  it("forward-mode derivatives equal central differences (fast-check, seed 777)", () => {
    const compiled = SMOOTH.map((t) => compileExpression(t, VARS));
    const point = fc.tuple(fc.integer({ min: 4, max: 20 }), fc.integer({ min: 4, max: 20 }), fc.integer({ min: -16, max: 16 }))
      .map(([a, b, c]) => Float64Array.of(a / 8, b / 8, c / 8));
    fc.assert(fc.property(point, fc.integer({ min: 0, max: SMOOTH.length - 1 }), (env, k) => {
      const f = compiled[k]!;
      const g = new Float64Array(3);
      f.gradient(env, g);
      for (let slot = 0; slot < 3; slot++) {
        const fd = centralDifference((e) => f.evaluate(e), env, slot);
        // Central difference error ≈ h²|f'''|/6 + ε|f|/h; 1e-6 relative covers both here.
        expectAtMost(Math.abs(g[slot]! - fd), 1e-6 * Math.max(1, Math.abs(fd)), `∂(${SMOOTH[k]})/∂${VARS[slot]}`);
      }
      return true;
    }), { seed: 777, numRuns: 200 });
  });

  it("derivatives of closed forms are exact to rounding", () => {
    // Hand-derived: d/dx x^3 = 3x²; d/dx sin(x) = cos x; d/dx log(x) = 1/x at x = 2.
    const g = new Float64Array(1);
    compileExpression("x^3", ["x"]).gradient(Float64Array.of(2), g);
    expect(g[0]).toBe(12);
    compileExpression("sin(x) + log(x)", ["x"]).gradient(Float64Array.of(2), g);
    expect(Math.abs(g[0]! - (Math.cos(2) + 0.5))).toBeLessThanOrEqual(2 * Number.EPSILON);
  });

  it("uses one-sided derivatives for abs, min, max, clamp and pos at their kinks", () => {
    const g = new Float64Array(2);
    compileExpression("abs(x)", ["x"]).gradient(Float64Array.of(0), g);
    expect(g[0]).toBe(0);
    compileExpression("max(x, y)", ["x", "y"]).gradient(Float64Array.of(1, 3), g);
    expect([...g]).toEqual([0, 1]);
    compileExpression("min(x, y)", ["x", "y"]).gradient(Float64Array.of(1, 3), g);
    expect([...g]).toEqual([1, 0]);
    compileExpression("clamp(x, 0, y)", ["x", "y"]).gradient(Float64Array.of(5, 3), g);
    expect([...g]).toEqual([0, 1]);
    compileExpression("clamp(x, 0, y)", ["x", "y"]).gradient(Float64Array.of(1, 3), g);
    expect([...g]).toEqual([1, 0]);
    compileExpression("pos(x, y)", ["x", "y"]).gradient(Float64Array.of(0, 0), g);
    expect(g[0]).toBe(0.5);
  });

  it("throws a typed error naming the sub-expression for division by zero, log and sqrt domain errors", () => {
    const div = errorOf(() => compileExpression("1 + a / (b - 1)", ["a", "b"]).evaluate(Float64Array.of(2, 1)));
    expect(div.kind).toBe("non-finite");
    expect(div.message).toContain("division by zero in 'a / (b - 1)'");
    expect(div.message).toContain("b - 1 = 0");
    expect(div.details.subexpression).toBe("a / (b - 1)");
    const log = errorOf(() => compileExpression("log(h)", ["h"], "the equation of state 'h'").evaluate(Float64Array.of(-1)));
    expect(log.message).toBe("in the equation of state 'h': logarithm of a non-positive number in 'log(h)' (h = -1)");
    const sq = errorOf(() => compileExpression("sqrt(h - 2)", ["h"]).evaluate(Float64Array.of(1)));
    expect(sq.message).toContain("square root of a negative number in 'sqrt(h - 2)' (h - 2 = -1)");
    expect(errorOf(() => compileExpression("x ^ 0.5", ["x"]).evaluate(Float64Array.of(-4))).message).toContain("negative base");
    expect(errorOf(() => compileExpression("exp(x)", ["x"]).evaluate(Float64Array.of(1000))).message).toContain("overflow");
    expect(errorOf(() => compileExpression("clamp(x, 1, 0)", ["x"]).evaluate(Float64Array.of(0))).message).toContain("lower bound above");
    expect(errorOf(() => compileExpression("x + 1", ["x"]).evaluate(Float64Array.of(NaN))).message).toContain("variable 'x' is NaN");
  });

  it("reports an infinite derivative (sqrt at 0) instead of returning Infinity", () => {
    const f = compileExpression("sqrt(h)", ["h"]);
    expect(f.evaluate(Float64Array.of(0))).toBe(0);
    const e = errorOf(() => f.gradient(Float64Array.of(0), new Float64Array(1)));
    expect(e.kind).toBe("non-finite");
    expect(e.message).toContain("infinite derivative (square root at 0) in 'sqrt(h)'");
  });
});
