/**
 * `.supply` nodes and `.spread` lines checked at elaboration
 * (docs/netlist.md, "Power-supply directives"): each refusal is an error
 * with its code, line and column; the lines next to each boundary are
 * accepted. The rules are engineering choices (common practice, no
 * source): a rail needs two different nodes; a tolerance lies in (0, 1)
 * (100 % would take a value to zero), names something that exists and has
 * a value, and keeps a model parameter inside its valid range at ±ratio.
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist } from '@railcheck/core';
import { elaborationErrors, flatten } from './support.js';

/** A divider with a diode and a transistor; `extra` lines start at line 9. */
const circuit = (extra: readonly string[]): string =>
  ['tolerances', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', 'D1 out 0 dm', 'Q1 in out e qn', 'R3 e 0 10k', '.model dm D (M=0.9)', ...extra, ''].join('\n').replace('.model dm D (M=0.9)', '.model dm D (M=0.9)\n.model qn NPN (VAF=50)');
// Lines: 1 title, 2 V1, 3 R1, 4 R2, 5 D1, 6 Q1, 7 R3, 8 .model dm, 9 .model qn, 10 the first extra line.
const FIRST = 10;

describe('.supply nodes', () => {
  const cases: ReadonlyArray<readonly [string, RegExp]> = [
    ['.supply in=V1 out=0', /reference node itself \(ground\)/],
    ['.supply in=V1 out=gnd', /reference node itself/],
    ['.supply in=V1 out=out ref=OUT', /reference node itself/],
    ['.supply in=V1 out=out feed=out', /feed= is the output node/],
    ['.supply in=V1 out=out feed=0', /feed= is the reference node/],
  ];
  for (const [line, message] of cases) {
    test(`${line}: refused at its line`, () => {
      const errs = elaborationErrors(circuit([line]));
      expect(errs).toHaveLength(1);
      expect(errs[0]).toMatchObject({ code: 'bad-supply-nodes', pos: { line: FIRST, column: 1 } });
      expect(errs[0]!.message).toMatch(message);
    });
  }
  test('out against another node, with a feed of its own, is accepted', () => {
    expect(() => flatten(circuit(['.supply in=V1 out=out ref=e feed=in']))).not.toThrow();
  });
});

describe('.spread', () => {
  /** [line, code, column]. */
  const refused: ReadonlyArray<readonly [string, string, number]> = [
    ['.spread R9 5%', 'unknown-spread-target', 1],
    ['.spread nomodel.IS 5%', 'unknown-model', 1],
    ['.spread dm.BF 5%', 'unknown-parameter', 1],
    ['.spread dm.BV 5%', 'bad-spread-target', 1],
    ['.spread qn.VAR 5%', 'bad-spread-target', 1],
    ['.spread dm.PMAX 5%', 'bad-spread-target', 1],
    ['.spread dm.M 20%', 'out-of-range', 14],
    ['.spread R1 {0}', 'out-of-range', 12],
    ['.spread R1 {1}', 'out-of-range', 12],
  ];
  for (const [line, code, column] of refused) {
    test(`${line}: ${code} at column ${column}`, () => {
      const errs = elaborationErrors(circuit([line]));
      expect(errs).toHaveLength(1);
      expect(errs[0]).toMatchObject({ code, pos: { line: FIRST, column } });
    });
  }

  test('a second .spread on the same target is refused at its line', () => {
    const errs = elaborationErrors(circuit(['.spread R1 1%', '.spread r1 2%']));
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'duplicate-spread', pos: { line: FIRST + 1 } });
  });

  test('plain ratios of 0 and 100 % are refused by the reader, at the ratio', () => {
    for (const ratio of ['0', '100%', '1']) {
      const r = parseNetlist(circuit([`.spread R1 ${ratio}`]), { file: 'e.cir' });
      expect(r.ok).toBe(false);
      if (r.ok) continue;
      expect(r.errors[0]).toMatchObject({ code: 'bad-value', pos: { line: FIRST, column: 12 } });
    }
  });

  test('elements with a value and model parameters with one, inside their ranges, are accepted', () => {
    const c = flatten(circuit(['.spread R1 5%', '.spread V1 1% gauss', '.spread dm.IS 99%', '.spread dm.M 11%', '.spread qn.VAF 0.2', '.spread qn.BF 30% gauss']));
    expect(c.spreads.map((s) => [s.target, s.ratio])).toEqual([['r1', 0.05], ['v1', 0.01], ['dm.is', 0.99], ['dm.m', 0.11], ['qn.vaf', 0.2], ['qn.bf', 0.3]]);
  });
});
