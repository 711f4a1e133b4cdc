/**
 * Figures of a negative rail are taken on magnitudes (docs/figures.md): a
 * divider fed from −Vin must give the same figures as its mirror image fed
 * from +Vin. The reference is the mirror circuit and, independently, the
 * divider's closed form (voltage divider and Thévenin; any circuit-theory
 * text, from memory).
 */
import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { runNetlist } from '@railcheck/core';

const seed = Number(process.env.FC_SEED ?? Date.now() % 2 ** 31);
console.log(`negative-rail.test.ts fast-check seed ${seed} (replay with FC_SEED=${seed})`);

function stage(sign: 1 | -1, vin: number, r1: number, r2: number, iload: number): string {
  // The load draws current away from the rail: out → 0 on a positive rail, 0 → out on a negative one.
  const load = sign > 0 ? `ILOAD out 0 ${iload}` : `ILOAD 0 out ${iload}`;
  return [
    'divider rail',
    `VIN in 0 dc ${sign * vin}`,
    `R1 in out ${r1}`,
    `R2 out 0 ${r2}`,
    load,
    '.supply in=VIN out=out load=ILOAD',
    '.figure line',
    '.figure load',
    '.figure dropout',
    '.figure sag depth=10% dur=10m',
    '.end',
  ].join('\n');
}

function figures(text: string): Record<string, number> {
  const r = runNetlist(text);
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
  return { ...r.report.figures!.values };
}

describe('negative rails', () => {
  it('give the figures of their mirror image, and the divider closed form', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 5, max: 30, noNaN: true }),
        fc.double({ min: 100, max: 10_000, noNaN: true }),
        fc.double({ min: 100, max: 10_000, noNaN: true }),
        fc.double({ min: 1e-5, max: 1e-4, noNaN: true }),
        (vin, r1, r2, iload) => {
          // A rail of at least half a volt, so that the 100 mV dropout criterion can be met.
          fc.pre((r2 / (r1 + r2)) * vin - iload * ((r1 * r2) / (r1 + r2)) > 0.5);
          const pos = figures(stage(1, vin, r1, r2, iload));
          const neg = figures(stage(-1, vin, r1, r2, iload));
          for (const name of ['line.delta', 'line.slope', 'line.pct_per_v', 'load.delta', 'load.pct', 'load.rout', 'dropout.v', 'dropout.headroom', 'sag.fall', 'sag.pass']) {
            // The mirror image is exact: observed 0 over FC_SEED 20261201, 1–13 and 424242; bound 2·eps·|value|.
            expect(Math.abs(neg[name]! - pos[name]!), name).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(pos[name]!));
          }
          expect(Math.abs(neg['dropout.vin']! + pos['dropout.vin']!)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(pos['dropout.vin']!));
          // Closed form: |Vout| = k·|Vin| − I·Rth with k = R2/(R1+R2), Rth = R1∥R2.
          const k = r2 / (r1 + r2);
          const rth = (r1 * r2) / (r1 + r2);
          // Worst observed 1.4e-15, 4.5e-10 Ω and 7.1e-15 V over FC_SEED 20261201, 1–13 and 424242; bounds 3.6e-15, 1.2e-9 Ω, 1.8e-14 V.
          expect(Math.abs(neg['line.slope']! - k)).toBeLessThan(3.6e-15);
          expect(Math.abs(neg['load.rout']! - rth)).toBeLessThan(1.2e-9);
          const voutNom = k * vin - iload * rth;
          expect(Math.abs(neg['dropout.vin']! + (voutNom - 0.1 + iload * rth) / k)).toBeLessThan(1.8e-14);
        },
      ),
      { seed, numRuns: 10 },
    );
  });
});
