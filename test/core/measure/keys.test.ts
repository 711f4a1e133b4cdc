/**
 * A `.figure` key outside its range (docs/figures.md, "Key ranges") leaves
 * that figure not measured, with the reason at its `.figure` line, instead
 * of a measurement that never ends (a ripple at 0 Hz has an infinite
 * period) or means nothing (a dip of 150 %); the other figures are measured.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';

const stage = (figure: string): string => ['divider', 'V1 in 0 12', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', figure, '.figure line', '.end', ''].join('\n');

describe('figure keys out of range', () => {
  for (const figure of ['.figure ripple freq=0', '.figure ripple amp=0', '.figure sag dur=0', '.figure sag dur=1e6', '.figure sag depth=150%', '.figure sag depth=-10%', '.figure sag edge=1e3', '.figure sag fall=-1']) {
    test(`${figure}: not measured, located at its line`, () => {
      const r = runNetlist(stage(figure));
      if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
      const [bad, line] = r.report.figures!.figures;
      expect(bad!.ok).toBe(false);
      if (bad!.ok) return;
      expect(bad!.reason.code).toBe('bad-figure-key');
      expect(bad!.reason.pos?.line).toBe(6);
      // The line figure of the 1:1 divider is still measured: 0.5 V/V (voltage-divider rule).
      expect(line!.ok && line!.values['line.slope']).toBeCloseTo(0.5, 12);
    });
  }
});
