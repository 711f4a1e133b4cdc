/**
 * Output files of `railcheck run` (docs/output.md, "Output files"): --csv
 * onto the netlist is refused (also through a link or another spelling of
 * its path), a file that cannot be finished leaves nothing under the name
 * asked for, and a set of files (one per transient) appears whole or not
 * at all. The expectations are the rules stated in output.md.
 */
import { describe, expect, test } from 'vitest';
import { existsSync, mkdirSync, readdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { cli, scratchDir, writeNetlist } from './support.js';

/** A weather-station sensor rail's RC filter, transient at two temperatures (so two CSV files). */
const STAGE = ['sensor rail filter', 'V1 in 0 5', 'R1 in out 1k', 'C1 out 0 1u', '.temp 27 75', '.tran 0.1m 1m', '.end', ''].join('\n');

describe('output files', () => {
  test('--csv onto the netlist is refused before anything runs, and the netlist is left as it was', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, STAGE);
    const r = await cli(['run', file, '--csv', file]);
    expect(r.status).toBe(2);
    expect(r.err).toContain('is the netlist');
    expect(r.out).toBe('');
    expect(readFileSync(file, 'utf8')).toBe(STAGE);
    // Another spelling of the same path, and a link to the netlist, are caught on the real path.
    const spelled = await cli(['run', file, '--csv', join(dir, '.', 'sub', '..', 'stage.cir')]);
    expect(spelled.status).toBe(2);
    symlinkSync(file, join(dir, 'waves.csv'));
    const linked = await cli(['run', file, '--csv', join(dir, 'waves.csv')]);
    expect(linked.status).toBe(2);
    expect(linked.err).toContain('is the netlist');
    const rel = await cli(['run', file, '--csv', relative(process.cwd(), file)]);
    expect(rel.status).toBe(2);
    expect(readFileSync(file, 'utf8')).toBe(STAGE);
  });

  test('a further file of the set onto the netlist is refused too, and then none of the set is written', async () => {
    const dir = scratchDir();
    // The second transient's file is "<name>-2.csv": name the netlist so.
    const file = writeNetlist(dir, STAGE, 'w-2.csv');
    const r = await cli(['run', file, '--csv', join(dir, 'w.csv')]);
    expect(r.status).toBe(2);
    expect(r.err).toContain('is the netlist');
    expect(existsSync(join(dir, 'w.csv'))).toBe(false);
    expect(readFileSync(file, 'utf8')).toBe(STAGE);
  });

  test('a set writes whole: both files appear; an existing file is replaced whole; no temporary file is left', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, STAGE);
    writeFileSync(join(dir, 'w.csv'), 'old contents that are much longer than nothing\n'.repeat(1000));
    const r = await cli(['run', file, '--csv', join(dir, 'w.csv')]);
    expect(r.status).toBe(0);
    for (const name of ['w.csv', 'w-2.csv']) expect(readFileSync(join(dir, name), 'utf8').split('\n')[0]).toBe('time,in,out');
    expect(readFileSync(join(dir, 'w.csv'), 'utf8')).not.toContain('old contents');
    expect(readdirSync(dir).sort()).toEqual(['stage.cir', 'w-2.csv', 'w.csv']);
  });

  test('when one file of the set cannot be written, none is, an old file keeps its contents, and no temporary file is left', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, STAGE);
    writeFileSync(join(dir, 'w.csv'), 'kept\n');
    mkdirSync(join(dir, 'w-2.csv')); // a folder where the second file should go
    const r = await cli(['run', file, '--csv', join(dir, 'w.csv')]);
    expect(r.status).toBe(2);
    expect(r.err).toContain('w-2.csv');
    expect(readFileSync(join(dir, 'w.csv'), 'utf8')).toBe('kept\n');
    expect(readdirSync(dir).sort()).toEqual(['stage.cir', 'w-2.csv', 'w.csv']);
  });

  test('a folder that does not exist is an error with no file left behind', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, STAGE);
    const r = await cli(['run', file, '--csv', join(dir, 'none', 'w.csv')]);
    expect(r.status).toBe(2);
    expect(r.err).toContain('no output file was written');
    expect(readdirSync(dir)).toEqual(['stage.cir']);
  });

  test('a link as the output name is followed: the file it points to is replaced and the link stays', async () => {
    const dir = scratchDir();
    const file = writeNetlist(dir, STAGE);
    mkdirSync(join(dir, 'out'));
    writeFileSync(join(dir, 'out', 'real.csv'), 'old\n');
    symlinkSync(join(dir, 'out', 'real.csv'), join(dir, 'w.csv'));
    const single = STAGE.replace('.temp 27 75', '.temp 27');
    writeFileSync(file, single);
    const r = await cli(['run', file, '--csv', join(dir, 'w.csv')]);
    expect(r.status).toBe(0);
    expect(readFileSync(join(dir, 'out', 'real.csv'), 'utf8').startsWith('time,in,out')).toBe(true);
    expect(readdirSync(join(dir, 'out'))).toEqual(['real.csv']);
  });
});
