/**
 * Whatever it is given, the reader returns a value (parseNetlist) or throws
 * only RailcheckError (parseNetlistOrThrow): random code units, random
 * bytes, netlist-flavoured token soup and random mutations of valid
 * netlists (docs/netlist.md, Errors: "Reading never throws anything but
 * railcheck's own error type, whatever the bytes").
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { RailcheckError } from '../../../packages/core/src/errors.js';
import type { ParseOptions } from '../../../packages/core/src/netlist/index.js';
import { parseNetlist, parseNetlistOrThrow, printNetlist } from '../../../packages/core/src/netlist/index.js';
import { netlistArb } from './gen.js';
import { seedFor } from './support.js';

const seed = seedFor('robustness.test.ts');

/** Included files answer with more fuzz, so includes are exercised too. */
const options: ParseOptions = {
  file: '/fuzz/main.cir',
  readFile: (p) => (p.endsWith('.lib') ? '.include "a.lib"\nR1 a 0 1k\n.subckt x a\n' : undefined),
};

/** The invariants of any result: a well-formed value, never an exception. */
function wellFormed(text: string): boolean {
  const r = parseNetlist(text, options);
  if (r.ok) {
    if (typeof r.netlist.title !== 'string' || !Array.isArray(r.netlist.cards)) return false;
  } else {
    if (r.errors.length === 0) return false;
    for (const e of r.errors) {
      if (e.severity !== 'error' || typeof e.code !== 'string' || typeof e.message !== 'string') return false;
      if (e.pos && (e.pos.line < 1 || e.pos.column < 1 || typeof e.lineText !== 'string')) return false;
    }
  }
  try {
    parseNetlistOrThrow(text, options);
  } catch (e) {
    if (!(e instanceof RailcheckError) || e.diagnostics.length === 0) return false;
  }
  return true;
}

const codeUnits = fc.array(fc.integer({ min: 0, max: 0xffff }), { maxLength: 400 }).map((a) => String.fromCharCode(...a));
const bytes = fc.uint8Array({ maxLength: 400 });
const TOKENS = [
  ' ', ' ', '\n', '\n', '\r\n', '\t', '+', '*', ';', '{', '}', '(', ')', '=', '"', ',', '%', '<', '<=', '>=', '^', '-', '.',
  'R1', 'r1', 'V1', 'C2', 'L3', 'I4', 'D5', 'Q6', 'E7', 'G8', 'F9', 'H0', 'X1', 'Z9', 'a', 'b', '0', 'gnd', 'out',
  '1k', '4.7u', '0', '5%', '1e999', '-2', '{a*2}', '{(', 'sqrt(', 'min(1,', ')', 'meg', 'µ',
  '.model', 'D', 'NPN', 'PNP', 'IS=1e-14', 'BV=5', '.param', 'x=1', '.subckt', '.ends', '.include', '"a.lib"', '"../b.lib"',
  '.op', '.dc', '.tran', '.ac', 'dec', 'lin', '.temp', '.supply', 'in=V1', 'out=a', 'load=R1', '.figure', 'sag', 'ripple', 'method=ac', 'depth=20%',
  '.limit', 'line.delta', 'pd.Q1', '.spread', 'm.BV', 'gauss', '.end', 'dc', 'ac', 'sin', 'pulse', 'pwl', 'pmax=1', 'ic=0', 'area=2', 'fromic',
];
const soup = fc.array(fc.constantFrom(...TOKENS), { maxLength: 120 }).map((t) => `title\n${t.join('')}`);

type Mutation = (s: string, r: number, x: string) => string;
const MUTATIONS: readonly Mutation[] = [
  (s, r) => s.slice(0, r % (s.length + 1)),
  (s, r, x) => { const i = r % (s.length + 1); return s.slice(0, i) + x + s.slice(i); },
  (s, r) => { const i = r % (s.length + 1); const j = Math.min(s.length, i + 1 + (r % 7)); return s.slice(0, i) + s.slice(j); },
  (s, r) => { const lines = s.split('\n'); const k = r % lines.length; lines.splice(k, 0, lines[k] ?? ''); return lines.join('\n'); },
  (s, r) => { const lines = s.split('\n'); const k = r % lines.length; const m = (r >> 3) % lines.length; [lines[k], lines[m]] = [lines[m] ?? '', lines[k] ?? '']; return lines.join('\n'); },
];
const mutated = fc.tuple(netlistArb, fc.array(fc.tuple(fc.nat({ max: MUTATIONS.length - 1 }), fc.nat(), fc.constantFrom(...TOKENS)), { minLength: 1, maxLength: 6 }))
  .map(([n, ms]) => ms.reduce((s, [k, r, x]) => (MUTATIONS[k] as Mutation)(s, r, x), printNetlist(n)));

describe('the reader never throws', () => {
  test('property: random UTF-16 code units (NULs, lone surrogates...)', () => {
    fc.assert(fc.property(codeUnits, wellFormed), { seed, numRuns: 1000 });
  });
  test('property: random bytes decoded as UTF-8 and as Latin-1', () => {
    fc.assert(fc.property(bytes, (b) => wellFormed(new TextDecoder().decode(b)) && wellFormed(String.fromCharCode(...b))), { seed, numRuns: 1000 });
  });
  test('property: netlist-flavoured token soup', () => {
    fc.assert(fc.property(soup, wellFormed), { seed, numRuns: 3000 });
  });
  test('property: random mutations of valid netlists', () => {
    fc.assert(fc.property(mutated, wellFormed), { seed, numRuns: 1000 });
  });
  test('pathological inputs', () => {
    const cases = [
      `t\nR1 a b {${'('.repeat(100000)}1${')'.repeat(100000)}}`,
      `t\nR1 a b {${'1+'.repeat(200000)}1}`,
      `t\nV1 a 0 pwl(${'0 0 '.repeat(50000)})`,
      `t\n${'.subckt s a\n'.repeat(1000)}`,
      `t\n${'+ x\n'.repeat(20000)}`,
      `t\nR1 a 0 1k\n${'+ '.repeat(20000)}`,
      `t\nX1 ${'n '.repeat(100000)}sub`,
      '\u0000'.repeat(10000),
      '\ud800\udc00\udfff\ud800'.repeat(1000),
      `t\n.param ${Array.from({ length: 20000 }, (_, k) => `p${k}=${k}`).join(' ')}`,
      `t\nR1 a b {min(${'1,'.repeat(200000)}1)}`,
    ];
    for (const text of cases) expect(wellFormed(text)).toBe(true);
    expect(wellFormed(undefined as unknown as string)).toBe(true);
  });
});
