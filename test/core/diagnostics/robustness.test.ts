/**
 * Whatever it is given, runNetlist returns a value and never throws
 * (docs/netlist.md, Errors: "Reading never throws anything but railcheck's
 * own error type, whatever the bytes"; runNetlist is stricter: it returns
 * values, README, "Using it as a library"), and the command line never shows a stack trace (house
 * rule: a user never sees one). Inputs: random strings, random bytes
 * decoded as latin1 and as UTF-8, and random mutations of a valid stage.
 */
import fc from 'fast-check';
import { describe, expect, test } from 'vitest';
import { runNetlist, type RunResult } from '@railcheck/core';
import { cli, freshDir, seedFor, STACK_LINE, writeFiles } from './support.js';

const seed = seedFor('diagnostics/robustness.test.ts');

/** A valid stage to mutate: subcircuit, models, parameters, sweep, supply directives. */
const VALID = `Model-railway controller rail
.param vin=16 rl=220
.subckt follower in out
RB in b 1.5k
DZ 0 b zd
Q1 in b out np
.ends follower
.model zd D (BV=9.1 IBV=5m)
.model np NPN (BF=80 VAF=60)
VIN in 0 {vin}
X1 in out follower
RL out 0 {rl}
C1 out 0 100u
.supply in=VIN out=out load=RL
.figure line
.limit line.delta <= 50m
.temp 25 60
.dc VIN 10 18 4
.op
.end
`;

const TOKENS = ['\n', ' ', '0', '.', '{', '}', '(', ')', '=', '+', '-', '*', 'k', 'meg', 'X1', 'R9', 'gnd', '.subckt', '.ends', '.param', 'e99', '%', '"', '\u0000', 'µ'];

const mutation = fc.oneof(
  fc.record({ kind: fc.constant('delete' as const), at: fc.nat(), len: fc.integer({ min: 1, max: 12 }) }),
  fc.record({ kind: fc.constant('insert' as const), at: fc.nat(), text: fc.oneof(fc.constantFrom(...TOKENS), fc.string({ maxLength: 4 })) }),
  fc.record({ kind: fc.constant('swapLines' as const), a: fc.nat(), b: fc.nat() }),
  fc.record({ kind: fc.constant('dupLine' as const), a: fc.nat() }),
);

type Mutation = typeof mutation extends fc.Arbitrary<infer T> ? T : never;

function mutate(text: string, ms: readonly Mutation[]): string {
  let t = text;
  for (const m of ms) {
    if (m.kind === 'delete') {
      const at = m.at % (t.length + 1);
      t = t.slice(0, at) + t.slice(at + m.len);
    } else if (m.kind === 'insert') {
      const at = m.at % (t.length + 1);
      t = t.slice(0, at) + m.text + t.slice(at);
    } else {
      const lines = t.split('\n');
      const a = m.a % lines.length;
      if (m.kind === 'dupLine') lines.splice(a, 0, lines[a]!);
      else {
        const b = m.b % lines.length;
        [lines[a], lines[b]] = [lines[b]!, lines[a]!];
      }
      t = lines.join('\n');
    }
  }
  return t;
}

const bytes = fc.uint8Array({ maxLength: 300 });
const inputs = fc.oneof(
  fc.string({ maxLength: 300 }),
  fc.string({ unit: 'binary', maxLength: 300 }),
  bytes.map((b) => Buffer.from(b).toString('latin1')),
  bytes.map((b) => Buffer.from(b).toString('utf8')),
  fc.array(mutation, { minLength: 1, maxLength: 6 }).map((ms) => mutate(VALID, ms)),
);

/** A result that is one of the two documented shapes, with diagnostics that are values. */
function wellFormed(r: RunResult): boolean {
  if (r.ok) return Array.isArray(r.report.operatingPoints) && r.report.operatingPoints.length > 0;
  return r.errors.length > 0 && r.errors.every((e) => e.severity === 'error' && typeof e.message === 'string' && e.message.length > 0);
}

describe('robustness', () => {
  test('the valid stage itself runs (so mutations start from a working netlist)', () => {
    const r = runNetlist(VALID);
    expect(r.ok && r.report.operatingPoints.length).toBe(2);
  });

  test('runNetlist never throws, whatever the text', () => {
    fc.assert(
      fc.property(inputs, (text) => {
        let r: RunResult | undefined;
        expect(() => (r = runNetlist(text))).not.toThrow();
        expect(wellFormed(r!)).toBe(true);
        // An internal error is a bug that reached the user as text; none may occur.
        if (r && !r.ok) expect(r.errors.filter((e) => e.code === 'internal')).toEqual([]);
      }),
      { seed, numRuns: 400 },
    );
  });

  test('the command line never prints a stack trace', async () => {
    const dir = freshDir('fuzz');
    let k = 0;
    await fc.assert(
      fc.asyncProperty(fc.oneof(inputs, bytes), async (body) => {
        const file = writeFiles(dir, { [`case${k++}.cir`]: body })[`case${k - 1}.cir`]!;
        const run = await cli(['run', file, ...(k % 2 ? ['--json'] : [])]);
        expect([0, 1, 2]).toContain(run.status);
        expect(run.err).not.toMatch(STACK_LINE);
        expect(run.out).not.toMatch(STACK_LINE);
        expect(run.err).not.toMatch(/internal error/);
        if (run.status === 2) expect(run.err.length).toBeGreaterThan(0);
      }),
      { seed, numRuns: 120 },
    );
  });
});
