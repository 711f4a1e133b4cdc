/**
 * Every function of the public barrel called with missing, null,
 * wrong-typed, huge and NaN arguments, with objects railcheck made and
 * with hand-made copies of them: each returns (its error result where it
 * has one) or throws RailcheckError, never a TypeError or RangeError
 * (README, "Using it as a library"; the package's TSDoc: "Everything
 * returns values or throws only RailcheckError"). The functions that
 * return a result (`{ok:false,...}` on failure) must not throw at all, and
 * no call may end in an `internal` error. Seeded (FC_SEED).
 */
import fc from 'fast-check';
import { readFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import * as core from '@railcheck/core';
import { RailcheckError } from '@railcheck/core';
import { fcSeed } from '../../helpers/device-harness.js';

const seed = fcSeed('core/fuzz/library-fuzz.test.ts');
// The extreme inputs (femtosecond times, huge magnitudes) and the reproducers of pending.ts are in by default; FUZZ_PENDING=0 holds them back.
const PENDING = process.env['FUZZ_PENDING'] !== '0';

/** Real objects railcheck made, from a DC-fed example stage (fast to build). */
function made() {
  const text = readFileSync(fileURLToPath(new URL('../../../examples/sensor-rail-follower.cir', import.meta.url)), 'utf8').replace(/^\.end\b/im, '.tran 1m 10m\n.end');
  const parsed = core.parseNetlist(text, { file: 'sensor.cir' });
  if (!parsed.ok) throw new Error('the example does not parse');
  const flat = core.elaborate(parsed.netlist);
  if (!flat.ok) throw new Error('the example does not elaborate');
  const compiled = core.compileCircuit(flat.circuit);
  if (!compiled.ok) throw new Error('the example does not compile');
  const run = core.runNetlist(text, { file: 'sensor.cir', keepSteps: true });
  if (!run.ok) throw new Error(`the example does not run: ${run.errors.map((e) => e.message).join('; ')}`);
  const bench = core.createBench(compiled.circuit);
  const tran = run.report.transients[0]!;
  const diagnostic = core.errorAt('x', 'message', { file: 'f.cir', line: 2, column: 3 }, 'R1 a b', 'a number');
  return { text, parsed, netlist: parsed.netlist, flat: flat.circuit, compiled: compiled.circuit, bench, tran, trace: tran.trace!, report: run.report, diagnostic, steady: { method: 'shooting' as const, iterations: 2, periods: 10, residual: 0.1 } };
}
const M = made();
const REAL: readonly unknown[] = Object.values(M);

/** Copies of real objects with one member replaced by junk (they lose railcheck's mark, as hand-made values have none). */
const JUNK_LEAF: fc.Arbitrary<unknown> = fc.constantFrom(undefined, null, NaN, Infinity, -Infinity, 0, -1, 1e300, -1e300, 1e-300, 2 ** 53, '', 'x', 'NaN', [], {}, [1, 2], () => 1, Symbol('s'), 10n, true, new Float64Array(3), new Map(), -0);
const edited: fc.Arbitrary<unknown> = fc.tuple(fc.constantFrom(...REAL), fc.nat(), JUNK_LEAF).map(([o, k, v]) => {
  if (typeof o !== 'object' || o === null) return o;
  const keys = Object.keys(o);
  const copy: Record<string, unknown> = Array.isArray(o) ? ([...o] as unknown as Record<string, unknown>) : { ...(o as Record<string, unknown>) };
  if (keys.length > 0) copy[keys[k % keys.length]!] = v;
  return copy;
});
/** Numbers a caller might pass as options; every double unless FUZZ_PENDING=0. */
const number = PENDING ? fc.double() : fc.oneof(fc.constantFrom(NaN, Infinity, -Infinity, 0, -1, 1, 5, 10, 0.5, 1e-3, 1e300, -1e300), fc.double({ min: -20, max: 20, noNaN: true }));
const junk: fc.Arbitrary<unknown> = fc.oneof(
  { weight: 3, arbitrary: JUNK_LEAF },
  { weight: 2, arbitrary: fc.anything({ withBigInt: true, withTypedArray: true, withSparseArray: true, withMap: true, withSet: true, withDate: true, withNullPrototype: true, maxDepth: 2 }) },
  { weight: 2, arbitrary: fc.constantFrom(...REAL) },
  { weight: 2, arbitrary: edited },
  { weight: 1, arbitrary: fc.string() },
  { weight: 1, arbitrary: number },
);
/** An options object with the documented member names and junk or plausible values. */
const OPTION_NAMES = ['from', 'to', 'freq', 'amp', 'method', 'depth', 'dur', 'edge', 'fall', 'ripple', 'highLevel', 'loadRange', 'origin', 'celsius', 'file', 'readFile', 'allowOutsideIncludes'];
const options: fc.Arbitrary<unknown> = fc.dictionary(fc.constantFrom(...OPTION_NAMES), fc.oneof(junk, number, fc.constantFrom('ac', 'tran', 'both'), fc.tuple(number, number)), { maxKeys: 3 });

/** The public functions, by name, and whether each returns a result instead of throwing. */
// checkNetlists is left out: it walks folders and runs every netlist in them, so a junk path such as '.' or '/' would
// walk the machine; its argument checks are in test/core/pipeline/check.test.ts.
const FUNCTIONS = Object.entries(core).filter(([n, v]) => typeof v === 'function' && n !== 'checkNetlists') as [string, (...a: unknown[]) => unknown][];
const RETURNS_RESULT = new Set(['parseNetlist', 'readNetlistFile', 'elaborate', 'compileCircuit', 'runNetlist', 'runNetlistFile', 'prepare', 'compareNetlists', 'compareNetlistFiles', 'readBaseline', 'mergeCheckResults', 'mergeSpreadResults', 'runSampleNetlist', 'runSampleNetlistFile']);

/** What went wrong with one call, or undefined when it returned or threw only RailcheckError (and no internal error). */
function callProblem(name: string, f: (...a: unknown[]) => unknown, args: readonly unknown[]): string | undefined {
  let result: unknown;
  try {
    result = name === 'RailcheckError' ? new (f as unknown as new (...a: unknown[]) => unknown)(...args) : f(...args);
  } catch (e) {
    if (!(e instanceof RailcheckError)) return `threw ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}`;
    if (RETURNS_RESULT.has(name)) return `threw RailcheckError instead of returning its result: ${e.message}`;
    if (e.diagnostics.some((d) => d.code === 'internal')) return `internal error: ${e.message}`;
    return undefined;
  }
  if (RETURNS_RESULT.has(name) && typeof result === 'object' && result !== null && (result as { ok?: unknown }).ok === false) {
    const errors = (result as { errors: readonly core.Diagnostic[] }).errors;
    if (!Array.isArray(errors) || errors.length === 0) return 'an ok:false result without errors';
    const internal = errors.find((d) => d.code === 'internal');
    if (internal) return `internal error: ${internal.message}`;
  }
  return undefined;
}

const show = (args: readonly unknown[]): string => args.map((a) => (REAL.includes(a) ? `<real ${Object.keys(M)[REAL.indexOf(a)]}>` : fc.stringify(a))).join(', ');

describe('the public functions at their boundary', () => {
  test('the barrel has the functions this test calls', () => {
    expect(FUNCTIONS.map(([n]) => n)).toEqual(expect.arrayContaining(['runNetlist', 'measureFigures', 'sagRideThrough', 'formatSI', 'RailcheckError']));
  });

  test.each(FUNCTIONS)('%s: returns or throws only RailcheckError, whatever its arguments', (name, f) => {
    const args = fc.oneof(
      fc.array(junk, { maxLength: 4 }),
      // A real first argument with junk after it: the options and numbers are reached.
      fc.tuple(fc.constantFrom(...REAL, M.text, 'examples/sensor-rail-follower.cir'), fc.oneof(options, junk, number), fc.oneof(junk, number)).map((a) => [...a]),
    );
    fc.assert(
      fc.property(args, (a) => {
        const problem = callProblem(name, f, a);
        if (problem) throw new Error(`${name}(${show(a)}) ${problem}`);
      }),
      { seed, numRuns: 150 },
    );
  });

  test('the real objects are accepted (the checks do not refuse what railcheck made)', () => {
    // Consistency check on our own values: each call must succeed, not be refused as a bad argument.
    expect(core.sampleTrace(M.compiled, M.trace, [0, 1e-3]).nodes).toBeDefined();
    expect(core.acceptedTimes(M.tran).length).toBeGreaterThan(1);
    expect(core.lineRegulation(M.bench).delta).toBeTypeOf('number');
    expect(core.measureFigures(M.compiled).figures.length).toBeGreaterThan(0);
    expect(core.prepare(M.parsed).ok).toBe(true);
    expect(core.printNetlist(M.netlist)).toContain('.end');
    expect(core.describeSteady(M.steady)).toContain('shooting');
  });

  test('a missing argument is a bad-argument error naming the function and the parameter', () => {
    expect(() => core.formatSI(undefined as unknown as number, 'V')).toThrow(/formatSI: value is missing, expected a number/);
    const r = core.runNetlist(undefined as unknown as string);
    expect(r.ok === false && r.errors[0]).toMatchObject({ code: 'bad-argument', message: expect.stringContaining('parseNetlist: text is missing') });
    expect(() => core.lineRegulation(undefined as unknown as core.Bench)).toThrow(/lineRegulation: bench is missing, expected a bench as createBench returns it/);
  });
});
