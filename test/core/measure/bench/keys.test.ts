/**
 * Keys a `.figure` line may carry that the measurement of that kind of
 * stage does not read (figures.md, "Stages fed from a transformer
 * secondary": a sine-fed stage's ripple is its own, so `freq`, `amp` and
 * `method` of the ripple figure, and `ripple`/`freq` of the sag figure,
 * have nothing to set). The run says so in a note instead of ignoring them.
 */
import { describe, expect, test } from 'vitest';
import { runNetlist } from '@railcheck/core';

function notes(input: string, figure: string): string[] {
  const r = runNetlist(['keys', `V1 in 0 ${input}`, 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', figure, '.end', ''].join('\n'));
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('\n'));
  return r.report.warnings.filter((w) => w.code === 'unused-key').map((w) => w.message);
}

describe('keys a sine-fed stage does not read', () => {
  test('ripple freq=, amp= and method= on a sine-fed stage each get a note', () => {
    const n = notes('sin(0 10 50)', '.figure ripple freq=50 amp=1 method=tran');
    expect(n).toHaveLength(3);
    expect(n.join('\n')).toMatch(/freq=.*not used on a sine-fed stage/);
    expect(n.join('\n')).toMatch(/method=/);
  });

  test('the same keys on a DC stage are read, so no note', () => {
    expect(notes('12', '.figure ripple freq=50 amp=0.1 method=ac')).toEqual([]);
  });

  test('line from=/to= are read on both kinds of stage', () => {
    expect(notes('sin(0 10 50)', '.figure line from=0.8 to=1.2')).toEqual([]);
  });
});

describe('limits on values a kind of stage does not have', () => {
  test('.limit line.slope on a sine-fed stage is an error that says a sine-fed stage has no such value', () => {
    const r = runNetlist(['keys', 'V1 in 0 sin(0 10 50)', 'R1 in out 1k', 'R2 out 0 1k', '.supply in=V1 out=out', '.figure line', '.limit line.slope < 1', '.end', ''].join('\n'));
    expect(r.ok).toBe(false);
    if (!r.ok) expect(r.errors.map((e) => e.message).join('\n')).toMatch(/line\.slope: a sine-fed stage does not have this value/);
  });
});
