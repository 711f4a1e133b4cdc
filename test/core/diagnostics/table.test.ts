/**
 * A table of broken netlists (docs/netlist.md, Errors: "Every error names
 * the file, line and column, quotes the line and says what was expected";
 * "A netlist with errors runs nothing"). Each
 * case is written to a file and run twice: through runNetlistFile, and
 * through the command line `railcheck run FILE`, which must exit 2
 * (docs/output.md, Exit status) with `file:line:column`, the quoted line and,
 * where the case says so, an `expected:` part on standard error.
 */
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runNetlistFile, type Diagnostic } from '@railcheck/core';
import { cli, freshDir, STACK_LINE, writeFiles } from './support.js';

interface Case {
  readonly name: string;
  /** main.cir; line 1 is the title. */
  readonly text: string | Uint8Array;
  /** Other files of the case, relative to main.cir's folder. */
  readonly files?: Readonly<Record<string, string>>;
  /** Where the error points: file (default main.cir), 1-based line (any when absent), and column when it is pinned. */
  readonly at: { readonly file?: string; readonly line?: number; readonly column?: number };
  /** The message must match every one of these (names the culprit, shows the cycle...). */
  readonly message: readonly RegExp[];
  /** The `expected:` part must match this, where an expectation is sensible. */
  readonly expected?: RegExp;
}

/** docs/models.md, Diode: the diode parameters, which an unknown-parameter error must list (docs/netlist.md, Models). */
const DIODE_PARAMS = ['IS', 'N', 'RS', 'BV', 'IBV', 'NBV', 'CJO', 'VJ', 'M', 'TT', 'EG', 'XTI', 'TBV', 'PMAX'];

/** Deterministic "random" bytes (a linear congruential generator, Numerical Recipes constants). */
function bytes(n: number, seed: number): Uint8Array {
  const out = new Uint8Array(n);
  let s = seed >>> 0;
  for (let i = 0; i < n; i++) {
    s = (Math.imul(s, 1664525) + 1013904223) >>> 0;
    out[i] = s >>> 24;
  }
  return out;
}

const CASES: readonly Case[] = [
  { name: 'missing resistor value', text: 'Divider\nV1 a 0 5\nR1 a 0\n', at: { line: 3 }, message: [/R1/], expected: /Rname n\+ n- value/ },
  { name: 'missing source value after dc', text: 'Source\nV1 a 0 dc\nR1 a 0 1k\n', at: { line: 2 }, message: [/./], expected: /Vname/ },
  { name: 'unknown model', text: 'Clamp\nV1 a 0 1\nR1 a b 1k\nD1 b 0 nosuch\n', at: { line: 4, column: 1 }, message: [/nosuch/, /D1/], expected: /\.model nosuch/ },
  { name: 'diode bound to a transistor model', text: 'Clamp\nV1 a 0 1\nR1 a b 1k\nD1 b 0 qq\n.model qq NPN\n', at: { line: 4 }, message: [/D1/, /NPN/], expected: /\bD\b/ },
  { name: 'transistor bound to a diode model', text: 'Pass\nV1 a 0 9\nR1 a b 1k\nQ1 a b 0 dd\n.model dd D\n', at: { line: 4 }, message: [/Q1/, /\bD\b/], expected: /NPN|PNP/ },
  { name: 'unknown model parameter (lists the known ones)', text: 'Zener\n.model z D (IS=1e-14 FOO=3)\n', at: { line: 2, column: 22 }, message: [/FOO/], expected: new RegExp(DIODE_PARAMS.join(' ')) },
  { name: 'unknown subcircuit', text: 'Block\nV1 a 0 1\nR1 a 0 1k\nX1 a 0 nosuch\n', at: { line: 4, column: 1 }, message: [/nosuch/, /X1/], expected: /\.subckt nosuch/ },
  { name: 'wrong port count', text: 'Block\n.subckt two p q\nR1 p q 1k\n.ends\nV1 a 0 1\nX1 a two\n', at: { line: 6 }, message: [/X1/, /two/, /2 ports/], expected: /2 nodes/ },
  { name: 'direct subcircuit recursion', text: 'Loop\n.subckt s p\nR1 p 0 1k\nX9 p s\n.ends\nV1 a 0 1\nX1 a s\n', at: { line: 4 }, message: [/s → s/] },
  {
    name: 'indirect subcircuit recursion shows the cycle',
    text: 'Loop\n.subckt a p\nXb p b\n.ends\n.subckt b p\nXa p a\n.ends\nV1 n 0 1\nR1 n 0 1k\nX1 n a\n',
    at: { line: 6 }, message: [/a → b → a/],
  },
  {
    name: 'include cycle shows the cycle',
    text: 'Includes\nV1 a 0 1\nR1 a 0 1k\n.include "a.lib"\n',
    files: { 'a.lib': '.include "b.lib"\n', 'b.lib': '* back again\n.include "a.lib"\n' },
    at: { file: 'b.lib', line: 2, column: 10 }, message: [/a\.lib → .*b\.lib → .*a\.lib/],
  },
  { name: 'include of a missing file', text: 'Includes\n.include "nothere.lib"\n', at: { line: 2 }, message: [/nothere\.lib/] },
  // docs/parts.md: an unknown library name lists the library files (the CLI bundle finds its own copy, packages/cli/parts).
  { name: 'include of an unknown parts library file', text: 'Includes\n.include "parts:nope"\n', at: { line: 2, column: 10 }, message: [/parts:nope/, /"parts:zeners"/, /"parts:leds"/], expected: /parts:rectifiers/ },
  {
    name: 'node reached only through a capacitor',
    text: 'Floating\nV1 a 0 1\nR1 a 0 1k\nC1 a b 1u\n', at: { line: 4 }, message: [/\bb\b/, /C1/], expected: /DC path|path .*ground/,
  },
  { name: 'node fed only by a current source', text: 'Floating\nI1 0 b 1m\n', at: { line: 2 }, message: [/\bb\b/, /I1/], expected: /ground/ },
  { name: 'two voltage sources in parallel', text: 'Loop\nV1 a 0 1\nV2 a 0 2\nR1 a 0 1k\n', at: { line: 3 }, message: [/V2/, /loop/] },
  { name: 'voltage source across an inductor loop', text: 'Loop\nV1 a 0 1\nL1 a b 1m\nL2 b 0 1m\nR1 a 0 1k\n', at: { line: 4 }, message: [/L2/, /loop/] },
  { name: 'zero resistor, literal', text: 'Short\nV1 a 0 1\nR1 a 0 0\n', at: { line: 3, column: 8 }, message: [/R1/, /zero/], expected: /resistance > 0/ },
  { name: 'zero resistor, via an expression', text: 'Short\n.param a=3\nV1 x 0 1\nR1 x 0 {a-a}\n', at: { line: 4 }, message: [/R1/, /zero/], expected: /resistance > 0/ },
  { name: 'undefined parameter', text: 'Param\nV1 x 0 1\nR1 x 0 {2*rr}\n', at: { line: 3, column: 11 }, message: [/'rr'/], expected: /\.param/ },
  { name: 'undefined parameter in a .param chain', text: 'Param\n.param a=1 b={a+c}\nV1 x 0 {b}\nR1 x 0 1\n', at: { line: 2, column: 17 }, message: [/'c'/] },
  { name: '.dc of an unknown source', text: 'Sweep\nV1 x 0 1\nR1 x 0 1k\n.dc VX 0 1 0.1\n', at: { line: 4 }, message: [/VX/], expected: /V or I/ },
  { name: '.dc of a resistor', text: 'Sweep\nV1 x 0 1\nR1 x 0 1k\n.dc R1 0 1 0.1\n', at: { line: 4 }, message: [/R1/] },
  { name: '.supply input that does not exist', text: 'Stage\nV1 x 0 1\nR1 x 0 1k\n.supply in=V9 out=x\n', at: { line: 4 }, message: [/V9/] },
  { name: '.supply output node that does not exist', text: 'Stage\nV1 x 0 1\nR1 x 0 1k\n.supply in=V1 out=nowhere\n', at: { line: 4 }, message: [/nowhere/], expected: /node/ },
  { name: '.supply load that does not exist', text: 'Stage\nV1 x 0 1\nR1 x 0 1k\n.supply in=V1 out=x load=R7\n', at: { line: 4 }, message: [/R7/] },
  { name: 'F controlled by a source that does not exist', text: 'Mirror\nV1 a 0 1\nR1 a 0 1k\nF1 a 0 VNONE 2\n', at: { line: 4 }, message: [/F1/, /VNONE/] },
  { name: 'an element defined twice, in another case', text: 'Twice\nV1 a 0 1\nR1 a 0 1k\nr1 a 0 2k\n', at: { line: 4 }, message: [/r1/i, /twice/] },
  { name: 'random bytes', text: bytes(600, 7), at: {}, message: [/./] },
];

function matches(d: Diagnostic, c: Case, dir: string): boolean {
  const file = join(dir, c.at.file ?? 'main.cir');
  return d.pos?.file === file && (c.at.line === undefined || d.pos.line === c.at.line) && (c.at.column === undefined || d.pos.column === c.at.column)
    && c.message.every((re) => re.test(d.message)) && (c.expected === undefined || c.expected.test(d.expected ?? ''));
}

describe('broken netlists are refused with a precise diagnostic', () => {
  test.each(CASES)('$name', async (c) => {
    const dir = freshDir('diag');
    const paths = writeFiles(dir, { 'main.cir': c.text, ...(c.files ?? {}) });
    const main = paths['main.cir']!;

    const r = runNetlistFile(main);
    expect(r.ok).toBe(false);
    const errors = r.ok ? [] : r.errors;
    const hit = errors.find((d) => matches(d, c, dir));
    expect(hit, JSON.stringify(errors, null, 1)).toBeDefined();
    // The quoted line is the physical line the position names.
    const source = c.at.file ? c.files![c.at.file]! : c.text;
    if (typeof source === 'string') expect(hit!.lineText).toBe(source.split('\n')[hit!.pos!.line - 1]);
    else expect(typeof hit!.lineText).toBe('string');

    const run = await cli(['run', main]);
    expect(run.status).toBe(2);
    expect(run.out).toBe('');
    const where = `${join(dir, c.at.file ?? 'main.cir')}:${hit!.pos!.line}:${hit!.pos!.column}`;
    expect(run.err).toContain(where);
    expect(run.err).toContain(hit!.lineText);
    if (c.expected) expect(run.err).toMatch(/expected: /);
    expect(run.err).not.toMatch(STACK_LINE);
  });
});
