/**
 * `{expr}` expressions (netlist.md, Numbers): the project's own
 * recursive-descent parser and evaluator. Nothing here hands text to a
 * language evaluator.
 *
 * Grammar, loosest binding first (`^` right-associative, and unary minus
 * binding looser than `^`, so `-2^2` is −4 and `2^-1` is 0.5 — the usual
 * mathematical convention, as in general-purpose maths libraries):
 * ```
 * sum     := product (('+' | '-') product)*
 * product := unary (('*' | '/') unary)*
 * unary   := ('+' | '-') unary | power
 * power   := primary ('^' unary)?
 * primary := number | name | name '(' sum (',' sum)* ')' | '(' sum ')'
 * ```
 * One function per precedence level is the textbook recursive-descent
 * technique (Aho, Lam, Sethi and Ullman, Compilers: Principles, Techniques,
 * and Tools, 2nd ed., §2.4 and §4.4; cited from memory). Evaluation is plain
 * IEEE 754 double arithmetic, with `^` and `pow` as `Math.pow`.
 */
import type { SourcePos } from '../errors.js';
import type { Expr, ExprFunction } from './ast.js';
import { scanNumber } from './numbers.js';

/** Deepest nesting of parentheses, unary signs and powers accepted. */
export const MAX_EXPR_NESTING = 200;
/** Tallest expression tree accepted (long sums build tall trees; evaluation recurses over them). */
export const MAX_EXPR_HEIGHT = 1000;

/** Arity of each function: [fewest, most] arguments. */
const FUNCTIONS: Readonly<Record<ExprFunction, readonly [number, number]>> = {
  sqrt: [1, 1],
  exp: [1, 1],
  ln: [1, 1],
  log10: [1, 1],
  abs: [1, 1],
  min: [1, Infinity],
  max: [1, Infinity],
  pow: [2, 2],
};

/** Names of the functions an expression may call. */
export const EXPR_FUNCTIONS: readonly ExprFunction[] = Object.keys(FUNCTIONS) as ExprFunction[];

/** True when `name` (any case) is a function name. */
export function isExprFunction(name: string): name is ExprFunction {
  return Object.prototype.hasOwnProperty.call(FUNCTIONS, name);
}

/** A parse failure: message, offset into the source, what was expected. */
export interface ExprError {
  readonly message: string;
  readonly offset: number;
  readonly expected?: string;
}

type Tok =
  | { readonly t: 'num'; readonly value: number; readonly at: number; readonly text: string }
  | { readonly t: 'name'; readonly name: string; readonly at: number }
  | { readonly t: 'op'; readonly op: string; readonly at: number }
  | { readonly t: 'end'; readonly at: number };

class Fail {
  constructor(readonly error: ExprError) {}
}

function lex(src: string): Tok[] {
  const out: Tok[] = [];
  let i = 0;
  while (i < src.length) {
    const c = src[i] ?? '';
    if (/\s/.test(c)) {
      i++;
    } else if (/[0-9.]/.test(c)) {
      const scan = scanNumber(src, i);
      if (!scan) throw new Fail({ message: `"${c}" does not start a number`, offset: i, expected: 'a number such as 4.7k or 0.5' });
      if (!Number.isFinite(scan.value)) throw new Fail({ message: `the number ${src.slice(i, scan.end)} is out of range`, offset: i });
      out.push({ t: 'num', value: scan.value, at: i, text: src.slice(i, scan.end) });
      i = scan.end;
    } else if (/[A-Za-z_]/.test(c)) {
      let j = i + 1;
      while (j < src.length && /[A-Za-z0-9_]/.test(src[j] ?? '')) j++;
      out.push({ t: 'name', name: src.slice(i, j), at: i });
      i = j;
    } else if ('+-*/^(),'.includes(c)) {
      out.push({ t: 'op', op: c, at: i });
      i++;
    } else {
      throw new Fail({ message: `"${c}" cannot appear in an expression`, offset: i, expected: 'numbers, parameter names, functions and + - * / ^ ( )' });
    }
  }
  out.push({ t: 'end', at: src.length });
  return out;
}

/** Recursive-descent parser over the token list; positions map back through `where`. */
class Parser {
  private i = 0;
  private depth = 0;
  private readonly heights = new WeakMap<Expr, number>();
  constructor(private readonly toks: readonly Tok[], private readonly where: (offset: number) => SourcePos) {}

  private peek(): Tok {
    return this.toks[this.i] ?? { t: 'end', at: 0 };
  }
  private isOp(op: string): boolean {
    const t = this.peek();
    return t.t === 'op' && t.op === op;
  }
  private describe(t: Tok): string {
    if (t.t === 'end') return 'the end of the expression';
    if (t.t === 'num') return `"${t.text}"`;
    if (t.t === 'name') return `"${t.name}"`;
    return `"${t.op}"`;
  }
  /** Builds a node, tracking tree height so that evaluation and printing cannot recurse too deep. */
  private node(e: Expr, kids: readonly Expr[] = []): Expr {
    let h = 1;
    for (const k of kids) h = Math.max(h, 1 + (this.heights.get(k) ?? 1));
    if (h > MAX_EXPR_HEIGHT) throw new Fail({ message: `the expression is too long (more than ${MAX_EXPR_HEIGHT} levels)`, offset: this.peek().at });
    this.heights.set(e, h);
    return e;
  }
  private enter(): void {
    if (++this.depth > MAX_EXPR_NESTING) {
      throw new Fail({ message: `the expression is nested too deeply (more than ${MAX_EXPR_NESTING} levels)`, offset: this.peek().at });
    }
  }

  parseAll(): Expr {
    if (this.peek().t === 'end') throw new Fail({ message: 'the expression is empty', offset: 0, expected: 'an expression between { and }' });
    const e = this.sum();
    const t = this.peek();
    if (t.t !== 'end') throw new Fail({ message: `unexpected ${this.describe(t)} after a complete expression`, offset: t.at, expected: 'an operator (+ - * / ^) or the end of the expression' });
    return e;
  }
  private sum(): Expr {
    let left = this.product();
    while (this.isOp('+') || this.isOp('-')) {
      const op = (this.peek() as { op: '+' | '-' }).op;
      this.i++;
      const right = this.product();
      left = this.node({ kind: 'binary', op, left, right }, [left, right]);
    }
    return left;
  }
  private product(): Expr {
    let left = this.unary();
    while (this.isOp('*') || this.isOp('/')) {
      const op = (this.peek() as { op: '*' | '/' }).op;
      this.i++;
      const right = this.unary();
      left = this.node({ kind: 'binary', op, left, right }, [left, right]);
    }
    return left;
  }
  private unary(): Expr {
    if (this.isOp('-') || this.isOp('+')) {
      const op = (this.peek() as { op: '+' | '-' }).op;
      this.i++;
      this.enter();
      const arg = this.unary();
      this.depth--;
      return this.node({ kind: 'unary', op, arg }, [arg]);
    }
    return this.power();
  }
  private power(): Expr {
    const base = this.primary();
    if (!this.isOp('^')) return base;
    this.i++;
    this.enter();
    const exponent = this.unary();
    this.depth--;
    return this.node({ kind: 'binary', op: '^', left: base, right: exponent }, [base, exponent]);
  }
  private primary(): Expr {
    const t = this.peek();
    if (t.t === 'num') {
      this.i++;
      return this.node({ kind: 'num', value: t.value });
    }
    if (t.t === 'name') {
      this.i++;
      if (this.isOp('(')) return this.call(t.name, t.at);
      return this.node({ kind: 'param', name: t.name, pos: this.where(t.at) });
    }
    if (t.t === 'op' && t.op === '(') {
      this.i++;
      this.enter();
      const inner = this.sum();
      this.depth--;
      this.expect(')', 'a closing ")"');
      return inner;
    }
    throw new Fail({ message: `expected a value but found ${this.describe(t)}`, offset: t.at, expected: 'a number, a parameter name, a function call or "("' });
  }
  private expect(op: string, what: string): void {
    if (this.isOp(op)) {
      this.i++;
      return;
    }
    const t = this.peek();
    throw new Fail({ message: `expected ${what} but found ${this.describe(t)}`, offset: t.at, expected: what });
  }
  private call(written: string, at: number): Expr {
    const fn = written.toLowerCase();
    if (!isExprFunction(fn)) {
      throw new Fail({ message: `unknown function "${written}"`, offset: at, expected: `one of ${EXPR_FUNCTIONS.join(', ')}` });
    }
    this.i++; // '('
    this.enter();
    const args: Expr[] = [this.sum()];
    while (this.isOp(',')) {
      this.i++;
      args.push(this.sum());
    }
    this.expect(')', 'a "," or a closing ")"');
    this.depth--;
    const [lo, hi] = FUNCTIONS[fn];
    if (args.length < lo || args.length > hi) {
      const want = lo === hi ? `${lo}` : hi === Infinity ? `at least ${lo}` : `${lo} to ${hi}`;
      throw new Fail({ message: `${fn}() takes ${want} argument${lo === 1 && hi === 1 ? '' : 's'}, not ${args.length}`, offset: at, expected: `${want} argument(s)` });
    }
    return this.node({ kind: 'call', fn, args, pos: this.where(at) }, args);
  }
}

/**
 * Parses the text between `{` and `}`. `where` maps an offset of `src` to
 * its place in the file, for the positions kept on names and calls.
 */
export function parseExpr(src: string, where: (offset: number) => SourcePos): { ok: true; expr: Expr } | { ok: false; error: ExprError } {
  try {
    return { ok: true, expr: new Parser(lex(src), where).parseAll() };
  } catch (e) {
    if (e instanceof Fail) return { ok: false, error: e.error };
    throw e;
  }
}

function apply(fn: ExprFunction, a: readonly number[]): number {
  const x = a[0] ?? NaN;
  switch (fn) {
    case 'sqrt': return Math.sqrt(x);
    case 'exp': return Math.exp(x);
    case 'ln': return Math.log(x);
    case 'log10': return Math.log10(x);
    case 'abs': return Math.abs(x);
    case 'min': return a.reduce((m, v) => Math.min(m, v), Infinity);
    case 'max': return a.reduce((m, v) => Math.max(m, v), -Infinity);
    case 'pow': return Math.pow(x, a[1] ?? NaN);
  }
}

class Unknown {
  constructor(readonly name: string, readonly pos: SourcePos) {}
}

function evalNode(e: Expr, lookup: (name: string) => number | undefined): number {
  switch (e.kind) {
    case 'num': return e.value;
    case 'param': {
      const v = lookup(e.name.toLowerCase());
      if (v === undefined) throw new Unknown(e.name, e.pos);
      return v;
    }
    case 'unary': {
      const v = evalNode(e.arg, lookup);
      return e.op === '-' ? -v : v;
    }
    case 'binary': {
      const l = evalNode(e.left, lookup);
      const r = evalNode(e.right, lookup);
      switch (e.op) {
        case '+': return l + r;
        case '-': return l - r;
        case '*': return l * r;
        case '/': return l / r;
        case '^': return Math.pow(l, r);
      }
      break;
    }
    case 'call': return apply(e.fn, e.args.map((a) => evalNode(a, lookup)));
  }
  return NaN;
}

/**
 * Evaluates an expression in IEEE double arithmetic. `lookup` receives each
 * parameter name lower-cased. The value may be NaN or infinite (`ln(-1)`,
 * `1/0`); the caller decides whether that is acceptable.
 * @returns the value, or the first undefined parameter (as written) and its position.
 */
export function evaluateExpr(
  expr: Expr,
  lookup: (name: string) => number | undefined,
): { ok: true; value: number } | { ok: false; name: string; pos: SourcePos } {
  try {
    return { ok: true, value: evalNode(expr, lookup) };
  } catch (e) {
    if (e instanceof Unknown) return { ok: false, name: e.name, pos: e.pos };
    throw e;
  }
}

/** Binding level of a node as printed: 1 sum, 2 product, 3 unary, 4 power, 5 primary. */
function level(e: Expr): number {
  if (e.kind === 'binary') return e.op === '^' ? 4 : e.op === '+' || e.op === '-' ? 1 : 2;
  return e.kind === 'unary' ? 3 : 5;
}

/** Renders an expression (without braces) that {@link parseExpr} reads back to the same value (and, for parsed trees, the same tree). */
export function printExpr(e: Expr): string {
  return show(e, 0);
}

function showNumber(v: number): string {
  if (Number.isNaN(v)) return '(0/0)';
  if (v === Infinity) return '(1/0)';
  if (v === -Infinity) return '(-1/0)';
  // A minus sign would read back as unary minus, which binds looser than ^: keep negatives parenthesised.
  if (v < 0 || Object.is(v, -0)) return `(-${String(-v)})`;
  return String(v);
}

/** `ctx` is the least binding level the surroundings accept without parentheses. */
function show(e: Expr, ctx: number): string {
  let s: string;
  switch (e.kind) {
    case 'num': return showNumber(e.value);
    case 'param': return e.name;
    case 'call': return `${e.fn}(${e.args.map((a) => show(a, 0)).join(', ')})`;
    case 'unary':
      s = `${e.op}${show(e.arg, 3)}`;
      break;
    case 'binary': {
      const p = level(e);
      s = p === 4 ? `${show(e.left, 5)}^${show(e.right, 3)}` : `${show(e.left, p)} ${e.op} ${show(e.right, p + 1)}`;
      break;
    }
  }
  return level(e) < ctx ? `(${s})` : s;
}
