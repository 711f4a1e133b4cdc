/**
 * The output grid sampled as the stepper accepts points (analysis/tran.ts,
 * GridSampler) equals, bit for bit, the interpolation of the kept accepted
 * points that the grid was taken from before (sampleTrace): the memory
 * saving must not move a single value. Consistency checks of our own two
 * paths (no outside reference applies: the claim is identity), with the
 * former interpolation kept below as the reference.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import * as core from '@railcheck/core';
import { runNetlist, sampleTrace } from '@railcheck/core';
import { GridSampler, outputGrid } from '@railcheck/core/internal';
import { seedFor } from '../measure/linear/support.js';

const seed = seedFor('core/transient/grid-sampler');

/** The interpolation the grid was made with before the sampler (the former analysis/tran.ts `sample`), on plain arrays. */
function reference(times: readonly number[], values: readonly number[], grid: readonly number[]): number[] {
  const out: number[] = [];
  let k = 0;
  const count = times.length;
  for (const t of grid) {
    while (k < count - 2 && times[k + 1]! < t) k++;
    const t0 = times[k]!;
    const t1 = times[Math.min(k + 1, count - 1)]!;
    const v0 = values[k]!;
    const v1 = values[Math.min(k + 1, count - 1)]!;
    out.push(t1 > t0 ? v0 + ((v1 - v0) * (t - t0)) / (t1 - t0) : v0);
  }
  return out;
}

/** Same doubles, -0 and 0 told apart. */
function expectIdentical(actual: ArrayLike<number>, expected: ArrayLike<number>): void {
  expect(actual.length).toBe(expected.length);
  for (let k = 0; k < expected.length; k++) if (!Object.is(actual[k], expected[k])) expect({ k, value: actual[k] }).toEqual({ k, value: expected[k] });
}

describe('GridSampler', () => {
  test('equals the former interpolation on random accepted points and grids (ties, before the first point, past the last)', () => {
    // Accepted times strictly increasing; grid times ascending, drawn partly from the accepted times themselves (ties).
    const run = fc
      .record({
        steps: fc.array(fc.double({ min: 1e-9, max: 1, noNaN: true }), { minLength: 0, maxLength: 40 }),
        values: fc.array(fc.double({ min: -1e6, max: 1e6, noNaN: true }), { minLength: 41, maxLength: 41 }),
        start: fc.double({ min: -0.5, max: 0.5, noNaN: true }),
        picks: fc.array(fc.oneof(fc.double({ min: -1, max: 45, noNaN: true }), fc.nat({ max: 40 }).map((i) => -(i + 1))), { maxLength: 60 }),
      })
      .map(({ steps, values, start, picks }) => {
        const times = [0];
        for (const h of steps) times.push(times[times.length - 1]! + h);
        // A negative pick -(i+1) is accepted time i exactly (when there is one).
        const grid = picks.map((p) => (p < 0 ? times[Math.min(-p - 1, times.length - 1)]! : start + p)).sort((a, b) => a - b);
        return { times, values: values.slice(0, times.length), grid };
      });
    fc.assert(
      fc.property(run, ({ times, values, grid }) => {
        // Two unknowns per point (index 0 is ground): the value and its negative.
        const sampler = new GridSampler(grid, [1, 2], 3);
        times.forEach((t, k) => sampler.accept(t, Float64Array.of(0, values[k]!, -values[k]!)));
        const [a, b] = sampler.finish();
        expectIdentical(a!, reference(times, values, grid));
        expectIdentical(b!, reference(times, values.map((v) => -v), grid));
      }),
      { seed, numRuns: 300 },
    );
  });

  test('a .tran run: every node and branch on the grid equals sampleTrace of its kept accepted points', () => {
    // Random RC/RL/diode stages under a sine and a pulse, random tstep and tstart.
    const stage = fc.record({
      r: fc.double({ min: 10, max: 1e4, noNaN: true }),
      c: fc.double({ min: 1e-7, max: 1e-5, noNaN: true }),
      l: fc.double({ min: 1e-4, max: 1e-2, noNaN: true }),
      f: fc.double({ min: 200, max: 2000, noNaN: true }),
      steps: fc.integer({ min: 7, max: 400 }),
      startShare: fc.double({ min: 0, max: 0.5, noNaN: true }),
      method: fc.constantFrom('', ' be'),
    });
    fc.assert(
      fc.property(stage, (s) => {
        const tstop = 5e-3;
        const tstep = tstop / s.steps;
        const tstart = s.startShare * tstop;
        const text = [
          'grid sampler stage',
          `V1 in 0 sin(0 5 ${s.f})`,
          `R1 in a ${s.r}`,
          'D1 a b dx',
          `C1 b 0 ${s.c}`,
          `L1 b c ${s.l}`,
          `R2 c 0 ${s.r}`,
          `V2 p 0 pulse(0 1 1m 10u 10u 1m 2m)`,
          `R3 p b ${10 * s.r}`,
          '.model dx D (IS=1e-12 CJO=2p)',
          `.tran ${tstep} ${tstop} ${tstart}${s.method}`,
          '.end',
        ].join('\n');
        const r = runNetlist(text, { keepSteps: true });
        if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
        const tr = r.report.transients[0]!;
        expect(tr.times).toEqual(outputGrid(tstep, tstart, tstop));
        const kept = sampleTrace(r.report.compiled, tr.trace!, tr.times);
        expect(Object.keys(tr.nodes)).toEqual(Object.keys(kept.nodes));
        expect(Object.keys(tr.branches)).toEqual(Object.keys(kept.branches));
        for (const [name, v] of Object.entries(kept.nodes)) expectIdentical(tr.nodes[name]!, v);
        for (const [name, v] of Object.entries(kept.branches)) expectIdentical(tr.branches[name]!, v);
      }),
      { seed, numRuns: 25 },
    );
  });

  test('without keepSteps the accepted points are not kept, and acceptedTimes says why', () => {
    const text = 'rc\nV1 in 0 pulse(0 1 0 1u 1u 1m 2m)\nR1 in out 1k\nC1 out 0 1u\n.tran 10u 2m\n.end\n';
    const without = runNetlist(text);
    const withSteps = runNetlist(text, { keepSteps: true });
    if (!without.ok || !withSteps.ok) throw new Error('the RC does not run');
    const a = without.report.transients[0]!;
    const b = withSteps.report.transients[0]!;
    expect(a.trace).toBeUndefined();
    expect(b.trace!.count).toBe(b.stats.accepted + 1);
    expectIdentical(a.nodes['out']!, b.nodes['out']!);
    expect(() => core.acceptedTimes(a)).toThrow(/keepSteps/);
    expect(runNetlist(text, { keepSteps: 'yes' as unknown as boolean })).toMatchObject({ ok: false, errors: [{ code: 'bad-argument' }] });
  });
});
