/**
 * Standard output into a pipe (present/stdio.ts): the report piped to
 * another program is the report written to a file, byte for byte, and a
 * reader that stops early (`| head -c 100`) ends the output quietly, with
 * no error and no stack trace, and the command keeps its exit status.
 * Child processes through the root launcher, on a scratch folder.
 */
import { spawnSync } from 'node:child_process';
import { readFileSync, realpathSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { describe, expect, test } from 'vitest';
import { freshDir, STACK_LINE, writeFiles } from './support.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const launcher = join(root, 'railcheck');

// A weather-station sensor rail's RC filter, run long enough that the JSON (about 1 MB) is many pipe buffers.
const STAGE = 'Sensor rail RC filter\nV1 in 0 sin(5 0.5 50)\nR1 in out 1k\nC1 out 0 10u\nR2 out 0 4k\n.tran 20u 0.4\n';

function sh(script: string, cwd: string): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync('sh', ['-c', script], { cwd, encoding: 'utf8', timeout: 120_000, maxBuffer: 1 << 28 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('standard output into a pipe', () => {
  const dir = realpathSync(freshDir('stdio'));
  writeFiles(dir, { 'stage.cir': STAGE });

  test('what comes through a pipe is what is written to a file', () => {
    const file = sh(`"${launcher}" run stage.cir --json > out.json; echo $? > status`, dir);
    expect(file.stderr).toBe('');
    expect(readFileSync(join(dir, 'status'), 'utf8').trim()).toBe('0');
    const piped = sh(`"${launcher}" run stage.cir --json | cat`, dir);
    expect(piped.status).toBe(0);
    const written = readFileSync(join(dir, 'out.json'), 'utf8');
    expect(written.length).toBeGreaterThan(500_000);
    expect(piped.stdout).toBe(written);
  });

  test('a reader that stops early ends the output quietly', () => {
    // The first status of the pipe is railcheck's (POSIX sh has no PIPESTATUS: it is written to a file).
    // The JSON is many pipe buffers long, so the reader is gone before it is written (the text report is too short to tell).
    const r = sh(`{ "${launcher}" run stage.cir --json; echo $? > status; } | head -c 100 > /dev/null`, dir);
    expect(r.stderr).not.toMatch(STACK_LINE);
    expect(r.stderr).not.toMatch(/EPIPE/);
    expect(readFileSync(join(dir, 'status'), 'utf8').trim()).toBe('0');
  });
});
