/**
 * Hand-written recursive-descent parser for the expression language of `expression.ts`.
 * Text is never evaluated as JavaScript. Limits (length, nesting depth, node count) are checked
 * before or during the descent so hostile input fails fast without exhausting the stack.
 */
import { EngineError } from "../errors";
import {
  EXPRESSION_LIMITS, FUNCTION_ARITY, isFunctionName,
  type BinaryOperator, type ExpressionNode, type FunctionName,
} from "./expression";

type Token =
  | { kind: "number"; value: number; column: number; text: string }
  | { kind: "name"; name: string; column: number; text: string }
  | { kind: "op"; op: string; column: number; text: string }
  | { kind: "end"; column: number; text: string };

function parseError(column: number, message: string, text: string, extra: Record<string, unknown> = {}): EngineError {
  return new EngineError("parse-error", `at column ${column}: ${message}`, { column, expression: text.length > 80 ? `${text.slice(0, 77)}...` : text, ...extra });
}

function isDigit(c: number): boolean { return c >= 48 && c <= 57; }
function isNameStart(c: number): boolean { return (c >= 65 && c <= 90) || (c >= 97 && c <= 122) || c === 95; }
function isNameChar(c: number): boolean { return isNameStart(c) || isDigit(c); }

/** Splits text into tokens; columns are 1-based. */
function tokenize(text: string): Token[] {
  const tokens: Token[] = [];
  let i = 0;
  while (i < text.length) {
    const c = text.charCodeAt(i);
    if (c === 32 || c === 9 || c === 10 || c === 13) { i++; continue; }
    const column = i + 1;
    if (isDigit(c) || (c === 46 && isDigit(text.charCodeAt(i + 1)))) {
      let j = i;
      while (isDigit(text.charCodeAt(j))) j++;
      if (text.charCodeAt(j) === 46) {
        j++;
        while (isDigit(text.charCodeAt(j))) j++;
      }
      const e = text.charCodeAt(j);
      if (e === 101 || e === 69) {
        let k = j + 1;
        const sign = text.charCodeAt(k);
        if (sign === 43 || sign === 45) k++;
        if (!isDigit(text.charCodeAt(k))) {
          throw parseError(k + 1, `expected digits in the exponent of the number starting at column ${column}`, text);
        }
        while (isDigit(text.charCodeAt(k))) k++;
        j = k;
      }
      if (isNameStart(text.charCodeAt(j))) {
        throw parseError(j + 1, `expected an operator or ')' after the number at column ${column}, found '${text[j]}'`, text);
      }
      const literal = text.slice(i, j);
      const value = Number(literal);
      if (!Number.isFinite(value)) {
        throw parseError(column, `the number ${literal} is too large for double precision`, text);
      }
      tokens.push({ kind: "number", value, column, text: literal });
      i = j;
      continue;
    }
    if (isNameStart(c)) {
      let j = i + 1;
      while (isNameChar(text.charCodeAt(j))) j++;
      const name = text.slice(i, j);
      tokens.push({ kind: "name", name, column, text: name });
      i = j;
      continue;
    }
    const ch = text[i]!;
    if ("+-*/^(),".includes(ch)) {
      tokens.push({ kind: "op", op: ch, column, text: ch });
      i++;
      continue;
    }
    throw parseError(column, `unexpected character '${ch}' (allowed: numbers, names, + - * / ^ ( ) ,)`, text);
  }
  tokens.push({ kind: "end", column: text.length + 1, text: "end of expression" });
  return tokens;
}

class Parser {
  private position = 0;
  private depth = 0;
  private nodes = 0;

  constructor(private readonly tokens: Token[], private readonly text: string) {}

  parse(): ExpressionNode {
    const root = this.expression();
    const next = this.peek();
    if (next.kind !== "end") {
      const hint = next.kind === "op" && next.op === ")" ? "unmatched ')'" : `'${next.text}'`;
      throw parseError(next.column, `expected an operator or the end of the expression, found ${hint}`, this.text);
    }
    return root;
  }

  private peek(): Token { return this.tokens[this.position]!; }

  private isOp(op: string): boolean {
    const t = this.peek();
    return t.kind === "op" && t.op === op;
  }

  private node<T extends ExpressionNode>(n: T): T {
    if (++this.nodes > EXPRESSION_LIMITS.maxNodes) {
      throw parseError(n.column, `expression has more than ${EXPRESSION_LIMITS.maxNodes} nodes`, this.text, { limit: "nodes" });
    }
    return n;
  }

  // Every construct that nests (parentheses, call arguments, unary operands, exponents) passes
  // through here, so recursion depth is bounded by maxDepth: no stack overflow on "((((...".
  private nested<T>(column: number, body: () => T): T {
    if (++this.depth > EXPRESSION_LIMITS.maxDepth) {
      throw parseError(column, `nesting deeper than ${EXPRESSION_LIMITS.maxDepth} levels`, this.text, { limit: "depth" });
    }
    const result = body();
    this.depth--;
    return result;
  }

  private expression(): ExpressionNode {
    let left = this.term();
    while (this.isOp("+") || this.isOp("-")) {
      const t = this.peek() as { op: BinaryOperator; column: number };
      this.position++;
      const right = this.term();
      left = this.node({ type: "binary", operator: t.op, left, right, column: t.column });
    }
    return left;
  }

  private term(): ExpressionNode {
    let left = this.unary();
    while (this.isOp("*") || this.isOp("/")) {
      const t = this.peek() as { op: BinaryOperator; column: number };
      this.position++;
      const right = this.unary();
      left = this.node({ type: "binary", operator: t.op, left, right, column: t.column });
    }
    return left;
  }

  private unary(): ExpressionNode {
    if (this.isOp("-") || this.isOp("+")) {
      const t = this.peek() as { op: "-" | "+"; column: number };
      this.position++;
      const operand = this.nested(t.column, () => this.unary());
      return this.node({ type: "unary", operator: t.op, operand, column: t.column });
    }
    return this.power();
  }

  private power(): ExpressionNode {
    const base = this.primary();
    if (this.isOp("^")) {
      const t = this.peek();
      this.position++;
      // Right-associative: the exponent is a unary, which itself may contain another power.
      const exponent = this.nested(t.column, () => this.unary());
      return this.node({ type: "binary", operator: "^", left: base, right: exponent, column: base.column });
    }
    return base;
  }

  private primary(): ExpressionNode {
    const t = this.peek();
    if (t.kind === "number") {
      this.position++;
      return this.node({ type: "number", value: t.value, column: t.column });
    }
    if (t.kind === "name") {
      this.position++;
      if (this.isOp("(")) return this.call(t.name, t.column);
      if (isFunctionName(t.name)) {
        throw parseError(this.peek().column, `expected '(' after the function name '${t.name}' (usage: ${FUNCTION_ARITY[t.name].signature})`, this.text, { name: t.name });
      }
      return this.node({ type: "name", name: t.name, column: t.column });
    }
    if (t.kind === "op" && t.op === "(") {
      this.position++;
      const inner = this.nested(t.column, () => this.expression());
      this.expectClose(t.column, "(");
      return inner;
    }
    const found = t.kind === "end" ? "the end of the expression" : `'${t.text}'`;
    throw parseError(t.column, `expected a number, a name, a function call or '(', found ${found}`, this.text);
  }

  private expectClose(openColumn: number, what: string): void {
    const t = this.peek();
    if (t.kind === "op" && t.op === ")") { this.position++; return; }
    const found = t.kind === "end" ? "the end of the expression" : `'${t.text}'`;
    throw parseError(t.column, `expected ')' to close the ${what} at column ${openColumn}, found ${found}`, this.text, { openColumn });
  }

  private call(name: string, column: number): ExpressionNode {
    if (!isFunctionName(name)) {
      throw parseError(column, `unknown function '${name}' (known: ${Object.keys(FUNCTION_ARITY).join(", ")})`, this.text, { name });
    }
    const open = this.peek();
    this.position++;
    const args = this.nested(open.column, () => {
      const list: ExpressionNode[] = [this.expression()];
      while (this.isOp(",")) {
        this.position++;
        list.push(this.expression());
      }
      return list;
    });
    this.expectClose(open.column, `'(' of ${name}`);
    const arity = FUNCTION_ARITY[name as FunctionName];
    if ((arity.exact !== undefined && args.length !== arity.exact) || (arity.minimum !== undefined && args.length < arity.minimum)) {
      const wanted = arity.exact !== undefined ? `exactly ${arity.exact}` : `at least ${arity.minimum}`;
      throw parseError(column, `function '${name}' takes ${wanted} argument${(arity.exact ?? arity.minimum) === 1 ? "" : "s"}, got ${args.length} (usage: ${arity.signature})`, this.text, { name, arguments: args.length });
    }
    return this.node({ type: "call", name: name as FunctionName, args, column });
  }
}

/**
 * Computes: the syntax tree of one expression of the language in `expression.ts`.
 * Requires: a string of at most 2,000 characters, nesting depth ≤ 64, at most 5,000 nodes.
 * Method: tokenizer plus recursive descent, one function per precedence level (the classic
 *   scheme of Wirth, "Algorithms + Data Structures = Programs", Prentice-Hall 1976, §5.8);
 *   every nested construct goes through a depth counter.
 * Cost: O(length) time and memory; the length check runs first, so a 1 MB string costs O(1).
 * Accuracy: number literals are converted by the ECMAScript Number() grammar (correctly
 *   rounded); literals that overflow to ±Infinity are rejected.
 * Errors: "parse-error" with the 1-based column and what was expected ("at column 7: expected
 *   ')' to close the '(' at column 3, found the end of the expression"); also for unknown
 *   functions, wrong arity (naming the function), and exceeded limits. "invalid-argument" if
 *   `text` is not a string.
 * Example: parseExpression("-x^2").type === "unary"  // −(x²)
 */
export function parseExpression(text: string): ExpressionNode {
  if (typeof text !== "string") {
    throw new EngineError("invalid-argument", `expression must be a string (it is ${text === null ? "null" : typeof text})`, {});
  }
  if (text.length > EXPRESSION_LIMITS.maxLength) {
    throw new EngineError("parse-error", `expression is ${text.length} characters long; at most ${EXPRESSION_LIMITS.maxLength} are allowed`, {
      length: text.length, limit: "length",
    });
  }
  if (text.trim().length === 0) throw parseError(1, "expected an expression, found nothing", text);
  return new Parser(tokenize(text), text).parse();
}
