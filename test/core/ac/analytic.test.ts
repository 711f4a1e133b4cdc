/**
 * Small-signal analysis of linear networks against their transfer functions
 * derived by hand from Ohm's and Kirchhoff's laws with impedances R, jωL and
 * 1/(jωC), as in any circuit-theory text (e.g. Alexander and Sadiku,
 * Fundamentals of Electric Circuits, ch. 14, from memory). The analytic side
 * is evaluated with mathjs complex arithmetic, not with the engine.
 */
import { describe, expect, test } from 'vitest';
import { add, complex, divide, multiply, subtract, type Complex } from 'mathjs';
import { acFrequencies } from '@railcheck/core/internal';
import { argmax, bisect, db, deg, lineariseNetlist, phasor, relErr, run } from './support.js';

const j = complex(0, 1);
const jw = (f: number): Complex => complex(0, 2 * Math.PI * f);
const one = complex(1, 0);

/**
 * The MNA solve of a linear network is exact up to rounding: relative
 * agreement observed 2.4e-16 to 5.1e-16 on the first-order sections, the
 * ladder and the lattice; bound 1.2e-15 (the series RLC, 4.8e-13 near its
 * zeros, has its own bound).
 */
const REL = 1.2e-15;

/** Worst relative error, dB and degree difference of a node against h(f) over a sweep. */
function compare(text: string, node: string, h: (f: number) => Complex): { rel: number; dB: number; deg: number } {
  const report = run(text);
  const ac = report.ac[0]!;
  let rel = 0;
  let dDb = 0;
  let dDeg = 0;
  ac.frequencies.forEach((f, k) => {
    const got = phasor(ac, node, k);
    const want = h(f);
    rel = Math.max(rel, relErr(got, want));
    dDb = Math.max(dDb, Math.abs(db(got) - db(want)));
    dDeg = Math.max(dDeg, Math.abs(deg(got) - deg(want)));
  });
  return { rel, dB: dDb, deg: dDeg };
}

describe('first-order sections', () => {
  test('RC low-pass: H = 1/(1 + jωRC) over seven decades', () => {
    const R = 1e3;
    const C = 100e-9;
    const text = `rc low-pass\nV1 in 0 dc 0 ac 1\nR1 in out 1k\nC1 out 0 100n\n.ac dec 10 10 100meg\n.end\n`;
    // Alexander & Sadiku §14.6 (from memory): H(ω) = 1/(1 + jωRC).
    const worst = compare(text, 'out', (f) => divide(one, add(one, multiply(jw(f), R * C))) as Complex);
    console.log(`RC low-pass vs 1/(1+jωRC): rel ${worst.rel.toExponential(2)}, ${worst.dB.toExponential(2)} dB, ${worst.deg.toExponential(2)}°`);
    expect(worst.rel).toBeLessThan(REL);
  });

  test('RC low-pass: −3.01 dB and −45° at 1/(2πRC), −20 dB per decade well above it', () => {
    const fc = 1 / (2 * Math.PI * 1e3 * 100e-9);
    const lin = lineariseNetlist(`rc low-pass\nV1 in 0 dc 0 ac 1\nR1 in out 1k\nC1 out 0 100n\n.end\n`);
    // At the corner |H| = 1/√2, i.e. −10·log10(2) dB, and arg H = −45° (textbook, from memory).
    // Observed 4.4e-16 dB and 7.1e-15°; bounds 1e-15 dB and 1.8e-14°.
    expect(Math.abs(db(lin.at('out', fc)) + 10 * Math.log10(2))).toBeLessThan(1e-15);
    expect(Math.abs(deg(lin.at('out', fc)) + 45)).toBeLessThan(1.8e-14);
    // Asymptote: 20·log10(1/(ωRC)) per decade → a drop of 20 dB from 1000·fc to 10000·fc
    // (the exact drop, 10·log10((1 + 10⁸)/(1 + 10⁶)), differs from 20 by 4e-7 dB).
    expect(db(lin.at('out', 1000 * fc)) - db(lin.at('out', 10000 * fc))).toBeCloseTo(20, 5);
  });

  test('RL high-pass: H = jωL/(R + jωL), phase from +90° to 0°', () => {
    const R = 100;
    const L = 10e-3;
    const text = `rl high-pass\nV1 in 0 ac 1\nR1 in out 100\nL1 out 0 10m\n.ac dec 5 1 10meg\n.end\n`;
    const h = (f: number): Complex => divide(multiply(jw(f), L), add(complex(R, 0), multiply(jw(f), L))) as Complex;
    const worst = compare(text, 'out', h);
    console.log(`RL high-pass vs jωL/(R+jωL): rel ${worst.rel.toExponential(2)}, ${worst.dB.toExponential(2)} dB, ${worst.deg.toExponential(2)}°`);
    expect(worst.rel).toBeLessThan(REL);
    const ac = run(text).ac[0]!;
    // Limits: phase → +90° well below R/(2πL), → 0° well above (textbook, from memory).
    expect(deg(phasor(ac, 'out', 0))).toBeGreaterThan(89.9);
    // At 10 MHz the exact arg is atan(R/ωL) = 0.0091°; bound 0.025°.
    expect(deg(phasor(ac, 'out', ac.frequencies.length - 1))).toBeLessThan(0.025);
  });

  test('source phase and magnitude scale the response: ac 2 30 gives 2∠30° times H', () => {
    const text = `phase\nV1 in 0 dc 1 ac 2 30\nR1 in out 1k\nC1 out 0 100n\n.ac lin 3 1k 3k\n.end\n`;
    // Linearity of the phasor solution (superposition); the source phasor is 2·e^{j30°}.
    const src = multiply(2, complex({ r: 1, phi: Math.PI / 6 })) as Complex;
    const worst = compare(text, 'out', (f) => multiply(src, divide(one, add(one, multiply(jw(f), 1e-4)))) as Complex);
    expect(worst.rel).toBeLessThan(REL);
  });

  test('current-source drive into R ∥ C gives the impedance R/(1 + jωRC) at the node', () => {
    // netlist.md: a source's current enters it at n+ and leaves at n−, so "I1 0 n" pushes
    // the current into n and V(n) = +Z·I.
    const text = `norton\nI1 0 n dc 1m ac 1\nR1 n 0 2k\nC1 n 0 47n\n.ac dec 4 10 1meg\n.end\n`;
    const worst = compare(text, 'n', (f) => divide(complex(2e3, 0), add(one, multiply(jw(f), 2e3 * 47e-9))) as Complex);
    expect(worst.rel).toBeLessThan(REL);
  });
});

describe('second-order networks', () => {
  // Series R-L-C driven by V1, output across R (Alexander & Sadiku §14.7, from memory):
  // H = jωRC/(1 − ω²LC + jωRC), f0 = 1/(2π√(LC)), −3 dB bandwidth B = R/(2πL) exactly.
  const R = 50;
  const L = 10e-3;
  const C = 1e-6;
  const text = `series rlc band-pass\nV1 in 0 ac 1\nL1 in a 10m\nC1 a b 1u\nR1 b 0 50\n.ac dec 20 10 100k\n.end\n`;
  const h = (f: number): Complex => {
    const w = 2 * Math.PI * f;
    return divide(multiply(j, w * R * C), complex(1 - w * w * L * C, w * R * C)) as Complex;
  };

  test('series RLC band-pass against jωRC/(1 − ω²LC + jωRC)', () => {
    const worst = compare(text, 'b', h);
    console.log(`series RLC vs jωRC/(1−ω²LC+jωRC): rel ${worst.rel.toExponential(2)}, ${worst.dB.toExponential(2)} dB, ${worst.deg.toExponential(2)}°`);
    // Observed 4.8e-13 (the response falls by decades away from f0); bound 1.2e-12.
    expect(worst.rel).toBeLessThan(1.2e-12);
  });

  test('peak at f0 = 1/(2π√(LC)) with unit gain and zero phase; −3 dB bandwidth R/(2πL)', () => {
    const lin = lineariseNetlist(text);
    const mag = (f: number): number => db(lin.at('b', f));
    const f0 = 1 / (2 * Math.PI * Math.sqrt(L * C));
    // Searched on the engine's response alone, then compared with the formulas.
    const peak = argmax(mag, f0 / 3, f0 * 3, 1e-9);
    // A peak located by golden section on a smooth maximum is good to about √eps relative;
    // observed 2.6e-10, bound 6.5e-10.
    expect(Math.abs(peak / f0 - 1)).toBeLessThan(6.5e-10);
    // Observed 0 dB and 0° exactly; bounds of a couple of ulps of |H| and of the angle.
    expect(Math.abs(mag(f0))).toBeLessThan(2e-15);
    expect(Math.abs(deg(lin.at('b', f0)))).toBeLessThan(1e-14);
    const half = (f: number): number => mag(f) + 10 * Math.log10(2);
    const f1 = bisect(half, f0 / 100, f0);
    const f2 = bisect(half, f0, f0 * 100);
    const bw = R / (2 * Math.PI * L);
    console.log(`series RLC: peak ${peak.toFixed(6)} Hz (f0 ${f0.toFixed(6)}), bandwidth ${(f2 - f1).toFixed(6)} Hz (R/2πL ${bw.toFixed(6)})`);
    // Observed 6.8e-13 and 2.7e-13; bounds 1.7e-12 and 7e-13.
    expect(Math.abs((f2 - f1) / bw - 1)).toBeLessThan(1.7e-12);
    // f1·f2 = f0² for the series RLC (geometric symmetry; textbook, from memory).
    expect(Math.abs((f1 * f2) / (f0 * f0) - 1)).toBeLessThan(7e-13);
  });

  test('two-section RC ladder against its hand-derived H', () => {
    // in —R1— a —R2— out, C1 at a, C2 at out. Nodal analysis by hand:
    //   V(out) = V(a)/(1 + sR2C2),  (Vin − Va)/R1 = sC1·Va + (Va − Vout)/R2
    //   ⇒ H = 1/(1 + s(R1C1 + R1C2 + R2C2) + s²R1R2C1C2),  Va/Vin = (1 + sR2C2)·H.
    const R1 = 1e3;
    const C1 = 100e-9;
    const R2 = 10e3;
    const C2 = 10e-9;
    const net = `rc ladder\nV1 in 0 ac 1\nR1 in a 1k\nC1 a 0 100n\nR2 a out 10k\nC2 out 0 10n\n.ac dec 10 1 10meg\n.end\n`;
    const H = (f: number): Complex => {
      const s = jw(f);
      const den = add(add(one, multiply(s, R1 * C1 + R1 * C2 + R2 * C2)), multiply(multiply(s, s), R1 * R2 * C1 * C2));
      return divide(one, den) as Complex;
    };
    const out = compare(net, 'out', H);
    const mid = compare(net, 'a', (f) => multiply(add(one, multiply(jw(f), R2 * C2)), H(f)) as Complex);
    console.log(`RC ladder vs hand-derived H: out rel ${out.rel.toExponential(2)} (${out.dB.toExponential(2)} dB), a rel ${mid.rel.toExponential(2)}`);
    expect(out.rel).toBeLessThan(REL);
    expect(mid.rel).toBeLessThan(REL);
    // Two real poles: −40 dB/decade far above both (textbook, from memory).
    const lin = lineariseNetlist(net);
    // The exact drop differs from 40 dB by 2.6e-5 dB there (the poles are finite); bound 6.5e-5 dB.
    expect(Math.abs(db(lin.at('out', 1e6)) - db(lin.at('out', 1e7)) - 40)).toBeLessThan(6.5e-5);
  });

  test('lattice all-pass: the difference of a C–R and an R–C divider has unit magnitude', () => {
    // By hand: out (series C, shunt R) = jωRC/(1 + jωRC), x (series R, shunt C) = 1/(1 + jωRC),
    // so out − x = (jωRC − 1)/(jωRC + 1): an all-pass with |H| = 1 and phase 180° − 2·atan(ωRC).
    const net = `all-pass lattice\nV1 in 0 ac 1\nC1 in out 100n\nR1 out 0 1k\nR2 in x 1k\nC2 x 0 100n\n.ac dec 10 10 1meg\n.end\n`;
    const ac = run(net).ac[0]!;
    ac.frequencies.forEach((f, k) => {
      const diff = subtract(phasor(ac, 'out', k), phasor(ac, 'x', k)) as Complex;
      const wrc = 2 * Math.PI * f * 1e-4;
      // Observed 1.9e-15 dB at most; bound 5e-15 dB.
      expect(Math.abs(db(diff))).toBeLessThan(5e-15);
      const want = complex({ r: 1, phi: Math.PI - 2 * Math.atan(wrc) });
      expect(relErr(diff, want)).toBeLessThan(REL);
    });
  });
});

describe('sweep frequencies', () => {
  test('dec gives points per decade from fstart to fstop; lin gives points in all', () => {
    // netlist.md: ".ac dec|lin points fstart fstop"; points per decade for dec and the total
    // for lin is the trade's usage (common practice, no source).
    const dec = acFrequencies('dec', 10, 1, 1e3);
    expect(dec.length).toBe(31);
    // Observed 0 (the same power of ten); bound 2·eps.
    dec.forEach((f, k) => expect(Math.abs(f / 10 ** (k / 10) - 1)).toBeLessThanOrEqual(2 * Number.EPSILON));
    expect(acFrequencies('lin', 5, 100, 500)).toEqual([100, 200, 300, 400, 500]);
    const report = run(`sweep\nV1 in 0 ac 1\nR1 in out 1k\nC1 out 0 1u\n.ac lin 4 10 40\n.end\n`);
    expect(report.ac[0]!.frequencies).toEqual([10, 20, 30, 40]);
  });
});
