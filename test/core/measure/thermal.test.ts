/**
 * The thermal figure (docs/thermal.md) against references outside the code:
 * - the junction temperature of a diode driven by a fixed current, by hand
 *   from the Shockley equation (Shockley, Bell System Technical Journal 28,
 *   1949; the temperature scaling of IS as docs/models.md writes it) and the
 *   series thermal path Tj = Ta + P·(Rth(j-c) + Rth(c-a)) (JEDEC JESD51-1,
 *   θJA = (TJ − TA)/PH; from memory);
 * - the self-heated point of a resistor-fed Zener with TBV > 0: the breakdown
 *   equation of docs/models.md (the exponential breakdown form of device-
 *   modelling textbooks, BV(T) = BV·(1 + TBV·(T − Tnom))) and the thermal
 *   equation T = Ta + Rth·P(T), solved here by nested bisection, a root
 *   finder written in the test (no code of railcheck's);
 * - rthsink_max put back as rthsink= gives Tj = tjmax (the same series
 *   equation solved for Rth(c-a): an algebraic round trip, labelled so);
 * - the cases that cannot be measured, with their reasons.
 */
import { describe, expect, test } from 'vitest';
import { createBench, runNetlist, type FigureReport } from '@railcheck/core';
import { thermal, DEFAULT_TJMAX } from '@railcheck/core/internal';
import { figuresOf, value } from './linear/support.js';

// CODATA 2018 exact constants (docs/models.md).
const K_B = 1.380649e-23;
const Q_E = 1.602176634e-19;
const TNOM = 300.15;
const vt = (kelvin: number): number => (K_B * kelvin) / Q_E;

/** Bisection of a continuous f with f(lo)·f(hi) < 0 to an interval of `tol` (Burden and Faires, Numerical Analysis, §2.1). */
function bisect(f: (x: number) => number, lo: number, hi: number, tol: number): number {
  let flo = f(lo);
  if (flo * f(hi) > 0) throw new Error(`no sign change on [${lo}, ${hi}]`);
  while (hi - lo > tol) {
    const mid = 0.5 * (lo + hi);
    const fm = f(mid);
    if (fm === 0) return mid;
    if ((fm < 0) === (flo < 0)) {
      lo = mid;
      flo = fm;
    } else hi = mid;
  }
  return 0.5 * (lo + hi);
}

/** The bench of netlist lines (with `.end`). */
function benchOf(lines: readonly string[]) {
  const r = runNetlist([...lines, '.end', ''].join('\n'));
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
  return createBench(r.report.compiled);
}

const thermalFigure = (f: FigureReport) => f.figures.find((g) => g.kind === 'thermal')!;

describe('junction temperature of a diode at a fixed current', () => {
  // 10 mA forced through D1 by a current source of its own: its power does not depend on the input or load corners.
  const I = 10e-3;
  const IS = 1e-14;
  const N = 1.5;
  const stage = (tamb: string, rth: string) => [
    'current-driven diode, thermal check',
    'VIN in 0 12',
    'RL in out 1k',
    'ROUT out 0 1k',
    `IDRV 0 d ${I}`,
    `D1 d 0 DX ${rth}`,
    `.model DX D (IS=${IS} N=${N})`,
    '.supply in=VIN out=out load=ROUT',
    `.figure thermal ${tamb}`,
  ];

  test('Tj = Ta + P·(rth + rthsink), P = I·N·Vt·ln(1 + I/IS) at ambient; margin against the default tjmax', () => {
    for (const [tamb, ta] of [['', 27], ['tamb=60', 60]] as const) {
      const { figures } = figuresOf(stage(tamb, 'rth=20 rthsink=35'));
      const kelvin = ta + 273.15;
      // IS(T) = IS·(T/Tnom)^(XTI/N)·exp((EG/(N·Vt(T)))·(T/Tnom − 1)), XTI = 3, EG = 1.11 eV (docs/models.md defaults).
      const ratio = kelvin / TNOM;
      const isT = IS * Math.pow(ratio, 3 / N) * Math.exp((1.11 / (N * vt(kelvin))) * (ratio - 1));
      // Shockley: V = N·Vt·ln(1 + I/IS); P = V·I.
      const p = I * N * vt(kelvin) * Math.log(1 + I / isT);
      const tj = ta + p * (20 + 35);
      // Observed 6.5e-11 °C (27 °C) and 6.4e-11 °C (60 °C): the Newton solution stops within its tolerance (P to about
      // 1e-10 of itself); bound 2e-10 °C.
      expect(Math.abs(value(figures, 'thermal.D1.tj') - tj)).toBeLessThan(2e-10);
      // Default tjmax 150 °C for a silicon diode (from memory of typical datasheets; docs/thermal.md).
      expect(DEFAULT_TJMAX.diode).toBe(150);
      expect(Math.abs(value(figures, 'thermal.D1.margin') - (150 - tj))).toBeLessThan(2e-10);
      expect(Math.abs(value(figures, 'thermal.worst_margin') - (150 - tj))).toBeLessThan(2e-10);
      // JESD51-1 solved for Rth(c-a): (tjmax − Ta)/P − Rth(j-c). Observed 1.1e-10 relative (P's error); bound 3e-10.
      const sink = (150 - ta) / p - 20;
      expect(Math.abs(value(figures, 'thermal.D1.rthsink_max') - sink) / sink).toBeLessThan(3e-10);
    }
  });
});

describe('self-heated Zener with a positive voltage coefficient', () => {
  const VIN = 12;
  const R = 1000;
  const BV = 5.6;
  const IBV = 1e-3;
  const NBV = 1.2;
  const TBV = 1e-3;
  const IS = 1e-14;
  const RTH = 2000;
  const TA = 27;
  const lines = [
    'resistor-fed Zener reference, self-heating',
    `VIN in 0 ${VIN}`,
    `RS in z ${R}`,
    `DZ 0 z ZX rth=${RTH}`,
    `.model ZX D (IS=${IS} BV=${BV} IBV=${IBV} NBV=${NBV} TBV=${TBV})`,
    '.supply in=VIN out=z',
    '.figure thermal selfheat=1',
  ];

  /** Zener voltage at junction temperature `celsius`: (VIN − Vz)/R = −I(−Vz) with the diode equation of docs/models.md, by bisection. */
  const zener = (celsius: number): number => {
    const kelvin = celsius + 273.15;
    const v = vt(kelvin);
    const ratio = kelvin / TNOM;
    const isT = IS * Math.pow(ratio, 3) * Math.exp((1.11 / v) * (ratio - 1));
    const bvT = BV * (1 + TBV * (kelvin - TNOM));
    // Current into the cathode from the resistor minus the current the junction takes from cathode to anode.
    const f = (vz: number): number => (VIN - vz) / R - (isT * (1 - Math.exp(-vz / v)) + IBV * Math.exp((vz - bvT) / (NBV * v)));
    return bisect(f, 0, VIN, 1e-13);
  };
  const power = (celsius: number): number => {
    const vz = zener(celsius);
    return (vz * (VIN - vz)) / R;
  };

  test('the fixed point T = Ta + Rth·P(T) and the Zener drift match a root finder on the same equations', () => {
    const tStar = bisect((t) => TA + RTH * power(t) - t, TA, TA + (RTH * VIN * VIN) / R, 1e-10);
    const drift = zener(tStar) - zener(TA);
    const { figures } = figuresOf(lines);
    // Observed 2.1e-6 V against a drift of 0.414 V: the iteration stops once a change is at most 1e-3 K, and with a
    // loop gain Rth·dP/dT far below 1 the last temperature sits within about that change of the fixed point
    // (observed 3.7e-4 K, times dVz/dT ≈ 5.8 mV/K); bound 5e-6 V.
    expect(Math.abs(value(figures, 'thermal.vout_drift') - drift)).toBeLessThan(5e-6);
    expect(drift).toBeGreaterThan(0.3);
    const r = thermal(benchOf(lines), { selfHeat: true });
    expect(r.selfHeat?.ok).toBe(true);
    const warm = r.selfHeat!.ok ? r.selfHeat!.junctions['DZ']! : NaN;
    // Observed 3.7e-4 K; bound 1e-3 K, the stopping tolerance itself (SELF_HEAT_TOLERANCE; 2.7× the observed).
    expect(Math.abs(warm - tStar)).toBeLessThan(1e-3);
    // The cold Tj (no self-heating) is Ta + Rth·P(Ta) at the worst corner, 1.1 × VIN, by the same equations with VIN scaled.
    expect(value(figures, 'thermal.DZ.tj')).toBeGreaterThan(TA + RTH * power(TA));
  });

  test('the bench is put back to the figure temperature afterwards: dissipation after thermal is the cold one', () => {
    const { figures } = figuresOf([...lines, '.figure dissipation']);
    const vz = zener(TA);
    const high = 1.1 * VIN;
    // Worst corner: 1.1 × VIN (no load): Vz at that input from the same equation.
    const f = (v: number): number => {
      const kelvin = TA + 273.15;
      const t = vt(kelvin);
      return (high - v) / R - (IS * (1 - Math.exp(-v / t)) + IBV * Math.exp((v - BV) / (NBV * t)));
    };
    const vzHigh = bisect(f, 0, high, 1e-13);
    const p = Math.max((vz * (VIN - vz)) / R, (vzHigh * (high - vzHigh)) / R);
    // Observed 6.7e-9 relative: the DC solution's Newton tolerance (Vz within about 0.4 µV); bound 2e-8.
    expect(Math.abs(value(figures, 'pd.DZ') - p) / p).toBeLessThan(2e-8);
  });
});

describe('rthsink_max put back', () => {
  // An algebraic round trip of the JESD51-1 series equation, not an outside value: Tj(rthsink = rthsink_max) = tjmax.
  const stage = (q: string, d: string) => [
    'sensor rail follower, heatsink sizing',
    'VBAT in 0 dc 12',
    'RB in ref 680',
    `DZ 0 ref ZREF ${d}`,
    `Q1 in ref out NPASS ${q}`,
    'RBLEED out 0 1k',
    'ILOAD out 0 50m',
    '.model ZREF D (IS=1e-14 N=1 BV=5.6 IBV=5m NBV=1.4 RS=3)',
    '.model NPASS NPN (IS=2e-13 BF=150 VAF=90 RB=10)',
    '.supply in=VBAT out=out load=ILOAD',
    '.figure thermal tamb=50',
  ];

  test('with rthsink= the heatsink allowance; without, the total allowance as rth=', () => {
    const first = figuresOf(stage('rth=4 rthsink=30 tjmax=125', 'rth=300')).figures;
    const sink = value(first, 'thermal.Q1.rthsink_max');
    const total = value(first, 'thermal.DZ.rthsink_max');
    const again = figuresOf(stage(`rth=4 rthsink=${sink.toPrecision(15)} tjmax=125`, `rth=${total.toPrecision(15)}`)).figures;
    // The dissipation does not depend on rth (cold models): rounding of 15 digits only. Observed 0 and 1.4e-14 °C; bound 1e-10 °C.
    expect(Math.abs(value(again, 'thermal.Q1.tj') - 125)).toBeLessThan(1e-10);
    expect(Math.abs(value(again, 'thermal.DZ.tj') - 150)).toBeLessThan(1e-10);
    expect(Math.abs(value(again, 'thermal.worst_margin'))).toBeLessThan(1e-10);
  });
});

describe('not measured, with reasons', () => {
  const base = ['reverse diode stage', 'VIN in 0 10', 'RL in out 1k', 'ROUT out 0 1k', '.supply in=VIN out=out load=ROUT', '.model DX D (IS=1e-14)'];

  test('no diode or transistor with rth=: the figure is not measured and says why', () => {
    const { figures } = figuresOf([...base, 'D1 0 out DX', '.figure thermal']);
    const f = thermalFigure(figures);
    expect(f.ok).toBe(false);
    if (!f.ok) expect(f.reason.message).toMatch(/no diode or transistor carries rth=/);
  });

  test('a reverse-biased diode (P of order 1e-13 W): Tj = Ta, rthsink_max left out with its reason, no NaN or ∞', () => {
    const { figures, warnings } = figuresOf([...base, 'D1 0 out DX rth=100', '.figure thermal tamb=30']);
    const f = thermalFigure(figures);
    expect(f.ok).toBe(true);
    if (!f.ok) return;
    // P = 5 V · IS = 5e-14 W: Tj − Ta = 5e-12 K (Shockley, reverse saturation).
    expect(Math.abs(value(figures, 'thermal.D1.tj') - 30)).toBeLessThan(1e-9);
    expect(f.values['thermal.D1.rthsink_max']).toBeUndefined();
    expect(f.notMeasured.map((v) => v.name)).toEqual(['thermal.D1.rthsink_max']);
    expect(f.notMeasured[0]!.reason.message).toMatch(/any heatsink keeps the junction at ambient/);
    expect(warnings.some((w) => /thermal\.D1\.rthsink_max was not measured/.test(w.message))).toBe(true);
    for (const v of Object.values(f.values)) expect(Number.isFinite(v)).toBe(true);
  });

  test('an ambient at or above tjmax, and a heatsink that cannot be small enough, leave rthsink_max out with the reason', () => {
    const hot = figuresOf(['forward diode', 'VIN in 0 10', 'RF in d 100', 'D1 d 0 DX rth=100 tjmax=70', 'ROUT in 0 1k', '.model DX D (IS=1e-14)', '.supply in=VIN out=d', '.figure thermal tamb=80']).figures;
    const f = thermalFigure(hot);
    expect(f.ok && f.notMeasured[0]!.reason.message).toMatch(/not below tjmax/);
    expect(value(hot, 'thermal.D1.margin')).toBeLessThan(0);
    // 93 mA · 0.7 V ≈ 65 mW through rth=2000 K/W junction to case: 130 K above ambient even on an ideal heatsink.
    const big = figuresOf(['forward diode', 'VIN in 0 10', 'RF in d 100', 'D1 d 0 DX rth=2000 rthsink=10', 'ROUT in 0 1k', '.model DX D (IS=1e-14)', '.supply in=VIN out=d', '.figure thermal']).figures;
    const g = thermalFigure(big);
    expect(g.ok && g.notMeasured[0]!.reason.message).toMatch(/even an ideal heatsink/);
  });

  test('selfheat between 0 and 1 is refused as the figure is measured; rthsink= without rth= is noted', () => {
    const { figures } = figuresOf([...base, 'D1 0 out DX rthsink=10', 'D2 0 out DX rth=100', '.figure thermal selfheat=0.5']);
    const f = thermalFigure(figures);
    expect(f.ok).toBe(false);
    if (!f.ok) expect(f.reason.message).toMatch(/selfheat=0\.5 is out of range/);
    const ok = figuresOf([...base, 'D1 0 out DX rthsink=10', 'D2 0 out DX rth=100', '.figure thermal']);
    expect(ok.warnings.some((w) => /D1 has rthsink= but no rth=/.test(w.message))).toBe(true);
  });

  test('thermal runaway in the self-heating point is a reason, not a number', () => {
    // A Zener with a huge TBV and a thermal resistance so high the loop gain Rth·dP/dT exceeds 1 … or the junction passes 400 °C.
    const { figures } = figuresOf(['runaway', 'VIN in 0 30', 'RS in z 100', 'DZ 0 z ZX rth=5000', '.model ZX D (IS=1e-14 BV=5 IBV=1m TBV=1e-3)', '.supply in=VIN out=z', '.figure thermal selfheat=1']);
    const f = thermalFigure(figures);
    expect(f.ok).toBe(true);
    if (!f.ok) return;
    expect(f.values['thermal.vout_drift']).toBeUndefined();
    expect(f.notMeasured.find((v) => v.name === 'thermal.vout_drift')!.reason.message).toMatch(/thermal runaway|did not settle/);
  });
});
