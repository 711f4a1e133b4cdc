/**
 * Broken netlists (docs/netlist.md, Errors): each is refused with a
 * diagnostic that names the file, line and column, quotes the line and says
 * what was expected; all mistakes in a file are reported in one read.
 */
import { describe, expect, test } from 'vitest';
import { formatDiagnostic } from '../../../packages/core/src/errors.js';
import { parseNetlist } from '../../../packages/core/src/netlist/index.js';
import { mustFail } from './support.js';

interface Case {
  readonly name: string;
  /** The body; line 1 (the title) is added in front, so body line k is file line k+1. */
  readonly body: string;
  readonly code: string;
  /** File the diagnostic names; default '<input>'. */
  readonly file?: string;
  readonly line: number;
  readonly column: number;
  /** A pattern the `expected` text must match, where one makes sense. */
  readonly expected?: RegExp;
  readonly message?: RegExp;
}

const CASES: readonly Case[] = [
  { name: 'missing resistor value', body: 'R1 a b', code: 'wrong-node-count', line: 2, column: 7, expected: /Rname n\+ n- value/ },
  { name: 'missing capacitor value after nodes', body: 'C1 a 0 ic=1', code: 'wrong-node-count', line: 2, column: 12, expected: /Cname/ },
  { name: 'missing dc value after the keyword', body: 'V1 a 0 dc', code: 'missing-value', line: 2, column: 10, expected: /Vname/ },
  { name: 'missing ac magnitude', body: 'V1 a 0 ac', code: 'missing-value', line: 2, column: 10, expected: /ac mag/ },
  { name: 'missing value after key=', body: 'C1 a 0 1u ic=', code: 'missing-value', line: 2, column: 14, expected: /ic/ },
  { name: 'bad number', body: 'R1 a b 4k7', code: 'bad-number', line: 2, column: 8, expected: /number/, message: /4\.7k, not 4k7/ },
  { name: 'number out of range', body: 'C1 a b 1e999', code: 'bad-number', line: 2, column: 8, message: /out of range/ },
  { name: 'percent where no ratio is expected', body: 'R1 a b 5%', code: 'bad-number', line: 2, column: 8, message: /ratio/ },
  { name: 'zero resistor', body: 'R1 a b 0', code: 'zero-resistance', line: 2, column: 8, message: /must not be zero/ },
  { name: 'zero resistor written with suffix', body: 'R1 a b 0k', code: 'zero-resistance', line: 2, column: 8 },
  { name: 'wrong node count on Q', body: 'Q1 c b qn', code: 'wrong-node-count', line: 2, column: 10, expected: /collector base emitter/ },
  { name: 'wrong node count on E', body: 'E1 out 0 in 2', code: 'wrong-node-count', line: 2, column: 14, expected: /nc\+ nc-/ },
  { name: 'too many fields on R', body: 'R1 a b c 1k', code: 'too-many-fields', line: 2, column: 10, expected: /Rname/ },
  { name: 'option not accepted on an element', body: 'R1 a b 1k ic=0', code: 'unknown-key', line: 2, column: 11, expected: /pmax=/ },
  { name: 'unknown element letter', body: 'Z1 a b 1k', code: 'unknown-element', line: 2, column: 1, expected: /R C L K V I D Q E G F H X/ },
  { name: 'F controlled by a non-source', body: 'F1 a 0 R1 2', code: 'bad-control', line: 2, column: 8, expected: /V element/ },
  { name: 'unknown model parameter lists the known ones', body: '.model z D (IS=1e-14 BVX=5)', code: 'unknown-parameter', line: 2, column: 22, expected: /IS N RS BV IBV NBV CJO VJ M TT EG XTI TBV PMAX/ },
  { name: 'unknown BJT parameter', body: '.model q NPN BF=100 BV=3', code: 'unknown-parameter', line: 2, column: 21, expected: /BF BR NF NR VAF/ },
  { name: 'unknown model type', body: '.model z NMOS', code: 'unknown-model-type', line: 2, column: 10, expected: /D, NPN or PNP/ },
  { name: 'model parenthesis never closed', body: '.model z D (IS=1', code: 'syntax', line: 2, column: 17, expected: /\)/ },
  { name: 'unterminated subckt', body: '.subckt amp in out\nR1 in out 1k', code: 'unterminated-subckt', line: 2, column: 1, expected: /\.ends amp/ },
  { name: 'stray .ends', body: 'R1 a 0 1k\n.ends', code: 'stray-ends', line: 3, column: 1, expected: /\.subckt/ },
  { name: '.ends naming another definition', body: '.subckt a p\n.ends b', code: 'ends-mismatch', line: 3, column: 7, expected: /\.ends a/ },
  { name: 'bad expression', body: 'R1 a b {1 + * 2}', code: 'bad-expression', line: 2, column: 13, expected: /number, a parameter name/ },
  { name: 'unclosed expression brace', body: 'R1 a b {1 + 2', code: 'syntax', line: 2, column: 8, expected: /\}/ },
  { name: 'unknown function', body: '.param x={sine(1)}', code: 'bad-expression', line: 2, column: 11, expected: /sqrt, exp, ln/ },
  // The cycle closes inside the included file, so that is where it is reported.
  { name: 'include cycle', body: '.include "self.cir"', code: 'include-cycle', file: 'self.cir', line: 1, column: 10, message: /self\.cir → self\.cir/ },
  { name: 'unknown directive', body: '.options reltol=1e-3', code: 'unknown-directive', line: 2, column: 1, expected: /\.model .*\.spread/ },
  { name: '% in a limit value', body: 'V1 in 0 5\n.supply in=V1 out=in\n.figure load\n.limit load.pct < 1%', code: 'bad-number', line: 5, column: 19, message: /% sign is not allowed in a limit value/ },
  { name: 'limit on a figure not asked for', body: 'V1 in 0 5\n.supply in=V1 out=in\n.limit line.delta < 1m', code: 'limit-without-figure', line: 4, column: 1, expected: /\.figure line/ },
  { name: 'limit on an unknown figure', body: '.limit line.wobble < 1', code: 'unknown-figure', line: 2, column: 8 },
  { name: 'limit without comparison', body: '.limit line.delta = 1', code: 'syntax', line: 2, column: 19, expected: /< <= > >=/ },
  { name: 'figure without supply', body: '.figure line', code: 'figure-without-supply', line: 2, column: 1, expected: /\.supply/ },
  { name: 'unknown figure key', body: 'V1 a 0 1\n.supply in=V1 out=a\n.figure dropout depth=2', code: 'unknown-key', line: 4, column: 17, expected: /fall/ },
  { name: 'supply input not a V source', body: '.supply in=R1 out=a', code: 'bad-source', line: 2, column: 12 },
  { name: 'supply without out', body: '.supply in=V1', code: 'missing-item', line: 2, column: 14, expected: /out=/ },
  { name: 'unknown .tran flag', body: '.tran 1u 1m warm', code: 'unknown-flag', line: 2, column: 13, expected: /fromic/ },
  { name: 'negative tstep', body: '.tran -1u 1m', code: 'bad-value', line: 2, column: 7 },
  { name: 'ac spacing', body: '.ac oct 10 1 1k', code: 'syntax', line: 2, column: 5, expected: /dec/ },
  { name: '.dc on a resistor', body: '.dc R1 0 1 0.1', code: 'bad-source', line: 2, column: 5 },
  { name: 'sin with too few arguments', body: 'V1 a 0 sin(0 1)', code: 'waveform-args', line: 2, column: 8, expected: /sin\(vo va freq/ },
  { name: 'pwl with an odd count', body: 'V1 a 0 pwl(0 1 2)', code: 'waveform-args', line: 2, column: 8, expected: /pwl/ },
  { name: 'pwl times going back', body: 'V1 a 0 pwl(0 0 2m 1 1m 0)', code: 'pwl-order', line: 2, column: 21 },
  { name: 'waveform list never closed', body: 'V1 a 0 pulse(0 5 1m', code: 'syntax', line: 2, column: 20, expected: /\)/ },
  { name: 'duplicate element, case-insensitively', body: 'R1 a 0 1k\nr1 b 0 1k', code: 'duplicate-name', line: 3, column: 1, message: /first at <input>:2/ },
  { name: 'analysis inside a subckt', body: '.subckt s a\n.op\n.ends', code: 'not-in-subckt', line: 3, column: 1 },
  { name: 'stray continuation', body: '+ 1k', code: 'stray-continuation', line: 2, column: 1 },
  { name: 'NUL byte', body: 'R1 a\u0000 0 1k', code: 'bad-character', line: 2, column: 5, message: /U\+0000/ },
  { name: 'unpaired surrogate', body: 'R1 a\ud800 0 1k', code: 'bad-character', line: 2, column: 5, message: /surrogate/ },
  { name: 'spread on a diode element', body: '.spread D1 5%', code: 'bad-target', line: 2, column: 9 },
  { name: 'spread on an unknown model parameter', body: '.spread zref.QQ 5%', code: 'unknown-parameter', line: 2, column: 9 },
  { name: 'param name reserved for a function', body: '.param sqrt=2', code: 'bad-name', line: 2, column: 8 },
];

describe('broken netlists', () => {
  test.each(CASES)('$name', (c) => {
    const errors = mustFail(`broken stage\n${c.body}`, { readFile: (p) => (p.endsWith('self.cir') ? '.include "self.cir"' : undefined) });
    const e = errors[0];
    expect(e, errors.map(formatDiagnostic).join('\n')).toMatchObject({ severity: 'error', code: c.code, pos: { file: c.file ?? '<input>', line: c.line, column: c.column } });
    const physical = `broken stage\n${c.body}`.split('\n')[c.line - 1];
    if (c.code !== 'include-cycle') expect(e?.lineText).toBe(physical);
    if (c.expected) expect(e?.expected).toMatch(c.expected);
    if (c.message) expect(e?.message).toMatch(c.message);
    // Every diagnostic renders as file:line:col with the quoted line and a caret.
    expect(formatDiagnostic(e as NonNullable<typeof e>)).toMatch(new RegExp(`^${c.file ?? '<input>'}:${c.line}:${c.column}: error: `));
  });
});

describe('recovery', () => {
  test('every mistake in a file is reported, each at its own line, and good cards around them do not add errors', () => {
    const text = [
      'several mistakes',
      'R1 a b 0', // 2: zero
      'R2 a b 1k', // fine
      'Q1 c b', // 4: node count
      '.model m D (XX=1)', // 5: unknown parameter
      'C1 a 0 {1+}', // 6: bad expression
      '.frobnicate', // 7: unknown directive
      'V1 a 0 5', // fine
      '.limit line.delta <= 5%', // 9: % in a limit
      '.subckt open p', // 10: never closed
    ].join('\n');
    const errors = mustFail(text);
    expect(errors.map((e) => [e.code, e.pos?.line])).toEqual([
      ['zero-resistance', 2],
      ['wrong-node-count', 4],
      ['unknown-parameter', 5],
      ['bad-expression', 6],
      ['unknown-directive', 7],
      ['bad-number', 9],
      ['unterminated-subckt', 10],
    ]);
  });

  test('a flood of errors is capped, still without throwing', () => {
    const r = parseNetlist(`t\n${'Z1 a b\n'.repeat(5000)}`);
    expect(r.ok).toBe(false);
    if (!r.ok) {
      expect(r.errors.length).toBeLessThanOrEqual(1001);
      expect(r.errors[r.errors.length - 1]?.code).toBe('too-many-errors');
    }
  });

  test('a huge input is refused up front', () => {
    const r = parseNetlist('x'.repeat(33 * 1024 * 1024));
    expect(!r.ok && r.errors[0]?.code).toBe('input-too-large');
  });

  test('warnings do not make a netlist fail', () => {
    const r = parseNetlist('R1 a 0 1k\nR2 a 0 1k');
    expect(r.ok).toBe(true);
    expect(r.warnings).toHaveLength(1);
  });
});
