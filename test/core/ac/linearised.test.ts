/**
 * Small-signal analysis of nonlinear stages linearised at their operating
 * point: an NPN emitter follower (hybrid-π model, Gray and Meyer, Analysis
 * and Design of Analog Integrated Circuits, ch. 1 and 3, from memory), its
 * PNP mirror, a Zener's incremental impedance and a diode's junction charge. The bias and every small-signal parameter
 * are computed here from the models.md equations, independently of the
 * engine's device code.
 */
import { describe, expect, test } from 'vitest';
import { complex, divide, lusolve, matrix, type Complex, type Matrix } from 'mathjs';
import { db, deg, lineariseNetlist, relErr, run } from './support.js';

/** Vt at Tnom = 300.15 K with the CODATA 2018 exact k and q (models.md). */
const VT = (1.380649e-23 * 300.15) / 1.602176634e-19;

/** The follower's model; CJE/CJC/TF appended for the high-frequency case. */
const M = { IS: 5e-15, BF: 120, BR: 2, VAF: 60, RB: 100, CJE: 12e-12, VJE: 0.75, MJE: 0.33, CJC: 4e-12, VJC: 0.75, MJC: 0.33, TF: 0.4e-9 };
const VCC = 12;
const VS = 3;
const RS = 2.2e3;
const RE = 1e3;
const RL = 4.7e3;
const GL = 1 / RE + 1 / RL;

function follower(charges: boolean, polarity: 'NPN' | 'PNP' = 'NPN'): string {
  const sign = polarity === 'NPN' ? '' : '-';
  const q = charges ? ` CJE=${M.CJE} VJE=${M.VJE} MJE=${M.MJE} CJC=${M.CJC} VJC=${M.VJC} MJC=${M.MJC} TF=${M.TF}` : '';
  return [
    'bench instrument buffer: emitter follower',
    `VCC vcc 0 dc ${sign}${VCC}`,
    `VS src 0 dc ${sign}${VS} ac 1`,
    `RS src b ${RS}`,
    'Q1 vcc b e NBUF',
    `RE e 0 ${RE}`,
    `RL e 0 ${RL}`,
    `.model NBUF ${polarity} (IS=${M.IS} BF=${M.BF} BR=${M.BR} VAF=${M.VAF} RB=${M.RB}${q})`,
    '.ac dec 5 10 1g',
    '.end',
    '',
  ].join('\n');
}

/** models.md transport equations and their partial derivatives, NPN, no VAR, NF = NR = 1. */
function transistor(vbe: number, vbc: number) {
  const icc = M.IS * (Math.exp(vbe / VT) - 1);
  const iec = M.IS * (Math.exp(vbc / VT) - 1);
  const gcc = (icc + M.IS) / VT;
  const gec = (iec + M.IS) / VT;
  const q = 1 - vbc / M.VAF;
  return {
    icc,
    ic: (icc - iec) * q - iec / M.BR,
    ib: icc / M.BF + iec / M.BR,
    /** ∂Ic/∂Vbe, ∂Ic/∂Vbc, ∂Ib/∂Vbe, ∂Ib/∂Vbc (S). */
    dic: [gcc * q, -gec * q - (icc - iec) / M.VAF - gec / M.BR] as const,
    dib: [gcc / M.BF, gec / M.BR] as const,
    gcc,
  };
}

/** models.md depletion capacitance dQ/dV: CJ·(1 − V/VJ)^−M below VJ/2, continued linearly above. */
function depletionC(v: number, cj: number, vj: number, m: number): number {
  if (v < vj / 2) return cj * (1 - v / vj) ** -m;
  return cj * 2 ** m + ((cj * m) / vj) * 2 ** (m + 1) * (v - vj / 2);
}

/**
 * Bias by Newton on the internal base and the emitter (collector at VCC):
 * (VS − Vbi)/(RS + RB) = Ib and Ic + Ib = Ve·GL.
 */
function bias(): { vbi: number; ve: number } {
  let vbi = 2.4;
  let ve = 1.7;
  for (let k = 0; k < 100; k++) {
    const t = transistor(vbi - ve, vbi - VCC);
    const f1 = (VS - vbi) / (RS + M.RB) - t.ib;
    const f2 = t.ic + t.ib - ve * GL;
    // Jacobian of (f1, f2) in (vbi, ve).
    const a = -1 / (RS + M.RB) - t.dib[0] - t.dib[1];
    const b = t.dib[0];
    const c = t.dic[0] + t.dic[1] + t.dib[0] + t.dib[1];
    const d = -t.dic[0] - t.dib[0] - GL;
    const det = a * d - b * c;
    const dv = (-f1 * d + f2 * b) / det;
    const de = (-f2 * a + f1 * c) / det;
    vbi += dv;
    ve += de;
    if (Math.abs(dv) + Math.abs(de) < 1e-15) break;
  }
  return { vbi, ve };
}

/**
 * Hybrid-π follower with the collector at AC ground, solved exactly:
 *   base:    (vs − vbi)/(RS + RB) = ib + jωCbe(vbi − ve) + jωCbc·vbi
 *   emitter: ic + ib + jωCbe(vbi − ve) = ve·GL
 * with ic, ib linear in vbe = vbi − ve and vbc = vbi. Returns ve/vs.
 */
function followerGain(f: number, cbe: number, cbc: number): Complex {
  const { vbi, ve } = bias();
  const t = transistor(vbi - ve, vbi - VCC);
  const w = 2 * Math.PI * f;
  const gs = 1 / (RS + M.RB);
  const ybe = complex(0, w * cbe);
  const ybc = complex(0, w * cbc);
  const [icBe, icBc] = t.dic;
  const [ibBe, ibBc] = t.dib;
  const A = matrix([
    [complex(gs + ibBe + ibBc + ybe.re + ybc.re, ybe.im + ybc.im), complex(-ibBe - ybe.re, -ybe.im)],
    [complex(icBe + icBc + ibBe + ibBc + ybe.re, ybe.im), complex(-icBe - ibBe - ybe.re - GL, -ybe.im)],
  ]);
  const x = (lusolve(A, matrix([[complex(gs, 0)], [complex(0, 0)]])) as Matrix).toArray() as unknown as Complex[][];
  const v = x[1]![0]!;
  return typeof v === 'number' ? complex(v, 0) : v;
}

describe('emitter follower, hybrid-π', () => {
  test('operating point matches the bias solved from the models.md equations', () => {
    const { vbi, ve } = bias();
    const op = run(follower(false)).operatingPoints[0]!;
    const ib = (VS - vbi) / (RS + M.RB);
    // The engine's Newton stops on updates of reltol 1e-6 of the node (DEFAULT_NEWTON) and converges
    // quadratically: observed 1.9e-8 V and 1.8e-8 V; bound 4.5e-8 V.
    expect(Math.abs(op.nodes['e']! - ve)).toBeLessThan(4.5e-8);
    expect(Math.abs(op.nodes['b']! - (VS - RS * ib))).toBeLessThan(4.5e-8);
  });

  test('low-frequency gain: textbook hybrid-π (gm = Ic/Vt, rπ = β/gm, ro = (VAF + Vce)/Ic) within 0.1 %', () => {
    const { vbi, ve } = bias();
    const t = transistor(vbi - ve, vbi - VCC);
    const ic = t.ic;
    const beta = ic / t.ib;
    // Gray & Meyer §1.4 (from memory): gm = Ic/Vt, rπ = β0/gm, ro = (VA + Vce)/Ic.
    const gm = ic / VT;
    const rpi = beta / gm;
    const ro = (M.VAF + (VCC - ve)) / ic;
    // Follower (Gray & Meyer §3.3, from memory): Av = (β+1)·R'/(Rs' + rπ + (β+1)·R'),
    // R' = RE ∥ RL ∥ ro, Rs' = RS + RB (the base resistance adds to the source's).
    const rp = 1 / (GL + 1 / ro);
    const textbook = ((beta + 1) * rp) / (RS + M.RB + rpi + (beta + 1) * rp);
    const ac = run(follower(false)).ac[0]!;
    const k = 0; // 10 Hz: no reactive element in this netlist, so any frequency is "low".
    const got = Math.hypot(ac.nodes['e']!.re[k]!, ac.nodes['e']!.im[k]!);
    const exact = followerGain(10, 0, 0).re;
    console.log(`follower: Ic ${(ic * 1e3).toFixed(4)} mA, gm ${gm.toFixed(5)} S, rπ ${rpi.toFixed(2)} Ω, ro ${ro.toFixed(0)} Ω; ` +
      `gain engine ${got.toFixed(7)}, textbook ${textbook.toFixed(7)} (${((got / textbook - 1) * 100).toExponential(2)} %), exact ${exact.toFixed(7)} (${((got / exact - 1) * 100).toExponential(2)} %)`);
    // The textbook model differs from the Ebers-Moll one in how the Early effect enters: observed
    // 2.2e-5; bound 5e-5.
    expect(Math.abs(got / textbook - 1)).toBeLessThan(5e-5);
    // The same linearisation with the models.md derivatives (Early factor on Icc − Iec, not on Vce)
    // must agree to the engine's DC tolerances: observed 2.2e-9; bound 5.5e-9.
    expect(Math.abs(got / exact - 1)).toBeLessThan(5.5e-9);
    // No reactive element: the matrix is real and the imaginary part exactly zero (observed 0).
    expect(Math.abs(ac.nodes['e']!.im[k]!)).toBe(0);
  });

  test('with CJE, CJC and TF: hand-derived Cπ, Cμ reproduce the response; the gain rolls off and lags', () => {
    const { vbi, ve } = bias();
    const t = transistor(vbi - ve, vbi - VCC);
    // Cπ = depletion(Vbe) + TF·∂Icc/∂Vbe; Cμ = depletion(Vbc) (models.md, TR = 0).
    const cbe = depletionC(vbi - ve, M.CJE, M.VJE, M.MJE) + M.TF * t.gcc;
    const cbc = depletionC(vbi - VCC, M.CJC, M.VJC, M.MJC);
    const ac = run(follower(true)).ac[0]!;
    let worst = 0;
    const mags: number[] = [];
    ac.frequencies.forEach((f, k) => {
      const got = complex(ac.nodes['e']!.re[k]!, ac.nodes['e']!.im[k]!);
      worst = Math.max(worst, relErr(got, followerGain(f, cbe, cbc)));
      mags.push(db(got));
    });
    console.log(`follower with charges: Cπ ${(cbe * 1e12).toFixed(3)} pF, Cμ ${(cbc * 1e12).toFixed(3)} pF; worst relative error vs hand-derived ${worst.toExponential(2)}; ` +
      `gain ${mags[0]!.toFixed(4)} dB at 10 Hz, ${mags[mags.length - 1]!.toFixed(3)} dB at 1 GHz`);
    // Observed 2.2e-9; bound 5.5e-9.
    expect(worst).toBeLessThan(5.5e-9);
    // Direction: the source resistance charging Cμ and the falling β at high frequency
    // make the follower a low-pass (Gray & Meyer §7.3, from memory).
    const last = ac.frequencies.length - 1;
    expect(mags[last]!).toBeLessThan(mags[0]! - 6);
    expect(deg(complex(ac.nodes['e']!.re[last]!, ac.nodes['e']!.im[last]!))).toBeLessThan(-10);
    for (let k = 1; k <= last; k++) expect(mags[k]!).toBeLessThanOrEqual(mags[k - 1]! + 1e-9);
    // Observed 1.9e-8 dB (the capacitances barely act at 10 Hz); bound 5e-8 dB.
    expect(Math.abs(mags[0]! - db(followerGain(10, 0, 0)))).toBeLessThan(5e-8);
  });
});

describe('PNP mirror', () => {
  test('the PNP follower on negated supplies has the NPN small-signal response', () => {
    // models.md: PNP is the NPN with every junction voltage and terminal current negated, so the
    // mirrored circuit's operating point is the negative of the NPN one and its linearisation
    // (conductances and capacitances, both even in the bias sign flip) is the same.
    const npn = run(follower(true)).ac[0]!;
    const pnp = run(follower(true, 'PNP')).ac[0]!;
    npn.frequencies.forEach((_, k) => {
      const a = complex(npn.nodes['e']!.re[k]!, npn.nodes['e']!.im[k]!);
      const b = complex(pnp.nodes['e']!.re[k]!, pnp.nodes['e']!.im[k]!);
      // Observed 0 (the mirror is exact); bound 2·eps.
      expect(relErr(b, a)).toBeLessThanOrEqual(2 * Number.EPSILON);
    });
  });
});

describe('Zener incremental impedance', () => {
  const Z = { IS: 1e-14, BV: 5.1, IBV: 1e-3, NBV: 1.6 };
  const IDC = 5e-3;
  const RP = 10e3;

  /** Reverse voltage across the Zener (cathode above anode) from KCL, by bisection. */
  function vz(): number {
    // KCL at the cathode: IDC + I(−Vk) = Vk/RP with I(V) of models.md.
    const i = (v: number): number => Z.IS * (Math.exp(v / VT) - 1) - Z.IBV * Math.exp(-(v + Z.BV) / (Z.NBV * VT));
    let lo = 0;
    let hi = Z.BV + 1;
    for (let k = 0; k < 200; k++) {
      const mid = 0.5 * (lo + hi);
      if (IDC + i(-mid) - mid / RP > 0) lo = mid;
      else hi = mid;
    }
    return 0.5 * (lo + hi);
  }

  test('Z = (NBV·Vt/Iz) ∥ RP ∥ forward term, from the derivative of the breakdown exponential', () => {
    const text = [
      'weather-station reference: Zener fed by a current source',
      `I1 0 k dc ${IDC} ac 1`,
      'DZ 0 k ZREF',
      `RP k 0 ${RP}`,
      `.model ZREF D (IS=${Z.IS} BV=${Z.BV} IBV=${Z.IBV} NBV=${Z.NBV})`,
      '.ac lin 3 10 1meg',
      '.end',
      '',
    ].join('\n');
    const v = vz();
    // d/dV of −IBV·exp(−(V + BV)/(NBV·Vt)) is Iz/(NBV·Vt): rz = NBV·Vt/Iz (models.md).
    const iz = Z.IBV * Math.exp(-(-v + Z.BV) / (Z.NBV * VT));
    const rz = (Z.NBV * VT) / iz;
    const gForward = (Z.IS / VT) * Math.exp(-v / VT);
    const want = 1 / (1 / rz + gForward + 1 / RP);
    const report = run(text);
    // Observed 4.8e-11 V; bound 1.2e-10 V.
    expect(Math.abs(report.operatingPoints[0]!.nodes['k']! - v)).toBeLessThan(1.2e-10);
    const ac = report.ac[0]!;
    let worst = 0;
    ac.frequencies.forEach((_, k) => {
      worst = Math.max(worst, relErr(complex(ac.nodes['k']!.re[k]!, ac.nodes['k']!.im[k]!), complex(want, 0)));
    });
    console.log(`Zener: Iz ${(iz * 1e3).toFixed(4)} mA, rz ${rz.toFixed(4)} Ω, Z ${want.toFixed(5)} Ω; engine's worst relative error ${worst.toExponential(2)}`);
    // Observed 1.1e-9; bound 3e-9.
    expect(worst).toBeLessThan(3e-9);
  });

  test('series RS adds to the junction impedance', () => {
    const RSZ = 4;
    const lin = lineariseNetlist(
      `rs\nI1 0 k dc ${IDC} ac 1\nDZ 0 k ZREF\nRP k 0 ${RP}\n.model ZREF D (IS=${Z.IS} BV=${Z.BV} IBV=${Z.IBV} NBV=${Z.NBV} RS=${RSZ})\n.end\n`,
    );
    // The Zener branch impedance is RS + rz (series impedances add), in parallel with RP.
    // With RS the cathode sits RS·Iz higher and RP takes a little more current: KCL
    // IDC = Iz + (Vj(Iz) + RS·Iz)/RP, with Vj from inverting the breakdown exponential
    // (forward term negligible at −5 V), solved by fixed-point iteration (contraction ~1e-3).
    let izs = IDC;
    for (let k = 0; k < 50; k++) {
      const vj = Z.BV + Z.NBV * VT * Math.log(izs / Z.IBV);
      izs = IDC - (vj + RSZ * izs) / RP;
    }
    const want = 1 / (1 / (RSZ + (Z.NBV * VT) / izs) + 1 / RP);
    const got = lin.at('k', 1e3);
    // Observed 8.0e-10; bound 2e-9.
    expect(relErr(got, complex(want, 0))).toBeLessThan(2e-9);
  });
});

describe('diode junction charge', () => {
  const D = { IS: 2e-14, N: 1.3, CJO: 30e-12, VJ: 0.7, M: 0.4, TT: 5e-9 };
  const model = `.model DC D (IS=${D.IS} N=${D.N} CJO=${D.CJO} VJ=${D.VJ} M=${D.M} TT=${D.TT})`;

  test('forward bias: Y = gd + jω(Cj + TT·gd), Cj on the linear continuation above VJ/2', () => {
    const I = 1e-3;
    const lin = lineariseNetlist(`forward\nI1 0 a dc ${I} ac 1\nD1 a 0 DC\n${model}\n.end\n`);
    // Shockley inverted: Vd = N·Vt·ln(I/IS + 1); gd = dI/dV = (I + IS)/(N·Vt) (models.md).
    const vd = D.N * VT * Math.log(I / D.IS + 1);
    const gd = (I + D.IS) / (D.N * VT);
    // models.md: Q = TT·I(V) + depletion charge, so C = TT·gd + Cj(V); gmin (1e-12 S) is negligible.
    const c = depletionC(vd, D.CJO, D.VJ, D.M) + D.TT * gd;
    expect(vd).toBeGreaterThan(D.VJ / 2);
    for (const f of [1e3, 1e6, 1e8]) {
      const want = complex(gd, 2 * Math.PI * f * c);
      const z = lin.at('a', f);
      const y = complex(z.re / (z.re ** 2 + z.im ** 2), -z.im / (z.re ** 2 + z.im ** 2));
      // Observed 8.0e-10 at most; bound 2e-9.
      expect(relErr(y, want)).toBeLessThan(2e-9);
    }
  });

  test('reverse bias: Cj = CJO·(1 − V/VJ)^−M sets the corner with a parallel resistor', () => {
    const R = 100e3;
    const lin = lineariseNetlist(`reverse\nVB b 0 dc -5\nR1 b a ${R}\nI2 0 a dc 0 ac 1\nD1 a 0 DC\n${model}\n.end\n`);
    // The reverse current IS·(e^(V/NVt) − 1) ≈ −IS drops IS·R = 2 nV across R1: V(a) = −5 V.
    const cj = D.CJO * (1 + 5 / D.VJ) ** -D.M;
    for (const f of [1e3, 1 / (2 * Math.PI * R * cj), 1e7]) {
      const want = divide(complex(R, 0), complex(1, 2 * Math.PI * f * R * cj)) as Complex;
      // Observed 1.0e-7 at most; bound 2.5e-7.
      expect(relErr(lin.at('a', f), want)).toBeLessThan(2.5e-7);
    }
  });
});
