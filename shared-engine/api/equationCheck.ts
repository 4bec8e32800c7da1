/**
 * The live check behind "nonlinear.check": every equation of a (possibly unfinished) plant is
 * parsed on its own, so the editor can mark each one with its column and message. A user's
 * syntax error is data here, never a thrown error.
 */
import { EngineError } from "../errors";
import { compileNonlinearPlant, namesUsed, parseExpression, type ExpressionNode, type NonlinearPlantSpec } from "../nonlinear";
import type { EquationProblem, EquationToCheck, NonlinearCheckResult } from "./nonlinearContractTypes";

/** Most equations one check accepts (each is also limited in length by the parser). */
export const MAX_CHECKED_EQUATIONS = 1000;

type CheckOutcome = Pick<NonlinearCheckResult, "problems" | "equations">;

/** Column of the first occurrence of a variable name in a parsed tree (iterative walk). */
function columnOfName(root: ExpressionNode, name: string): number | null {
  let best: number | null = null;
  const stack: ExpressionNode[] = [root];
  while (stack.length > 0) {
    const node = stack.pop()!;
    if (node.type === "name" && node.name === name) best = best === null ? node.column : Math.min(best, node.column);
    else if (node.type === "unary") stack.push(node.operand);
    else if (node.type === "binary") stack.push(node.left, node.right);
    else if (node.type === "call") stack.push(...node.args);
  }
  return best;
}

/**
 * Computes: for each equation, whether it parses (else a problem at the parser's column), the
 *   variable names it uses and, when `declared` is given, the names not declared (a problem at
 *   the first use of each).
 * Requires: nothing of the texts (a non-string is reported as a problem).
 * Method: `parseExpression` (recursive descent with length/depth/node limits) per equation.
 * Cost: O(total text length). Accuracy: exact. Errors: none for user text (rethrows only
 *   non-parse engine failures, which would be bugs).
 * Example: checkEquations([{ field: "x", text: "a + * b" }], ["a", "b"]).problems[0].column === 5
 */
export function checkEquations(equations: readonly EquationToCheck[], declared: readonly string[] | null): CheckOutcome {
  const problems: EquationProblem[] = [];
  const report: CheckOutcome["equations"] = [];
  const known = declared === null ? null : new Set(declared);
  for (const { field, text } of equations) {
    if (typeof text !== "string") {
      problems.push({ field, column: null, message: `${field} must be the text of an equation (it is ${text === null ? "null" : typeof text})` });
      report.push({ field, parsed: false, namesUsed: [], unknownNames: [] });
      continue;
    }
    let tree: ExpressionNode;
    try {
      tree = parseExpression(text);
    } catch (error) {
      if (!(error instanceof EngineError) || error.kind !== "parse-error") throw error;
      const column = typeof error.details.column === "number" ? error.details.column : null;
      problems.push({ field, column, message: error.message });
      report.push({ field, parsed: false, namesUsed: [], unknownNames: [] });
      continue;
    }
    const used = namesUsed(tree);
    const unknown = known === null ? [] : used.filter((name) => !known.has(name));
    for (const name of unknown) {
      const column = columnOfName(tree, name);
      const list = declared!.length > 0 ? declared!.join(", ") : "none";
      problems.push({ field, column, message: `at column ${column}: unknown name '${name}' (declared: ${list})` });
    }
    report.push({ field, parsed: true, namesUsed: used, unknownNames: unknown });
  }
  return { problems, equations: report };
}

const namesOf = (list: unknown): string[] =>
  Array.isArray(list) ? list.map((item: unknown) => (item !== null && typeof item === "object" ? (item as { name?: unknown }).name : undefined)).filter((n): n is string => typeof n === "string") : [];

/**
 * Computes: the equation problems of a plant spec (each state equation and output equation,
 *   checked against the declared states, inputs, disturbances and parameters), then, when no
 *   equation has a problem, the first structural problem the plant compiler finds (duplicate or
 *   malformed names, a missing equation, bounds), with its spec path as the field.
 * Requires: `spec` an object (the caller checks). Method: `checkEquations`, then
 *   `compileNonlinearPlant` inside a catch. Cost: O(spec size). Errors: none for user content.
 * Example: checkPlantSpec({ states: [{ name: "h" }], stateEquations: { h: "-k*h" } }).problems
 *   names field "stateEquations.h" and column 2 (k is not declared)
 */
export function checkPlantSpec(spec: Record<string, unknown>): CheckOutcome {
  const declared = [...namesOf(spec.states), ...namesOf(spec.inputs), ...namesOf(spec.disturbances), ...namesOf(spec.parameters)];
  const equations: EquationToCheck[] = [];
  const stateEquations = spec.stateEquations;
  if (stateEquations !== null && typeof stateEquations === "object" && !Array.isArray(stateEquations)) {
    for (const [name, text] of Object.entries(stateEquations as Record<string, unknown>)) equations.push({ field: `stateEquations.${name}`, text: text as string });
  }
  if (Array.isArray(spec.outputs)) {
    spec.outputs.forEach((y: unknown, i: number) => {
      const text = y !== null && typeof y === "object" ? (y as { equation?: unknown }).equation : undefined;
      equations.push({ field: `outputs[${i}].equation`, text: text as string });
    });
  }
  if (equations.length > MAX_CHECKED_EQUATIONS) {
    throw new EngineError("invalid-argument", `plant has ${equations.length} equations; at most ${MAX_CHECKED_EQUATIONS} are checked`, { field: "plant" });
  }
  const outcome = checkEquations(equations, declared);
  if (outcome.problems.length === 0) {
    try {
      compileNonlinearPlant(spec as unknown as NonlinearPlantSpec);
    } catch (error) {
      if (!(error instanceof EngineError)) throw error;
      const field = typeof error.details.path === "string" ? error.details.path : "plant";
      const column = typeof error.details.column === "number" ? error.details.column : null;
      outcome.problems.push({ field, column, message: error.message });
    }
  }
  return outcome;
}
