/**
 * Dissipation and efficiency of divider stages, by hand: P = V²/R for each
 * resistor (Joule's law with Ohm's law), the divider voltages from
 * Thévenin's theorem, the largest over nominal and the corners figures.md
 * names (highest input with the lowest and the highest load). A series
 * diode's power is Vd·I from the explicit Lambert-W solution of the
 * series diode–resistor circuit (Banwell and Jayakumar, Electronics
 * Letters 36(4), 2000). Ratings: `pmax=` on an element, `PMAX` on a model.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { dividerThevenin, dividerWithCurrent, dividerWithResistor, figuresOf, logUniform, num, relErr, seedFor, seriesDiodeCurrent, value, VT_27 } from './support.js';

const seed = seedFor('measure/linear/dissipation');

interface Corner { vin: number; amps: number }

/** Nominal, then (high input, lowest load) and (high input, highest load): figures.md, "dissipation". */
const corners = (vin: number, inom: number, high: number, range: readonly [number, number]): Corner[] => [
  { vin, amps: inom },
  { vin: high, amps: Math.min(...range) },
  { vin: high, amps: Math.max(...range) },
];

describe('divider with a current-source load', () => {
  test('pd.R1, pd.R2 are the largest V²/R over the corners; efficiency = Vout·I / (Vin·I_in)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 3, max: 100, noNaN: true }), logUniform(10, 100e3), logUniform(10, 100e3), fc.double({ min: 0.05, max: 0.7, noNaN: true }),
        fc.option(fc.record({ high: fc.double({ min: 1.01, max: 1.5, noNaN: true }), lo: fc.double({ min: 0, max: 0.5, noNaN: true }), hi: fc.double({ min: 0.6, max: 1.2, noNaN: true }) }), { nil: undefined }),
        (vin, r1, r2, share, ranges) => {
          const { vth, rth } = dividerThevenin(vin, r1, r2);
          const inom = (share * vth) / rth;
          const figs = ['.figure dissipation'];
          // With line and load figures their ranges set the corners (docs/figures.md); else 1.1 × nominal and 0…Inom.
          if (ranges) figs.push(`.figure line to=${num(ranges.high * vin)}`, `.figure load from=${num(ranges.lo * inom)} to=${num(ranges.hi * inom)}`);
          const { figures } = figuresOf(['divider', `V1 in 0 ${num(vin)}`, `R1 in out ${num(r1)}`, `R2 out 0 ${num(r2)}`, `IL out 0 ${num(inom)}`, '.supply in=V1 out=out load=IL', ...figs]);
          const high = (ranges?.high ?? 1.1) * vin;
          const range = ranges ? ([ranges.lo * inom, ranges.hi * inom] as const) : ([0, inom] as const);
          const p = corners(vin, inom, high, range).map((c) => {
            const vout = dividerWithCurrent(c.vin, r1, r2, c.amps);
            return { r1: (c.vin - vout) ** 2 / r1, r2: vout ** 2 / r2 };
          });
          // Rounding only: worst observed 1.0e-14, 8.9e-16 and 3.9e-15 over FC_SEED 20261201, 1–13 and 424242; bounds 2.5e-14, 2.2e-15, 1e-14.
          expect(relErr(value(figures, 'pd.R1'), Math.max(...p.map((x) => x.r1)))).toBeLessThan(2.5e-14);
          expect(relErr(value(figures, 'pd.R2'), Math.max(...p.map((x) => x.r2)))).toBeLessThan(2.2e-15);
          const vout = dividerWithCurrent(vin, r1, r2, inom);
          expect(relErr(value(figures, 'efficiency'), (vout * inom) / ((vin * (vin - vout)) / r1))).toBeLessThan(1e-14);
          // Only resistors, diodes and transistors are listed: no pd.IL, no pd.V1.
          expect(Object.keys(figures.values).filter((n) => n.startsWith('pd.')).sort()).toEqual(['pd.R1', 'pd.R2']);
        },
      ),
      { seed, numRuns: 25 },
    );
  });

  test('the worst corner by hand: R2 at the highest input with no load, R1 at the highest input and load', () => {
    // 20 V, R1 = 1 kΩ, R2 = 3 kΩ, 5 mA: Vth = 15 V, Rth = 750 Ω. At 22 V: Vout = 16.5 V (0 mA), 12.75 V (5 mA).
    const { figures } = figuresOf(['divider', 'V1 in 0 20', 'R1 in out 1k', 'R2 out 0 3k', 'IL out 0 5m', '.supply in=V1 out=out load=IL', '.figure dissipation']);
    // Observed 0, 3.2e-16 and 0; bounds 2·eps, 8e-16, 2·eps.
    expect(relErr(value(figures, 'pd.R2'), 16.5 ** 2 / 3e3)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(relErr(value(figures, 'pd.R1'), (22 - 12.75) ** 2 / 1e3)).toBeLessThan(8e-16);
    // Nominal: Vout = 11.25 V, I_in = 8.75 mA; efficiency = 11.25·5m / (20·8.75m) = 0.3214.
    expect(relErr(value(figures, 'efficiency'), (11.25 * 5e-3) / (20 * 8.75e-3))).toBeLessThanOrEqual(2 * Number.EPSILON);
  });
});

describe('divider with a resistor load', () => {
  test('pd.RL at the highest input with RL itself; efficiency = (Vout²/RL) / (Vin·I_in)', () => {
    // 12 V, R1 = 220 Ω, R2 = 1 kΩ, RL = 470 Ω. Range 0 (open) … Inom (RL): the worst corners are at 13.2 V.
    const r1 = 220, r2 = 1e3, rl = 470;
    const { figures } = figuresOf(['divider', 'V1 in 0 12', `R1 in out ${r1}`, `R2 out 0 ${r2}`, `RL out 0 ${rl}`, '.supply in=V1 out=out load=RL', '.figure dissipation']);
    const vHighOpen = dividerWithResistor(13.2, r1, r2, Infinity);
    const vHighLoaded = dividerWithResistor(13.2, r1, r2, rl);
    // Observed 2.1e-16, 0, 2.1e-16 and 2.8e-16; bounds 5e-16, 2·eps, 5e-16, 7e-16.
    expect(relErr(value(figures, 'pd.RL'), vHighLoaded ** 2 / rl)).toBeLessThan(5e-16);
    expect(relErr(value(figures, 'pd.R2'), vHighOpen ** 2 / r2)).toBeLessThanOrEqual(2 * Number.EPSILON);
    expect(relErr(value(figures, 'pd.R1'), (13.2 - vHighLoaded) ** 2 / r1)).toBeLessThan(5e-16);
    const v = dividerWithResistor(12, r1, r2, rl);
    expect(relErr(value(figures, 'efficiency'), v ** 2 / rl / ((12 * (12 - v)) / r1))).toBeLessThan(7e-16);
  });
});

describe('ratings', () => {
  // 20 V, 1 kΩ / 3 kΩ, 5 mA: P_R1 = 76.56 mW at nominal, 85.56 mW at 22 V and 5 mA (see above).
  const stage = (r1Rating: string): string[] => ['divider', 'V1 in 0 20', `R1 in out 1k ${r1Rating}`, 'R2 out 0 3k', 'IL out 0 5m', '.supply in=V1 out=out load=IL', '.figure dissipation'];
  const overRating = (lines: string[]) => figuresOf(lines).warnings.filter((w) => w.code === 'over-rating');

  test('a pmax below the dissipation warns, naming the element; one above it does not', () => {
    const w = overRating(stage('pmax=50m'));
    expect(w.length).toBeGreaterThan(0);
    expect(w.every((d) => /\bR1\b/.test(d.message))).toBe(true);
    expect(overRating(stage('pmax=100m'))).toHaveLength(0);
  });

  test('the rating is checked at the worst corner, not only at nominal', () => {
    // 80 mW lies between the nominal 76.56 mW and the corner 85.56 mW.
    expect(((20 - 11.25) ** 2) / 1e3).toBeLessThan(0.08);
    expect(overRating(stage('pmax=80m')).map((d) => d.message).join('\n')).toMatch(/\bR1\b/);
  });

  test("a diode model's PMAX: pd.D1 = Vd·I at the worst corner (Lambert W), and the warning names D1", () => {
    // V1 – D1 – R1 (470 Ω) – out – R2 (1 kΩ) ∥ IL (1 mA). Around the loop: Vin + IL·R2 − Vd = I·(R1 + R2),
    // the series diode circuit with Vs = Vin + IL·R2 and R = 1470 Ω.
    const IS = 1e-14;
    const pd = (vin: number, il: number): number => {
      const vs = vin + il * 1e3;
      const i = seriesDiodeCurrent(vs, 1470, IS, VT_27);
      return (vs - i * 1470) * i;
    };
    const worst = Math.max(pd(12, 1e-3), pd(13.2, 0), pd(13.2, 1e-3));
    expect(worst).toBe(pd(13.2, 1e-3));
    const lines = (rating: string): string[] => ['series diode', 'V1 in 0 12', 'D1 in a DM', 'R1 a out 470', 'R2 out 0 1k', 'IL out 0 1m', `.model DM D (IS=${IS} ${rating})`, '.supply in=V1 out=out load=IL', '.figure dissipation'];
    const { figures, warnings } = figuresOf(lines(`PMAX=${num(pd(12, 1e-3) * 1.01)}`));
    // Observed 3.0e-11 (the engine's Newton tolerance on the diode); bound 7.5e-11.
    expect(relErr(value(figures, 'pd.D1'), worst)).toBeLessThan(7.5e-11);
    // A rating just above the nominal power is still exceeded at the corner.
    expect(warnings.filter((w) => w.code === 'over-rating').map((w) => w.message).join('\n')).toMatch(/\bD1\b/);
    expect(figuresOf(lines(`PMAX=${num(worst * 1.01)}`)).warnings.filter((w) => w.code === 'over-rating')).toHaveLength(0);
  });
});
