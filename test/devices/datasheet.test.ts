/**
 * The datasheet form of `.model` cards (docs/models.md, "Datasheet form"):
 * datasheet values → model → the test circuits of the datasheet simulated
 * here → the datasheet values again. The references are the datasheet
 * definitions themselves: a Zener's voltage at its test current, its
 * dynamic resistance as the slope of V against I measured with a small
 * current step about the test current (the small-signal impedance of the
 * JEDEC Zener definitions, from memory), its temperature coefficient as
 * dVZ/dT at the test current, a diode's forward voltage at a current, a
 * transistor's DC gain IC/IB and its VBE at a collector current; and the
 * Shockley law V = N·Vt·ln(1 + I/IS) + I·RS (Shockley 1949, as models.md
 * writes it) for the forward points that must give back IS, N and RS.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { runNetlist, type RunReport } from '@railcheck/core';
import { seedFor } from '../core/measure/linear/support.js';
import { thermalVoltage, T_NOM } from '../helpers/diode-closed-form.js';

const seed = seedFor('devices/datasheet');
const VT = thermalVoltage(T_NOM);

function run(lines: readonly string[]): RunReport {
  const r = runNetlist([...lines, '.op', '.end', ''].join('\n'));
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

/** V(k) with `amps` driven in reverse through the diode of model line `model`, at each temperature. */
const zenerVolts = (model: string, amps: number, temps: readonly number[] = [27]): number[] =>
  run(['zener point', `I1 0 k ${amps}`, 'D1 0 k M', model, `.temp ${temps.join(' ')}`]).operatingPoints.map((p) => p.nodes['k']!);

/** The slope ΔV/ΔI for a step of ±1 % about `amps`, Ω. */
const slope = (model: string, amps: number): number => (zenerVolts(model, 1.01 * amps)[0]! - zenerVolts(model, 0.99 * amps)[0]!) / (0.02 * amps);

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.abs(b);

describe('a Zener from its datasheet values', () => {
  test('VZ at IZT, ZZT by a ±1 % current step and TCVZ = dVZ/dT at IZT reproduce', () => {
    let worst = { vz: 0, zzt: 0, tc: 0 };
    fc.assert(
      fc.property(
        fc.double({ min: 2.7, max: 33, noNaN: true }), fc.double({ min: 1e-3, max: 50e-3, noNaN: true }), fc.double({ min: 0.02, max: 1, noNaN: true }), fc.double({ min: -3e-3, max: 30e-3, noNaN: true }),
        (vz, izt, drop, tc) => {
          // ZZT·IZT from 20 mV to 1 V, as Zeners from a few volts to 33 V have (typical datasheet values, from memory).
          const zzt = drop / izt;
          const model = `.model M D (VZ=${vz} IZT=${izt} ZZT=${zzt} TCVZ=${tc})`;
          const [v27, v26, v28] = zenerVolts(model, izt, [27, 26, 28]);
          worst = {
            vz: Math.max(worst.vz, rel(v27!, vz)),
            zzt: Math.max(worst.zzt, rel(slope(model, izt), zzt)),
            // dVZ/dT by the central difference over 26 °C to 28 °C, against TCVZ; in units of 1e-9·VZ per kelvin, the
            // operating points' own tolerance on VZ.
            tc: Math.max(worst.tc, Math.abs((v28! - v26!) / 2 - tc) / (1e-9 * vz)),
          };
        },
      ),
      { seed, numRuns: 40 },
    );
    // VZ: the operating point's Newton tolerance; observed 1.0e-9 relative; bound 3e-9.
    expect(worst.vz).toBeLessThan(3e-9);
    // ZZT: the central difference of V(I) = NBV·Vt·ln(I/IBV) + RS·I over ±1 % misses V''' h²/6, 3.3e-5 of the slope
    // (observed 3.3e-5); bound 1e-4.
    expect(worst.zzt).toBeLessThan(1e-4);
    // TCVZ: BV(T) is linear in T (models.md), so the difference is exact up to the two operating points' tolerance
    // (each VZ within about 1e-9 of itself); observed at most 0.13 of 1e-9·VZ per kelvin over seeds 1-4; bound 0.4.
    expect(worst.tc).toBeLessThan(0.4);
  });

  test('with the knee point (IZK, ZZK) both dynamic resistances reproduce; TCVZPCT is a percentage of VZ per kelvin', () => {
    const model = '.model M D (VZ=6.2 IZT=20m ZZT=10 IZK=1m ZZK=150 TCVZPCT=0.04)';
    // Observed 2e-5 for each (the central difference, as above); bound 1e-4.
    expect(rel(slope(model, 20e-3), 10)).toBeLessThan(1e-4);
    expect(rel(slope(model, 1e-3), 150)).toBeLessThan(1e-4);
    const [v26, v28] = zenerVolts(model, 20e-3, [26, 28]);
    // 0.04 %/K of 6.2 V is 2.48 mV/K; observed 2e-8 relative; bound 1e-6.
    expect(rel((v28! - v26!) / 2, 0.0004 * 6.2)).toBeLessThan(1e-6);
  });

  test('datasheet values that cannot hold are errors at the key, naming what would do', () => {
    const err = (model: string): { code: string; message: string; column: number } => {
      const r = runNetlist(['t', 'I1 0 k 1m', 'D1 0 k M', model, '.op', '.end', ''].join('\n'));
      if (r.ok) throw new Error(`accepted: ${model}`);
      return { code: r.errors[0]!.code, message: r.errors[0]!.message, column: r.errors[0]!.pos!.column };
    };
    const both = err('.model M D (VZ=5.6 BV=5.6)');
    expect(both.code).toBe('bad-datasheet');
    expect(both.message).toMatch(/VZ sets BV, which is given as well/);
    expect(err('.model M D (IZT=5m)').message).toMatch(/IZT is given without VZ/);
    // A knee that is sharper than the test point: no positive NBV and RS give both.
    const knee = err('.model M D (VZ=5.6 IZT=5m ZZT=40 IZK=1m ZZK=20)');
    expect(knee.message).toMatch(/cannot both hold/);
    expect(knee.column).toBe('.model M D (VZ=5.6 IZT=5m ZZT=40 IZK=1m '.length + 1);
  });
});

describe('a diode from its forward points', () => {
  test('three points of the Shockley law with series resistance give back IS, N and RS', () => {
    let worst = { is: 0, n: 0, rs: 0 };
    fc.assert(
      fc.property(
        fc.double({ min: Math.log(1e-15), max: Math.log(1e-7), noNaN: true }).map(Math.exp), fc.double({ min: 1, max: 2.5, noNaN: true }), fc.double({ min: 0.005, max: 0.5, noNaN: true }),
        (is, n, rs) => {
          // Shockley with RS (models.md): V = N·Vt·ln(1 + I/IS) + I·RS, at 1 mA, 100 mA and 2 A.
          const v = (i: number): number => n * VT * Math.log1p(i / is) + i * rs;
          const model = `.model M D (VF=${v(1e-3)} IF=1m VF2=${v(0.1)} IF2=100m VF3=${v(2)} IF3=2)`;
          const el = run(['forward points', 'I1 0 a 1m', 'D1 a 0 M', model]).circuit.elements.find((e) => e.name === 'D1')!;
          if (el.kind !== 'diode') throw new Error('not a diode');
          worst = { is: Math.max(worst.is, rel(el.model.IS, is)), n: Math.max(worst.n, rel(el.model.N, n)), rs: Math.max(worst.rs, rel(el.model.RS, rs)) };
        },
      ),
      { seed, numRuns: 60 },
    );
    // The points are given to 17 digits; the bisection for RS ends at 1e-15 of it; IS carries exp(V/(N·Vt)) of that.
    // Observed IS 4.1e-14, N 1.5e-15, RS 7.6e-14; bounds 1.2e-13, 5e-15, 2.3e-13.
    expect(worst.is).toBeLessThan(1.2e-13);
    expect(worst.n).toBeLessThan(5e-15);
    expect(worst.rs).toBeLessThan(2.3e-13);
  });

  test('one point with N given: VF at IF reproduces in the simulated circuit', () => {
    const r = run(['led point', 'I1 0 a 20m', 'D1 a 0 M', '.model M D (VF=2.0 IF=20m N=2.2 RS=2)']);
    // Observed 1e-12; bound 1e-9 (the operating point's tolerance).
    expect(rel(r.operatingPoints[0]!.nodes['a']!, 2.0)).toBeLessThan(1e-9);
  });
});

describe('a transistor from its datasheet values', () => {
  test('a VBE smaller than the drop across RB at its current is refused at VBE', () => {
    // IB ≈ 1 A / 20 = 50 mA through RB = 20 Ω drops 1 V, more than the 0.79 V given: no junction voltage is left.
    const r = runNetlist(['t', 'VC c 0 8', 'VB b 0 0.79', 'Q1 c b 0 M', '.model M NPN (HFE=20 ICHFE=3 VBE=0.79 ICVBE=1 VCE=8 VA=20 RB=20)', '.op', '.end', ''].join('\n'));
    expect(!r.ok && r.errors[0]!.code).toBe('bad-datasheet');
    expect(!r.ok && r.errors[0]!.message).toMatch(/less than the drop across RB and RE/);
  });

  test('IC = ICHFE with IB = ICHFE/HFE, and IC = ICVBE with VBE applied, at VCE', () => {
    let worst = { hfe: 0, vbe: 0 };
    fc.assert(
      fc.property(
        fc.double({ min: 20, max: 500, noNaN: true }), fc.double({ min: Math.log(1e-4), max: Math.log(3), noNaN: true }).map(Math.exp), fc.double({ min: 0.55, max: 0.8, noNaN: true }),
        fc.double({ min: 1, max: 20, noNaN: true }), fc.double({ min: 20, max: 300, noNaN: true }), fc.boolean(), fc.oneof(fc.constant(0), fc.double({ min: 0.01, max: 20, noNaN: true })), fc.double({ min: 0, max: 0.05, noNaN: true }),
        (hfe, ic, vbe, vce, va, pnp, rb, reShare) => {
          // Terminal resistances of a real part: none, or RB from 10 mΩ to 20 Ω but its drop at the VBE point at most 20 %
          // of VBE (a larger one is refused by the resolver, tested below); RE up to 5 % of VBE at the test current
          // (none below 1e-6 Ω: a terminal resistance far below any part's makes an internal node the matrix cannot
          // resolve, a limit of the engine noted in docs/engine.md).
          const re = reShare * vbe / ic < 1e-6 ? 0 : (reShare * vbe) / ic;
          const rbMax = (0.2 * vbe * hfe) / (ic / 3);
          const model = `.model M ${pnp ? 'PNP' : 'NPN'} (HFE=${hfe} ICHFE=${ic} VBE=${vbe} ICVBE=${ic / 3} VCE=${vce} VA=${va} RB=${Math.min(rb, rbMax)} RE=${re})`;
          const s = pnp ? -1 : 1;
          const gain = run(['gain point', `VC c 0 ${s * vce}`, pnp ? `IB b 0 ${ic / hfe}` : `IB 0 b ${ic / hfe}`, 'Q1 c b 0 M', model]);
          const bias = run(['vbe point', `VC c 0 ${s * vce}`, `VB b 0 ${s * vbe}`, 'Q1 c b 0 M', model]);
          worst = {
            // In units of the share of the base current the engine's gmin (1e-12 S across each junction, docs/engine.md)
            // can take: 1e-12·VCE/IB.
            hfe: Math.max(worst.hfe, rel(Math.abs(gain.operatingPoints[0]!.currents['Q1.c']!), ic) / ((1e-12 * vce) / (ic / hfe))),
            vbe: Math.max(worst.vbe, rel(Math.abs(bias.operatingPoints[0]!.currents['Q1.c']!), ic / 3)),
          };
        },
      ),
      { seed, numRuns: 40 },
    );
    // The gain point: the resolver inverts the model's equations; the circuit also has the engine's gmin, whose
    // share of the base current bounds the error: observed 0.94 to 1.6 of that share over seeds 1-5; bound 4. The
    // VBE point, through the drops across RB and RE (a fixed point the resolver iterates to 1e-12) and the operating
    // point's Newton tolerance: observed up to 3.1e-9 over seeds 1-3; bound 1e-8.
    expect(worst.hfe).toBeLessThan(4);
    expect(worst.vbe).toBeLessThan(1e-8);
  });
});
