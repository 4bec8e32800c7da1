/**
 * The abstract syntax tree of our small expression language (the equations a user types for a
 * nonlinear plant), the table of built-in functions, and the pretty-printer back to text.
 *
 * Grammar (precedence from loosest to tightest; `^` is right-associative and binds tighter than
 * unary minus, so `-x^2` is −(x²) and `2^-1` is 2^(−1)):
 *
 *   expression := term (("+" | "-") term)*
 *   term       := unary (("*" | "/") unary)*
 *   unary      := ("-" | "+") unary | power
 *   power      := primary ("^" unary)?
 *   primary    := number | name | name "(" expression ("," expression)* ")" | "(" expression ")"
 *   number     := digits ["." digits] [("e" | "E") ["+" | "-"] digits]  (or "." digits ...)
 *   name       := (letter | "_") (letter | digit | "_")*
 *
 * Nodes carry the 1-based column where they start, so later errors can point into the text.
 */

export type BinaryOperator = "+" | "-" | "*" | "/" | "^";
export type UnaryOperator = "-" | "+";

export type ExpressionNode =
  | { type: "number"; value: number; column: number }
  | { type: "name"; name: string; column: number }
  | { type: "unary"; operator: UnaryOperator; operand: ExpressionNode; column: number }
  | { type: "binary"; operator: BinaryOperator; left: ExpressionNode; right: ExpressionNode; column: number }
  | { type: "call"; name: FunctionName; args: ExpressionNode[]; column: number };

export type FunctionName =
  | "exp" | "log" | "sqrt" | "abs" | "sin" | "cos" | "tan" | "atan" | "atan2" | "tanh"
  | "min" | "max" | "clamp" | "pos";

/** Arity of each built-in: exact count, or `minimum` for the n-ary ones (min, max). */
export const FUNCTION_ARITY: Readonly<Record<FunctionName, { exact?: number; minimum?: number; signature: string }>> = Object.freeze({
  exp: { exact: 1, signature: "exp(x)" },
  log: { exact: 1, signature: "log(x) (natural logarithm, x > 0)" },
  sqrt: { exact: 1, signature: "sqrt(x) (x ≥ 0)" },
  abs: { exact: 1, signature: "abs(x)" },
  sin: { exact: 1, signature: "sin(x)" },
  cos: { exact: 1, signature: "cos(x)" },
  tan: { exact: 1, signature: "tan(x)" },
  atan: { exact: 1, signature: "atan(x)" },
  atan2: { exact: 2, signature: "atan2(y, x)" },
  tanh: { exact: 1, signature: "tanh(x)" },
  min: { minimum: 2, signature: "min(a, b, ...)" },
  max: { minimum: 2, signature: "max(a, b, ...)" },
  clamp: { exact: 3, signature: "clamp(x, lo, hi) (lo ≤ hi)" },
  pos: { exact: 2, signature: "pos(x, eps) = ½(x + √(x² + eps²)), a smooth positive part" },
});

export function isFunctionName(name: string): name is FunctionName {
  return Object.prototype.hasOwnProperty.call(FUNCTION_ARITY, name);
}

/** Limits that keep hostile input cheap to reject (checked by the parser). */
export const EXPRESSION_LIMITS = Object.freeze({ maxLength: 2000, maxDepth: 64, maxNodes: 5000 });

const PRECEDENCE: Record<BinaryOperator, number> = { "+": 1, "-": 1, "*": 2, "/": 2, "^": 4 };
const UNARY_PRECEDENCE = 3;

/**
 * Computes: text for an expression tree that parses back to the same tree shape (and so the
 * same value), with the fewest parentheses the grammar needs.
 * Requires: a tree built by `parseExpression` (or of the same shape).
 * Method: precedence climbing in reverse: a child is parenthesised when it binds looser than
 *   its parent, or equally loosely on the side where associativity would regroup it (the right
 *   of left-associative `-` and `/`, the left of right-associative `^`). Numbers print with
 *   `String(value)`, which round-trips every double exactly (ECMAScript Number::toString).
 * Cost: O(nodes); recursion depth equals tree depth (≤ 64 for parsed trees).
 * Accuracy: exact (round-trip of doubles is exact).
 * Errors: none.
 * Example: printExpression(parseExpression("-(x^2)*(a+b)")) === "-x ^ 2 * (a + b)"
 */
export function printExpression(node: ExpressionNode): string {
  switch (node.type) {
    case "number":
      return formatNumber(node.value);
    case "name":
      return node.name;
    case "call":
      return `${node.name}(${node.args.map(printExpression).join(", ")})`;
    case "unary": {
      const inner = printExpression(node.operand);
      // A unary operand binds at UNARY_PRECEDENCE; + and - and nested unary need parentheses
      // only when the operand is a looser binary (a + b) — nested unary "- -x" is legal.
      const needs = node.operand.type === "binary" && PRECEDENCE[node.operand.operator] < UNARY_PRECEDENCE;
      return `${node.operator}${needs ? `(${inner})` : inner}`;
    }
    case "binary": {
      const p = PRECEDENCE[node.operator];
      const rightAssociative = node.operator === "^";
      const left = printExpression(node.left);
      const right = printExpression(node.right);
      const lp = bindingOf(node.left);
      const rp = bindingOf(node.right);
      // The base of ^ must bind tighter than ^ itself: (-x)^2 and (a^b)^c keep parentheses.
      const leftNeeds = rightAssociative ? lp <= p : lp < p;
      // The exponent of ^ is a unary: -x, a^b, calls and atoms need none; a + b needs them.
      const rightNeeds = rightAssociative ? rp < UNARY_PRECEDENCE : rp <= p;
      return `${leftNeeds ? `(${left})` : left} ${node.operator} ${rightNeeds ? `(${right})` : right}`;
    }
  }
}

function bindingOf(node: ExpressionNode): number {
  if (node.type === "binary") return PRECEDENCE[node.operator];
  if (node.type === "unary") return UNARY_PRECEDENCE;
  // A negative literal cannot occur in a parsed tree (the parser makes a unary node), but a
  // hand-built tree may hold one: treat it like a unary minus.
  if (node.type === "number" && (node.value < 0 || Object.is(node.value, -0))) return UNARY_PRECEDENCE;
  return 5;
}

function formatNumber(value: number): string {
  if (value < 0 || Object.is(value, -0)) return `-${formatNumber(-value)}`;
  // String() gives "1e+21" for large values; our grammar accepts e+21, so keep it as is.
  return String(value);
}

/** Counts the nodes of a tree (iteratively, so it is safe on any depth). */
export function countNodes(root: ExpressionNode): number {
  let count = 0;
  const stack: ExpressionNode[] = [root];
  while (stack.length > 0) {
    const node = stack.pop()!;
    count++;
    if (node.type === "unary") stack.push(node.operand);
    else if (node.type === "binary") stack.push(node.left, node.right);
    else if (node.type === "call") stack.push(...node.args);
  }
  return count;
}

/** The distinct variable names a tree uses, in order of first appearance. */
export function namesUsed(root: ExpressionNode): string[] {
  const seen = new Set<string>();
  const visit = (node: ExpressionNode): void => {
    if (node.type === "name") seen.add(node.name);
    else if (node.type === "unary") visit(node.operand);
    else if (node.type === "binary") { visit(node.left); visit(node.right); }
    else if (node.type === "call") node.args.forEach(visit);
  };
  visit(root);
  return [...seen];
}
