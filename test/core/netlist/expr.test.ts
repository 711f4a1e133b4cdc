/**
 * `{expr}` expressions. The outside reference for precedence,
 * associativity and function values is mathjs `evaluate` (a general-purpose
 * maths library): random expression strings are evaluated by both, with
 * `ln` mapped to mathjs `log`. Numbers with suffixes are written in
 * e-notation for mathjs (netlist.md suffix table). Where mathjs goes into
 * complex numbers (IEEE arithmetic gives NaN there) the case is skipped.
 */
import fc from 'fast-check';
import { all, create } from 'mathjs';

// mathjs compares with an absolute tolerance of 1e-15 and a relative one of 1e-12 by default, so its
// min(1e-16, 0) is 1e-16 and its min(x, x − 2.2e-14) is x (which pow(1e8, ·) then turns into a
// 4e-13 difference, FC_SEED 872802656); the reference must compare exactly, as our evaluator does.
// mathjs refuses relTol 0; a relative tolerance of Number.MIN_VALUE (5e-324) lies far below the 2.2e-16
// spacing of doubles, so only equal values compare equal.
const math = create(all!, { absTol: 0, relTol: Number.MIN_VALUE });
const mathEvaluate = math.evaluate;
const mathParse = math.parse;
import { describe, expect, test } from 'vitest';
import type { Expr } from '../../../packages/core/src/netlist/ast.js';
import { evaluateExpr, MAX_EXPR_NESTING, parseExpr, printExpr } from '../../../packages/core/src/netlist/index.js';
import { mustFail, oneCard, seedFor, strip } from './support.js';

const seed = seedFor('expr.test.ts');
const evaluate = (s: string, scope: Record<string, number> = {}): unknown => mathEvaluate(s, { ...scope }) as unknown;

/**
 * mathjs value of an expression when every operator and function along the
 * way gives a real number; undefined when mathjs goes complex anywhere
 * (square root of a negative...), where IEEE arithmetic gives NaN instead.
 */
function realValue(src: string, scope: Record<string, number>): number | undefined {
  try {
    const tree = mathParse(src);
    for (const node of tree.filter((n) => n.type === 'OperatorNode' || n.type === 'FunctionNode')) {
      if (typeof node.compile().evaluate({ ...scope }) !== 'number') return undefined;
    }
    const v = tree.compile().evaluate({ ...scope }) as unknown;
    return typeof v === 'number' ? v : undefined;
  } catch {
    return undefined; // mathjs refuses complex arguments to min/max
  }
}
const here = (offset: number) => ({ file: 't', line: 1, column: offset + 1 });

function ours(src: string, scope: Record<string, number> = {}): number {
  const p = parseExpr(src, here);
  if (!p.ok) throw new Error(`${src}: ${p.error.message} at ${p.error.offset}`);
  const r = evaluateExpr(p.expr, (n) => scope[n]);
  if (!r.ok) throw new Error(`${src}: unknown ${r.name}`);
  return r.value;
}

function same(a: number, b: number): boolean {
  if (Number.isNaN(a) || Number.isNaN(b)) return Number.isNaN(a) && Number.isNaN(b);
  if (!Number.isFinite(a) || !Number.isFinite(b)) return a === b;
  // With mathjs comparing exactly the two agree bit for bit: observed 0 over FC_SEED 20261201, 1–13, 100–105,
  // 300, 424242, 872802656, 777, 9999 and 123456; bound 2·eps relative.
  return Math.abs(a - b) <= 2 * Number.EPSILON * Math.max(Math.abs(a), Math.abs(b));
}

describe('precedence and associativity, against mathjs', () => {
  const cases = ['-2^2', '2^3^2', '2^-1', '2^-3^2', '1-2-3', '8/4/2', '2*3+4*5', '-(1+2)*3', '2*-3', '- -2', '+3-+2', '(2+3)^2', '2^(1/2)', '10-2^2*3', '6/2*3', '-2^-2'];
  test.each(cases)('%s', (s) => {
    expect(ours(s)).toBe(evaluate(s));
  });

  test('functions: ln is the natural logarithm, log10 the common one (mathjs log, log10)', () => {
    for (const [our, ref] of [['ln(10)', 'log(10)'], ['log10(1000)', 'log10(1000)'], ['sqrt(2)', 'sqrt(2)'], ['exp(1)', 'exp(1)'], ['abs(-3)', 'abs(-3)'], ['min(3, 1, 2)', 'min(3, 1, 2)'], ['max(3, 1, 2)', 'max(3, 1, 2)'], ['pow(2, 10)', 'pow(2, 10)']]) {
      expect(ours(our as string)).toBe(evaluate(ref as string));
    }
  });

  test('suffixed numbers inside expressions use the suffix table (netlist.md)', () => {
    expect(ours('2*4.7k')).toBe(9400);
    expect(ours('1meg/1m')).toBe(1e9);
    expect(ours('10uF*2')).toBe(2e-5);
  });

  test('names and functions are case-insensitive; lookup gets the name lower-cased', () => {
    expect(ours('RLoad*SQRT(4)', { rload: 5 })).toBe(10);
  });
});

/** A random expression written twice: our syntax, and mathjs syntax for the same value. */
interface Pair {
  readonly ours: string;
  readonly ref: string;
}

const SUFFIXES: ReadonlyArray<[string, number]> = [['', 0], ['f', -15], ['p', -12], ['n', -9], ['u', -6], ['m', -3], ['k', 3], ['meg', 6], ['g', 9]];
const NAMES = ['x_a', 'r_load', 'v_in2'];
const SCOPE: Record<string, number> = { x_a: 2.5, r_load: 470, v_in2: -3 };

const numberPair = fc.tuple(fc.integer({ min: 0, max: 999 }), fc.option(fc.integer({ min: 0, max: 99 }), { nil: undefined }), fc.constantFrom(...SUFFIXES)).map(([i, f, [sfx, e]]): Pair => {
  const m = f === undefined ? `${i}` : `${i}.${f}`;
  return { ours: `${m}${sfx}`, ref: e === 0 ? m : `${m}e${e}` };
});

const exprPairs = fc.letrec<{ expr: Pair; atom: Pair; bin: Pair; neg: Pair; paren: Pair; call: Pair }>((tie) => ({
  expr: fc.oneof({ depthSize: 'small' }, tie('atom'), tie('bin'), tie('neg'), tie('paren'), tie('call')),
  atom: fc.oneof(numberPair, fc.tuple(fc.constantFrom(...NAMES), fc.boolean()).map(([n, up]): Pair => ({ ours: up ? n.toUpperCase() : n, ref: n }))),
  bin: fc.tuple(tie('expr'), fc.constantFrom('+', '-', '*', '/', '^'), tie('expr')).map(([l, op, r]): Pair => ({ ours: `${l.ours} ${op} ${r.ours}`, ref: `${l.ref} ${op} ${r.ref}` })),
  neg: fc.tuple(fc.constantFrom('-', '+'), tie('expr')).map(([op, a]): Pair => ({ ours: `${op} ${a.ours}`, ref: `${op} ${a.ref}` })),
  paren: tie('expr').map((a): Pair => ({ ours: `(${a.ours})`, ref: `(${a.ref})` })),
  call: fc.oneof(
    fc.tuple(fc.constantFrom(['sqrt', 'sqrt'], ['exp', 'exp'], ['ln', 'log'], ['log10', 'log10'], ['abs', 'abs']), tie('expr')).map(([[o, r], a]): Pair => ({ ours: `${o}(${a.ours})`, ref: `${r}(${a.ref})` })),
    fc.tuple(tie('expr'), tie('expr')).map(([a, b]): Pair => ({ ours: `pow(${a.ours}, ${b.ours})`, ref: `pow(${a.ref}, ${b.ref})` })),
    fc.tuple(fc.constantFrom('min', 'max'), fc.array(tie('expr'), { minLength: 1, maxLength: 3 })).map(([f, args]): Pair => ({
      ours: `${f}(${args.map((a) => a.ours).join(', ')})`,
      ref: `${f}(${args.map((a) => a.ref).join(', ')})`,
    })),
  ),
}));

describe('property: random expressions agree with mathjs', () => {
  test('value of our parse = value of mathjs evaluate (real results only)', () => {
    let compared = 0;
    let runs = 0;
    fc.assert(
      fc.property(exprPairs.expr, (p) => {
        runs++;
        const want = realValue(p.ref, SCOPE);
        if (want === undefined) return true;
        compared++;
        return same(ours(p.ours, SCOPE), want);
      }),
      { seed, numRuns: 3000 },
    );
    // The comparison must actually happen for most expressions, or the property proves little.
    expect(compared).toBeGreaterThan(runs / 2);
  });

  test('printExpr gives back the same tree', () => {
    fc.assert(
      fc.property(exprPairs.expr, (p) => {
        const a = parseExpr(p.ours, here);
        if (!a.ok) return false;
        const b = parseExpr(printExpr(a.expr), here);
        return b.ok && JSON.stringify(strip(b.expr)) === JSON.stringify(strip(a.expr));
      }),
      { seed, numRuns: 1000 },
    );
  });
});

describe('syntax errors and limits', () => {
  const bad: ReadonlyArray<[string, number, RegExp]> = [
    ['', 0, /empty/],
    ['1 +', 3, /expected a value/],
    ['(1 + 2', 6, /expected a closing/],
    ['foo(1)', 0, /unknown function/],
    ['pow(1)', 0, /takes 2 arguments/],
    ['sqrt(1, 2)', 0, /takes 1 argument/],
    ['1 2', 2, /after a complete expression/],
    ['2 ** 3', 3, /expected a value/],
    ['a $ b', 2, /cannot appear/],
  ];
  test.each(bad)('%j fails at offset %i', (src, offset, message) => {
    const r = parseExpr(src, here);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.error.offset).toBe(offset);
      expect(r.error.message).toMatch(message);
    }
  });

  test('nesting deeper than the limit is an error, not a stack overflow', () => {
    const deep = `${'('.repeat(MAX_EXPR_NESTING + 1)}1${')'.repeat(MAX_EXPR_NESTING + 1)}`;
    const r = parseExpr(deep, here);
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.error.message).toMatch(/nested too deeply/);
    const ok = parseExpr(`${'('.repeat(50)}1${')'.repeat(50)}`, here);
    expect(ok.ok).toBe(true);
    for (const src of [`${'-'.repeat(100000)}1`, `${'2^'.repeat(100000)}2`, `${'1+'.repeat(100000)}1`, `${'sqrt('.repeat(100000)}1`]) {
      expect(parseExpr(src, here).ok).toBe(false);
    }
  });

  test('a bad expression in a netlist is reported at its column', () => {
    const [e] = mustFail('t\nR1 a b {2*(r+}');
    expect(e).toMatchObject({ code: 'bad-expression', pos: { line: 2, column: 14 } });
  });

  test('parameter positions point into the file; evaluateExpr names an undefined one', () => {
    const c = oneCard('R1 a b {2 * Rload}');
    if (c.kind !== 'R' || c.value.kind !== 'expr') throw new Error('expected an expression value');
    const r = evaluateExpr(c.value.expr, () => undefined);
    expect(r).toEqual({ ok: false, name: 'Rload', pos: { file: '<input>', line: 2, column: 13 } });
    const e: Expr = c.value.expr;
    expect(evaluateExpr(e, (n) => (n === 'rload' ? 50 : undefined))).toEqual({ ok: true, value: 100 });
  });
});
