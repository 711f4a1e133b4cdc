/**
 * Streamed output (present/files.ts, present/json-text.ts writeJson,
 * main.ts printJson): the --csv files and the --json text written piece by
 * piece are byte for byte what the command wrote when it built each as one
 * string. The former writers are kept below as the reference (a
 * consistency check of our own two paths: the contract is docs/output.md's,
 * and the claim here is identity with the output before streaming).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { acceptedTimes, runNetlistFile, sampleTrace, type RunReport } from '@railcheck/core';
import { main } from '@railcheck/cli';
import { reportJson } from '../../../packages/cli/src/present/json.js';
import { scratchDir, writeNetlist } from './support.js';

/** The former jsonText: the whole text built as one string (arrays of plain values on one line). */
function referenceJsonText(value: unknown): string {
  const plain = (v: unknown): boolean => v === null || typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean';
  const parts: string[] = [];
  const write = (value: unknown, indent: string): void => {
    const v = value !== null && typeof value === 'object' && typeof (value as { toJSON?: unknown }).toJSON === 'function' ? (value as { toJSON: () => unknown }).toJSON() : value;
    if (v === null || typeof v !== 'object') {
      parts.push(JSON.stringify(v) ?? 'null');
      return;
    }
    const inner = `${indent}  `;
    if (Array.isArray(v)) {
      if (v.length === 0) return void parts.push('[]');
      if (v.every(plain)) return void parts.push(`[${v.map((x) => JSON.stringify(x)).join(', ')}]`);
      parts.push('[\n');
      v.forEach((x, k) => {
        parts.push(inner);
        if (x === undefined || typeof x === 'function' || typeof x === 'symbol') parts.push('null');
        else write(x, inner);
        parts.push(k < v.length - 1 ? ',\n' : '\n');
      });
      return void parts.push(`${indent}]`);
    }
    const entries = Object.entries(v as Record<string, unknown>).filter(([, x]) => x !== undefined && typeof x !== 'function' && typeof x !== 'symbol');
    if (entries.length === 0) return void parts.push('{}');
    parts.push('{\n');
    entries.forEach(([k, x], i) => {
      parts.push(`${inner}${JSON.stringify(k)}: `);
      write(x, inner);
      parts.push(i < entries.length - 1 ? ',\n' : '\n');
    });
    parts.push(`${indent}}`);
  };
  write(value, '');
  return parts.join('');
}

/** The former transientCsv: every row built, then joined into one string. */
function referenceCsv(times: readonly number[], nodes: Readonly<Record<string, readonly number[]>>): string {
  const names = Object.keys(nodes);
  const quote = (s: string): string => (/[",\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s);
  const lines = [['time', ...names].map(quote).join(',')];
  times.forEach((t, k) => lines.push([t, ...names.map((n) => nodes[n]![k]!)].map((v) => String(v)).join(',')));
  return `${lines.join('\n')}\n`;
}

/** The report's values as the former report held them: waveforms as plain arrays of numbers. */
function asArrays(v: unknown): unknown {
  if (v instanceof Float64Array) return Array.from(v);
  if (Array.isArray(v)) return v.map(asArrays);
  if (v !== null && typeof v === 'object') return Object.fromEntries(Object.entries(v).map(([k, x]) => [k, asArrays(x)]));
  return v;
}

/** The report of `file`, as the command makes it. */
function report(file: string, steps: boolean): RunReport {
  const r = runNetlistFile(file, { keepSteps: steps });
  if (!r.ok) throw new Error(r.errors.map((e) => e.message).join('; '));
  return r.report;
}

/** Runs the command with an io that takes standard output in pieces; the pieces and the status. */
async function streamed(argv: readonly string[]): Promise<{ status: number; pieces: string[] }> {
  const pieces: string[] = [];
  const status = await main(argv, { out: (t) => pieces.push(t.endsWith('\n') ? t : `${t}\n`), err: () => {}, write: (p) => pieces.push(p) });
  return { status, pieces };
}

const dir = scratchDir();
const STAGES: ReadonlyArray<{ name: string; text: string }> = [
  // A long grid (2·10^4 points) through an RC and a diode clamp, at two temperatures: two CSV files.
  {
    name: 'rc-clamp',
    text: 'rc clamp\nV1 in 0 pulse(0 5 0.1m 10u 10u 0.5m 1m)\nR1 in a 1k\nC1 a 0 100n\nD1 a 0 dz\nL1 a out 1m\nR2 out 0 470\n.model dz D (IS=1e-14 BV=3.3 IBV=1m)\n.temp 27 60\n.tran 0.5u 10m\n.end\n',
  },
  // The mains-fed example (figures at periodic steady state, so the JSON carries them too), its figures and limits left out.
  {
    name: 'follower',
    text: readFileSync(new URL('../../../examples/railway-transformer-follower.cir', import.meta.url), 'utf8').replace(/^\.(figure|limit|tran)\b.*$/gm, '').replace(/^\.end\b/im, '.tran 0.1m 0.1\n.end'),
  },
];

describe('streamed output equals the output built as one string', () => {
  for (const stage of STAGES) {
    for (const steps of [false, true]) {
      const flags = steps ? ['--steps'] : [];
      test(`${stage.name}${steps ? ' --steps' : ''}: --json`, async () => {
        const file = writeNetlist(dir, stage.text, `${stage.name}.cir`);
        const expected = `${referenceJsonText(asArrays(reportJson(report(file, steps), steps)))}\n`;
        const run = await streamed(['run', file, '--json', ...flags]);
        expect(run.status).toBe(0);
        // Streamed indeed: more than one piece.
        expect(run.pieces.length).toBeGreaterThan(1);
        expect(run.pieces.join('')).toBe(expected);
      });

      test(`${stage.name}${steps ? ' --steps' : ''}: --csv`, async () => {
        const file = writeNetlist(dir, stage.text, `${stage.name}.cir`);
        const out = join(dir, `${stage.name}${steps ? '-steps' : ''}.csv`);
        const r = report(file, steps);
        const run = await streamed(['run', file, '--csv', out, ...flags]);
        expect(run.status).toBe(0);
        r.transients.forEach((t, k) => {
          const times = steps ? acceptedTimes(t) : t.times;
          const nodes = steps ? sampleTrace(r.compiled, t.trace!, times).nodes : (asArrays(t.nodes) as Record<string, number[]>);
          const path = k === 0 ? out : out.replace(/\.csv$/, `-${k + 1}.csv`);
          expect(readFileSync(path, 'utf8')).toBe(referenceCsv(times, nodes));
        });
      });
    }
  }

  test('without a piece writer the same JSON comes whole through out', async () => {
    const file = writeNetlist(dir, STAGES[0]!.text, 'whole.cir');
    const whole: string[] = [];
    await main(['run', file, '--json'], { out: (t) => whole.push(t), err: () => {} });
    const run = await streamed(['run', file, '--json']);
    expect(whole).toHaveLength(1);
    expect(`${whole[0]}\n`).toBe(run.pieces.join(''));
  });
});
