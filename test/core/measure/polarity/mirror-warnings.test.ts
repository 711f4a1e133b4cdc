/**
 * Warnings and figures of negative rails against their positive mirrors
 * (docs/figures.md, "Negative rails"). The mirror of a stage negates every
 * source and reverses every polar device: diodes anode for cathode, NPN for
 * PNP with the same parameters. Circuit theory says every node voltage and
 * branch current of the mirror is the negative of the original's (the
 * Shockley diode equation is odd under that reflection, and the Ebers-Moll
 * equations of a PNP are those of the NPN with every junction voltage and
 * terminal current negated: J. J. Ebers, J. L. Moll, Proc. IRE 42, 1954;
 * from memory). So figures, which are taken on magnitudes, must be equal,
 * `dropout.vin` must change sign, and every warning must fire on the same
 * line. The stages are the weather-station sensor rail (examples/) and a
 * half-wave transformer-fed follower invented here.
 */
import { describe, expect, test } from 'vitest';
import { formatDiagnostic, runNetlist, type RunReport } from '@railcheck/core';

function run(text: string): RunReport {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(`the netlist should run:\n${r.errors.map(formatDiagnostic).join('\n')}`);
  return r.report;
}

/** Warning codes with their lines, sorted: where each warning fired. */
const where = (r: RunReport): string[] => r.warnings.map((w) => `${w.code}@${w.pos?.line ?? '-'}`).sort();

/** Largest relative difference of the magnitudes of two sets of figures, which must have the same names. */
function largestDifference(a: Readonly<Record<string, number>>, b: Readonly<Record<string, number>>): number {
  expect(Object.keys(b).sort()).toEqual(Object.keys(a).sort());
  let worst = 0;
  for (const [name, v] of Object.entries(a)) {
    const w = b[name]!;
    const d = Math.abs(Math.abs(v) - Math.abs(w)) / Math.max(Math.abs(v), 1e-12);
    worst = Math.max(worst, d);
  }
  return worst;
}

/**
 * The sensor-rail follower (examples/sensor-rail-follower.cir) with small
 * ratings so that the rating warnings fire, a line range that starts below
 * dropout, and a ripple large enough to leave the linear range. `load`
 * chooses how the load current source is written: taking its value out of
 * the rail (`out 0` on the positive rail) or, equally, `0 out` with the
 * value negated.
 */
function sensorRail(sign: 1 | -1, load: 'plain' | 'negated', extra: readonly string[] = []): string {
  const pos = sign > 0;
  const iload = load === 'plain' ? (pos ? 'ILOAD out 0 50m' : 'ILOAD 0 out 50m') : pos ? 'ILOAD 0 out -50m' : 'ILOAD out 0 -50m';
  return [
    'Weather-station sensor rail, mirrored',
    `VBAT in 0 dc ${sign * 12}`,
    'RB in ref 680 pmax=0.05',
    pos ? 'DZ 0 ref ZREF' : 'DZ ref 0 ZREF',
    'CREF ref 0 47u',
    `Q1 in ref out ${pos ? 'NPASS' : 'PPASS'}`,
    'RBLEED out 0 1k',
    'COUT out 0 100u',
    iload,
    '.model ZREF D (IS=1e-14 N=1 BV=5.6 IBV=5m NBV=1.4 RS=3 PMAX=0.5)',
    `.model ${pos ? 'NPASS NPN' : 'PPASS PNP'} (IS=2e-13 BF=150 VAF=90 RB=10 PMAX=0.3)`,
    '.supply in=VBAT out=out load=ILOAD',
    ...extra,
    '.end',
  ].join('\n');
}

const SENSOR_FIGURES = (sign: 1 | -1): string[] => [
  `.figure line from=${sign * 6} to=${sign * 13}`, // below the dropout input (about 6.6 V)
  '.figure load',
  '.figure dropout',
  '.figure ripple amp=5.5', // 5.5 V peak on 12 V: the trough reaches dropout
  '.figure dissipation',
  '.figure sag depth=30% dur=50m',
];

describe('a negative DC rail warns exactly where its positive mirror does', () => {
  const positive = run(sensorRail(1, 'plain', SENSOR_FIGURES(1)));

  test('the positive stage fires every warning looked at here', () => {
    // By hand: RB carries (12 − 5.6 V)/680 Ω ≈ 9.4 mA, ≈ 60 mW > 50 mW; Q1 drops about 7 V at about 55 mA, ≈ 0.38 W > 0.3 W;
    // the follower needs about 5.6 + 1 V, so a line range from 6 V starts below dropout.
    expect(where(positive)).toEqual(['line-below-dropout@13', 'over-rating@3', 'over-rating@6', 'ripple-disagree@12'].sort());
  });

  for (const load of ['plain', 'negated'] as const) {
    test(`the mirror (load written ${load}) fires the same warnings on the same lines, with the same figures`, () => {
      const negative = run(sensorRail(-1, load, SENSOR_FIGURES(-1)));
      expect(where(negative)).toEqual(where(positive));
      const p = positive.figures!.values;
      const n = negative.figures!.values;
      // Observed: 1.9e-6 at most (ripple.out_pp, a transient at periodic steady state, whose steps differ by rounding); the DC figures agree to 4e-11.
      expect(largestDifference(p, n)).toBeLessThan(5e-6);
      expect(n['dropout.vin']).toBeCloseTo(-p['dropout.vin']!, 6);
      for (const name of ['load.delta', 'load.rout', 'line.delta', 'dropout.v', 'dropout.headroom', 'sag.fall']) expect(n[name], name).toBeGreaterThan(0);
      expect(negative.figures!.voutNominal).toBeCloseTo(-positive.figures!.voutNominal!, 9);
    });
  }

  test('a positive load written from ground into out with a negative value gives the same figures', () => {
    const other = run(sensorRail(1, 'negated', SENSOR_FIGURES(1)));
    expect(where(other)).toEqual(where(positive));
    // The same circuit written two ways: equal to rounding.
    expect(largestDifference(positive.figures!.values, other.figures!.values)).toBeLessThan(1e-9);
    expect(other.figures!.values['load.rout']).toBeGreaterThan(0);
  });

  test('without a load on .supply, both say efficiency cannot be had, at the dissipation line', () => {
    const strip = (t: string): string => t.replace(' load=ILOAD', '');
    const p = run(strip(sensorRail(1, 'plain', ['.figure dissipation'])));
    const n = run(strip(sensorRail(-1, 'plain', ['.figure dissipation'])));
    expect(where(p)).toContain('no-efficiency@13');
    expect(where(n)).toEqual(where(p));
  });

  test('a line range written as magnitudes on a negative stage is refused at its key, not measured on a reversed input', () => {
    const r = runNetlist(sensorRail(-1, 'plain', ['.figure line from=10.8 to=13.2']), { file: 'rail.cir' });
    expect(r.ok).toBe(false);
    if (r.ok) return;
    expect(r.errors.map((e) => e.code)).toEqual(['bad-figure-key', 'bad-figure-key']);
    expect(r.errors[0]!.message).toMatch(/from=10\.8/);
    expect(r.errors[0]!.expected).toMatch(/< 0 V/);
    // The same range with its sign is measured, and not taken as below dropout.
    expect(run(sensorRail(-1, 'plain', ['.figure line from=-10.8 to=-13.2'])).warnings.map((w) => w.code)).not.toContain('line-below-dropout');
  });
});

/** A half-wave rectifier, reservoir and Zener follower fed from a transformer secondary (VSEC), mirrored by `sign`. */
function halfWave(sign: 1 | -1, extra: readonly string[]): string {
  const pos = sign > 0;
  return [
    'Half-wave accessory rail, mirrored',
    `VSEC a 0 sin(0 ${sign * 15} 50)`,
    pos ? 'D1 a res DR' : 'D1 res a DR',
    'CRES res 0 1000u',
    'RB res ref 1k',
    pos ? 'DZ 0 ref ZREF' : 'DZ ref 0 ZREF',
    `Q1 res ref out ${pos ? 'NPASS' : 'PPASS'}`,
    pos ? 'ILOAD out 0 50m' : 'ILOAD out 0 -50m',
    '.model DR D (IS=1e-9 N=1.8 RS=0.05)',
    '.model ZREF D (IS=1e-14 N=1 BV=8.2 IBV=5m NBV=1.4 RS=3)',
    `.model ${pos ? 'NPASS NPN' : 'PPASS PNP'} (IS=2e-13 BF=150 VAF=90 RB=10)`,
    '.supply in=VSEC out=out load=ILOAD feed=res',
    ...extra,
    '.end',
  ].join('\n');
}

describe('a negative sine-fed rail is measured on magnitudes like its positive mirror', () => {
  const figures = ['.figure line from=0.7', '.figure load', '.figure dropout fall=5%', '.figure ripple', '.figure sag depth=20% dur=40m'];

  test('same figures and the same warnings (a line range from below dropout.ratio)', () => {
    const p = run(halfWave(1, figures));
    const n = run(halfWave(-1, figures));
    // By hand: the reservoir peaks near 15 V − 1 V and the follower needs about 8.2 − 0.7 + 0.7 V + headroom, so 0.7 × 15 V is below dropout.
    expect(where(p)).toEqual(['line-below-dropout@13']);
    expect(where(n)).toEqual(where(p));
    // Observed: 1.6e-4 at most, on dropout.headroom = 1 − dropout.ratio (the ratios differ by 3.5e-5: the search's
    // margin is a periodic mean, accurate to the transient's own error, and the two mirrors' steps differ by
    // rounding); line.delta 1.6e-5 (out of regulation); the others below 1e-6.
    expect(largestDifference(p.figures!.values, n.figures!.values)).toBeLessThan(4e-4);
    for (const name of ['line.delta', 'load.delta', 'load.rout', 'headroom.min', 'sag.fall', 'dropout.headroom']) expect(n.figures!.values[name], name).toBeGreaterThan(0);
    expect(n.figures!.voutNominal).toBeLessThan(0);
    expect(n.figures!.voutNominal).toBeCloseTo(-p.figures!.voutNominal!, 6);
  });
});
