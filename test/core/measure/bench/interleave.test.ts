/**
 * Benches share nothing: two benches made from one compiled circuit give
 * the same figures, to the last bit, whatever order their figure calls
 * interleave in, and whatever the caller does with the circuit between
 * them; a bench measures at the circuit's first `.temp` (figures.md). The
 * reference for each figure is the same figure measured alone on a fresh
 * bench, so these are checks of isolation, not of the figures' values
 * (those are in test/core/measure/linear and examples). The temperature
 * check is against the forward drop of a silicon junction, which falls by
 * roughly 2 mV per kelvin (common practice, from memory; Sedra and Smith,
 * Microelectronic Circuits, give −2 mV/°C).
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { createBench, dissipation, dropout, lineRegulation, loadRegulation, parseNetlist, prepare, rippleRejection, runNetlist, sagRideThrough, type Bench, type CompiledCircuit } from '@railcheck/core';
import { operatingPoint } from '@railcheck/core/internal';
import { seedFor } from '../linear/support.js';

const seed = seedFor('measure/bench/interleave');

function compile(text: string): CompiledCircuit {
  const p = prepare(parseNetlist(text));
  if (!p.ok) throw new Error(p.errors.map((e) => e.message).join('\n'));
  return p.compiled;
}

/** The example's Zener-referenced follower (nonlinear: junction memory is state a bench could leak). */
const follower = compile(readFileSync(new URL('../../../../examples/sensor-rail-follower.cir', import.meta.url), 'utf8'));

/** The six figures through the library, each a function of a bench only (a short dip keeps the sag cheap). */
const FIGURES = {
  line: (b: Bench) => lineRegulation(b),
  load: (b: Bench) => loadRegulation(b),
  // Ends its walk with the load open: the pass transistor's junction far from its nominal bias.
  unload: (b: Bench) => loadRegulation(b, { from: b.loadNominal, to: 0 }),
  dropout: (b: Bench) => dropout(b),
  ripple: (b: Bench) => rippleRejection(b, { freq: 100 }),
  dissipation: (b: Bench) => dissipation(b),
  sag: (b: Bench) => sagRideThrough(b, { depth: 0.3, dur: 0.01 }),
} as const;
type Name = keyof typeof FIGURES;
const NAMES = Object.keys(FIGURES) as Name[];

/** Each figure alone, on a bench made for it. */
const alone = (c: CompiledCircuit): Record<Name, unknown> => Object.fromEntries(NAMES.map((n) => [n, FIGURES[n](createBench(c))])) as Record<Name, unknown>;

/** The shared circuit's own operating point: benches must leave it as it was. */
const sharedPoint = (c: CompiledCircuit) => operatingPoint(c, 27);

const reference = alone(follower);

describe('two benches on one compiled circuit', () => {
  const before = sharedPoint(follower);

  test('any interleaving of their figure calls gives each figure as measured alone (fast-check)', () => {
    // A step is a figure on bench 0 or 1, or the caller solving the shared circuit's operating point.
    const step = fc.record({ bench: fc.constantFrom(0, 1, 'caller' as const), figure: fc.constantFrom(...NAMES) });
    fc.assert(
      fc.property(fc.array(step, { minLength: 2, maxLength: 10 }), (steps) => {
        const benches = [createBench(follower), createBench(follower)];
        for (const s of steps) {
          if (s.bench === 'caller') expect(sharedPoint(follower)).toEqual(before);
          else expect(FIGURES[s.figure](benches[s.bench]!)).toEqual(reference[s.figure]);
        }
      }),
      { seed, numRuns: 25 },
    );
  });

  test('every figure in reverse order on one bench, alternating with a second bench in forward order', () => {
    const [a, b] = [createBench(follower), createBench(follower)];
    for (let k = 0; k < NAMES.length; k++) {
      expect(FIGURES[NAMES[NAMES.length - 1 - k]!](a)).toEqual(reference[NAMES[NAMES.length - 1 - k]!]);
      expect(FIGURES[NAMES[k]!](b)).toEqual(reference[NAMES[k]!]);
    }
    expect(sharedPoint(follower)).toEqual(before);
  });
});

describe('walks on one bench', () => {
  test('two walks (each continuing from its own last solve) interleaved give what each gives alone', () => {
    const levels = { a: [11, 9, 7.5, 6.8], b: [13, 8, 12] };
    const bench = createBench(follower);
    const load = bench.loadNominal;
    const aloneA = (() => { const w = bench.walk(); return levels.a.map((level) => w.solve({ level, loadAmps: load }, 'a')); })();
    const aloneB = (() => { const w = bench.walk(); return levels.b.map((level) => w.solve({ level, loadAmps: load }, 'b')); })();
    const [wa, wb] = [bench.walk(), bench.walk()];
    const mixedA = [];
    const mixedB = [];
    for (let k = 0; k < 4; k++) {
      mixedA.push(wa.solve({ level: levels.a[k]!, loadAmps: load }, 'a'));
      if (k < levels.b.length) mixedB.push(wb.solve({ level: levels.b[k]!, loadAmps: load }, 'b'));
      // A figure in between, on the same bench.
      expect(lineRegulation(bench)).toEqual(reference.line);
    }
    expect(mixedA).toEqual(aloneA);
    expect(mixedB).toEqual(aloneB);
  });
});

describe('two sine-fed benches on one compiled circuit', () => {
  // A half-wave rectifier into a reservoir with a bleeder and a resistor load: cheap to bring to periodic
  // steady state (without the bleeder the reservoir has no discharge path at zero load and never settles).
  const rectifier = compile(['half-wave reservoir', 'V1 a 0 sin(0 12 50)', 'D1 a res DR', 'C1 res 0 220u', 'RBL res 0 4.7k', 'R1 res out 10', 'RL out 0 470', '.model DR D (IS=1e-9 N=1.8)', '.supply in=V1 out=out load=RL feed=res', '.end', ''].join('\n'));
  const some: Name[] = ['line', 'load', 'ripple', 'dissipation'];

  test('figures interleaved on two benches equal each measured alone', () => {
    const reference = Object.fromEntries(some.map((n) => [n, FIGURES[n](createBench(rectifier))]));
    const [a, b] = [createBench(rectifier), createBench(rectifier)];
    for (let k = 0; k < some.length; k++) {
      expect(FIGURES[some[k]!](a)).toEqual(reference[some[k]!]);
      expect(FIGURES[some[some.length - 1 - k]!](b)).toEqual(reference[some[some.length - 1 - k]!]);
    }
  });
});

describe('the temperature of the figures', () => {
  // A diode fed through 10 kΩ from 12 V: Vout is the forward drop at about 1.1 mA.
  const text = (temps: string) => ['diode drop', 'V1 in 0 12', 'R1 in out 10k', 'D1 out 0 DS', '.model DS D (IS=1e-14)', '.supply in=V1 out=out', '.figure line', temps, '.end', ''].join('\n');

  test('a bench measures at the first .temp, as the run reports its operating point there', () => {
    const c = compile(text('.temp 75 27'));
    const run = runNetlist(text('.temp 75 27'));
    if (!run.ok) throw new Error('expected the run to succeed');
    const [hot, room] = run.report.operatingPoints;
    const bench = createBench(c);
    expect(bench.voutNominal).toBeCloseTo(hot!.nodes.out!, 9);
    expect(createBench(c, { celsius: 27 }).voutNominal).toBeCloseTo(room!.nodes.out!, 9);
    expect(run.report.figures?.voutNominal).toBeCloseTo(hot!.nodes.out!, 9);
    // About −2 mV/K over 48 K (common practice); the band allows −1.2 to −2.6 mV/K.
    const perKelvin = (bench.voutNominal - createBench(c, { celsius: 27 }).voutNominal) / 48;
    expect(perKelvin).toBeLessThan(-1.2e-3);
    expect(perKelvin).toBeGreaterThan(-2.6e-3);
  });
});
