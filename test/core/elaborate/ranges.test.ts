/**
 * Valid ranges of model parameters and element values (docs/models.md,
 * "Valid ranges"), checked at elaboration with an error at the parameter's
 * own line and column. The expected table is written out here from the
 * docs, not read from the code's tables; each bound is probed on both sides.
 * The ranges are engineering choices (common practice, no source) except
 * where the equations need them: IS, N, NBV, VJ > 0 (they divide or sit
 * under a logarithm in models.md), M < 1 (the depletion form's 1/(1 − M)).
 */
import { describe, expect, test } from 'vitest';
import { parseNetlist } from '@railcheck/core';
import { elaborationErrors, flatten } from './support.js';

/** docs/models.md, "Valid ranges": [parameter, a value just outside, a value just inside]. */
const DIODE: ReadonlyArray<readonly [string, number, number]> = [
  ['IS', 0, 1e-20], ['N', 0, 0.5], ['RS', -1, 0], ['BV', -5, 0.1], ['IBV', 0, 1e-9], ['NBV', 0, 0.5],
  ['CJO', -1e-12, 0], ['VJ', 0, 0.2], ['M', 1, 0.9], ['M', -0.1, 0], ['TT', -1e-9, 0], ['EG', 0, 0.6], ['PMAX', 0, 0.1],
];
const BJT: ReadonlyArray<readonly [string, number, number]> = [
  ['IS', 0, 1e-18], ['BF', 0, 1], ['BR', 0, 0.1], ['NF', 0, 1], ['NR', 0, 1], ['VAF', -50, 10], ['VAR', 0, 5],
  ['RB', -1, 0], ['RC', -1, 0], ['RE', -1, 0], ['CJE', -1e-12, 0], ['CJC', -1e-12, 0], ['VJE', 0, 0.5], ['VJC', 0, 0.5],
  ['MJE', 1, 0.5], ['MJC', -0.2, 0.33], ['TF', -1e-9, 0], ['TR', -1e-9, 0], ['EG', 0, 1.1], ['PMAX', -1, 0.5],
];

const diodeStage = (param: string, value: number): string => `Zener check\nV1 in 0 10\nR1 in a 1k\nD1 a 0 dm\n.model dm D (${param}=${value})\n`;
const bjtStage = (param: string, value: number): string => `Follower check\nV1 c 0 10\nR1 c b 10k\nQ1 c b e qn\nR2 e 0 1k\n.model qn NPN (${param}=${value})\n`;

describe('model parameters', () => {
  test('the example of the brief: BV=-5 is an error at the .model line, column of BV', () => {
    const errs = elaborationErrors('Bad zener\nV1 in 0 10\nR1 in a 1k\nD1 a 0 dm\n.model dm D (BV=-5)\n');
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'out-of-range', pos: { file: 'e.cir', line: 5, column: 14 } });
    expect(errs[0]!.message).toContain('BV');
    expect(errs[0]!.message).toContain('.model dm');
    expect(errs[0]!.expected).toBe('BV > 0');
  });

  for (const [p, bad, good] of DIODE) {
    test(`diode ${p}: ${bad} refused, ${good} accepted`, () => {
      const errs = elaborationErrors(diodeStage(p, bad));
      expect(errs.map((e) => e.code)).toEqual(['out-of-range']);
      expect(errs[0]!.message).toContain(`${p}=`);
      expect(() => flatten(diodeStage(p, good))).not.toThrow();
    });
  }

  for (const [p, bad, good] of BJT) {
    test(`transistor ${p}: ${bad} refused, ${good} accepted`, () => {
      const errs = elaborationErrors(bjtStage(p, bad));
      expect(errs.map((e) => e.code)).toEqual(['out-of-range']);
      expect(() => flatten(bjtStage(p, good))).not.toThrow();
    });
  }

  test('XTI, XTB and TBV take any finite value (temperature exponents may be negative)', () => {
    expect(() => flatten(diodeStage('TBV', -1e-3))).not.toThrow();
    expect(() => flatten(diodeStage('XTI', -2))).not.toThrow();
    expect(() => flatten(bjtStage('XTB', -1.5))).not.toThrow();
  });

  test('a parameter given by an expression is checked once evaluated, and a model used twice is reported once', () => {
    const errs = elaborationErrors('Expr\n.param bv0=-3\nV1 in 0 10\nR1 in a 1k\nD1 a 0 dm\nD2 a 0 dm\n.model dm D (IS=1e-14 BV={bv0})\n');
    expect(errs).toHaveLength(1);
    expect(errs[0]).toMatchObject({ code: 'out-of-range', pos: { line: 7, column: 23 } });
  });
});

describe('element values', () => {
  test('capacitance ≥ 0 and inductance > 0, checked on expressions at elaboration', () => {
    const c = elaborationErrors('C\n.param c0=-1u\nV1 a 0 1\nR1 a b 1k\nC1 b 0 {c0}\n');
    expect(c[0]).toMatchObject({ code: 'out-of-range', pos: { line: 5 } });
    expect(c[0]!.expected).toBe('capacitance ≥ 0 and ≤ 1e4');
    const l = elaborationErrors('L\n.param l0=0\nV1 a 0 1\nR1 a b 1k\nL1 b 0 {l0}\n');
    expect(l[0]!.expected).toBe('inductance > 0 and ≤ 1e4');
    expect(() => flatten('C0\nV1 a 0 1\nR1 a b 1k\nC1 b 0 0\n')).not.toThrow();
  });

  // Plausibility bounds (docs/models.md, "Valid ranges"; common practice, no source): values whose
  // products overflow doubles or swamp every other stamp, found by the fuzz suite (a 1e227 V source's
  // power came out as -Infinity; a 5e292 Ω resistor left a sine-fed stage searching for minutes).
  test.each([
    ['R1 a 0 {5e292}', 'resistance'],
    ['R1 a 0 {5e-72}', 'resistance'],
    ['V1 a 0 1e227', 'dc value'],
    ['V1 a 0 sin(0 1e7 50)', 'sin amplitude'],
    ['V1 a 0 sin(0 1 2e9)', 'sin frequency'],
    ['V1 a 0 pulse(0 -2e6 0 1u 1u 1u 10u)', 'pulse level v2'],
    ['V1 a 0 pwl(0 0 1 1e300)', 'pwl level'],
    ['E1 a 0 b 0 {1e13}', 'gain'],
  ])('%s is refused (%s)', (line, what) => {
    const errs = elaborationErrors(`Big\n${line.startsWith('V1') ? '' : 'V1 b 0 1\nR2 b 0 1k\n'}${line}\nR9 a 0 1k\n`);
    expect(errs.length).toBeGreaterThan(0);
    expect(errs[0]).toMatchObject({ code: 'out-of-range', pos: { line: line.startsWith('V1') ? 2 : 4 } });
    expect(errs[0]!.message).toContain(what);
  });

  test('area > 0 and pmax > 0', () => {
    expect(elaborationErrors('Area\nV1 a 0 1\nR1 a b 1k\nD1 b 0 dm {-2}\n.model dm D\n')[0]!.expected).toBe('area > 0 and ≤ 1e6');
    expect(elaborationErrors('Rating\nV1 a 0 1\nR1 a b 1k pmax={0}\n')[0]!.expected).toBe('power rating (pmax) > 0 and ≤ 1e6');
  });
});

describe('resistance > 0', () => {
  test('a negative resistor is refused: by the reader at its value, and as an expression at elaboration', () => {
    const parsed = parseNetlist('R\nV1 a 0 1\nR1 a 0 -1k\n', { file: 'e.cir' });
    expect(parsed.ok).toBe(false);
    if (!parsed.ok) expect(parsed.errors[0]).toMatchObject({ code: 'bad-value', pos: { line: 3, column: 8 } });
    const errs = elaborationErrors('R\n.param r0=-1k\nV1 a 0 1\nR1 a 0 {r0}\n');
    expect(errs[0]).toMatchObject({ code: 'out-of-range', pos: { line: 4 } });
    expect(errs[0]!.expected).toBe('resistance ≥ 1e-9 and ≤ 1e15');
    expect(elaborationErrors('R\n.param r0=0\nV1 a 0 1\nR1 a 0 {r0}\n')[0]!.code).toBe('zero-resistance');
    expect(() => flatten('R\nV1 a 0 1\nR1 a 0 1u\n')).not.toThrow();
  });
});

/**
 * Source waveforms and small-signal magnitudes (docs/models.md, "Valid
 * ranges"; docs/netlist.md, "Waveforms"): each refusal at the argument's
 * own column. [source line, code, the argument text whose column the error has].
 */
const WAVEFORMS: ReadonlyArray<readonly [string, string, string]> = [
  ['V1 a 0 pulse(0 1 0 1u 1u -5u 20u)', 'out-of-range', '-5u'],
  ['V1 a 0 pulse(0 1 -1m 1u 1u 5u 20u)', 'out-of-range', '-1m'],
  ['V1 a 0 pulse(0 1 0 -1u 1u 5u 20u)', 'out-of-range', '-1u'],
  ['V1 a 0 pulse(0 1 0 1u -2u 5u 20u)', 'out-of-range', '-2u'],
  ['V1 a 0 pulse(0 1 0 1u 1u 5u -20u)', 'out-of-range', '-20u'],
  ['V1 a 0 pulse(0 1 0 1u 1u 5u 0)', 'out-of-range', '0)'],
  ['V1 a 0 pulse(0 1 0 1u 1u 5u 6u)', 'out-of-range', '6u'],
  ['V1 a 0 sin(0 1 0)', 'out-of-range', '0)'],
  ['V1 a 0 sin(0 1 -50)', 'out-of-range', '-50'],
  ['V1 a 0 sin(0 1 50 -1m)', 'out-of-range', '-1m'],
  ['V1 a 0 sin(0 1 50 0 -3)', 'out-of-range', '-3'],
  ['V1 a 0 pwl({-1m} 0 1m 1)', 'out-of-range', '{-1m}'],
  ['V1 a 0 pwl(0 0 {2m} 1 {1m} 2)', 'pwl-order', '{1m}'],
  ['V1 a 0 pwl(0 0 1m 1 {1m} 2)', 'pwl-order', '{1m}'],
  ['V1 a 0 dc 1 ac -1', 'out-of-range', 'V1'],
  ['I1 a 0 pulse(0 1m 0 1u 1u -5u 20u)', 'out-of-range', '-5u'],
];

describe('source waveforms', () => {
  for (const [line, code, at] of WAVEFORMS) {
    test(`${line}: ${code} at ${at}`, () => {
      const errs = elaborationErrors(`W\n${line}\nR1 a 0 1k\n`);
      expect(errs).toHaveLength(1);
      expect(errs[0]).toMatchObject({ code, pos: { line: 2, column: line.lastIndexOf(at) + 1 } });
    });
  }

  test('boundary values are accepted', () => {
    for (const line of [
      'V1 a 0 pulse(0 1 0 1u 1u 5u 7u)', // the period exactly holds rise, width and fall
      'V1 a 0 pulse(0 1 0 0 0 0 1u)',
      'V1 a 0 pulse(0 1)',
      'V1 a 0 sin(0 -1 1m 0 0 -90)', // negative amplitude and phase are meaningful
      'V1 a 0 pwl(0 0 {1u} 1)',
      'V1 a 0 dc 1 ac 0 -180',
    ]) expect(() => flatten(`W\n${line}\nR1 a 0 1k\n`), line).not.toThrow();
  });
});
