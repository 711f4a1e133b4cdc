/**
 * Diagnostics that need more than one case of the table: includes leaving
 * the folder (netlist.md, Includes: refused unless the caller allows it),
 * several mistakes in one file (all reported in one run, netlist.md,
 * Errors), and the guard against subcircuits that multiply beyond reason.
 */
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { runNetlistFile } from '@railcheck/core';
import { cli, freshDir, STACK_LINE, writeFiles } from './support.js';

/** Number of error diagnostics printed on standard error (one `file:line:col: error:` head each). */
const errorHeads = (err: string): number => (err.match(/^\S.*:\d+:\d+: error: /gm) ?? []).length;

describe('includes outside the netlist\'s folder', () => {
  const setup = (): string => {
    const dir = freshDir('outside');
    writeFiles(dir, { 'parts.lib': '.model dm D (IS=1e-14)\n' });
    return writeFiles(dir, { 'stage/main.cir': 'Clamp\nV1 a 0 1\nR1 a b 1k\nD1 b 0 dm\n.include "../parts.lib"\n' })['stage/main.cir']!;
  };

  test('are refused by default, with the line and the path', async () => {
    const main = setup();
    const r = runNetlistFile(main);
    expect(r.ok).toBe(false);
    expect(r.ok ? [] : r.errors.map((e) => [e.pos?.line, e.pos?.column])).toContainEqual([5, 10]);
    const run = await cli(['run', main]);
    expect(run.status).toBe(2);
    expect(run.err).toContain(`${main}:5:10`);
    expect(run.err).toContain('../parts.lib');
  });

  test('are read with --allow-outside-includes (and allowOutsideIncludes)', async () => {
    const main = setup();
    expect(runNetlistFile(main, { allowOutsideIncludes: true }).ok).toBe(true);
    const run = await cli(['run', main, '--allow-outside-includes', '--json']);
    expect(run.status).toBe(0);
    expect(JSON.parse(run.out)).toMatchObject({ title: 'Clamp' });
  });

  test('a path inside the folder tree needs no permission', async () => {
    const dir = freshDir('inside');
    writeFiles(dir, { 'lib/parts.lib': '.model dm D\n' });
    const main = writeFiles(dir, { 'main.cir': 'Clamp\nV1 a 0 1\nR1 a b 1k\nD1 b 0 dm\n.include "lib/parts.lib"\n' })['main.cir']!;
    expect((await cli(['run', main])).status).toBe(0);
  });
});

describe('several mistakes in one file are all reported', () => {
  const check = async (text: string, lines: readonly number[]): Promise<void> => {
    const main = writeFiles(freshDir('several'), { 'main.cir': text })['main.cir']!;
    const r = runNetlistFile(main);
    expect(r.ok).toBe(false);
    const errors = r.ok ? [] : r.errors;
    expect(errors.map((e) => e.pos?.line ?? 0).sort((x, y) => x - y)).toEqual(lines);
    const run = await cli(['run', main]);
    expect(run.status).toBe(2);
    expect(run.out).toBe('');
    expect(errorHeads(run.err)).toBe(lines.length);
    for (const line of lines) expect(run.err).toContain(`${main}:${line}:`);
    expect(run.err).toContain(`${lines.length} errors`);
    expect(run.err).not.toMatch(STACK_LINE);
  };

  test('mistakes found while reading', async () => {
    await check('Reader mistakes\nV1 a 0 5\nR1 a b\nR2 a 0 4k7\n.options fast\nR3 b 0 0\nC1 a 0 1u ic=\n', [3, 4, 5, 6, 7]);
  });

  test('mistakes found while flattening', async () => {
    await check(
      'Flattening mistakes\n.model qq NPN\nV1 a 0 5\nR1 a b {rr}\nD1 b 0 nomodel\nD2 b 0 qq\nX1 a nosuch\nF1 a 0 VX 1\n.dc VZ 0 1 1\n',
      [4, 5, 6, 7, 8, 9],
    );
  });

  test('mistakes of topology', async () => {
    // A floating node (only C1 reaches b) and a voltage loop (V2 across V1).
    await check('Topology mistakes\nV1 a 0 5\nR1 a 0 1k\nC1 a b 1u\nV2 a 0 3\n', [4, 5]);
  });
});

describe('guards', () => {
  test('subcircuits that double at every level stop with one error instead of exhausting memory', async () => {
    let text = 'Runaway\nV1 a 0 1\nR0 a 0 1\n';
    for (let i = 0; i < 30; i++) text += `.subckt s${i} p\nX1 p s${i + 1}\nX2 p s${i + 1}\n.ends\n`;
    text += '.subckt s30 p\nR1 p 0 1k\n.ends\nX1 a s0\n';
    const main = writeFiles(freshDir('runaway'), { 'main.cir': text })['main.cir']!;
    const started = Date.now();
    const run = await cli(['run', main]);
    expect(run.status).toBe(2);
    expect(errorHeads(run.err)).toBe(1);
    expect(run.err).toMatch(/elements/);
    // 2^30 resistors would never finish; the guard answers in seconds (common practice, no source).
    expect(Date.now() - started).toBeLessThan(30_000);
  });

  test('a missing file is an error, not a crash', async () => {
    const run = await cli(['run', join(freshDir('missing'), 'nothere.cir')]);
    expect(run.status).toBe(2);
    expect(run.err).toContain('nothere.cir');
    expect(run.err).not.toMatch(STACK_LINE);
  });
});
