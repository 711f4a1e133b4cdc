/**
 * The bundled command as a user starts it: `node scripts/build.mjs`, then
 * `node packages/cli/dist/railcheck.mjs run FILE --json` in a child process.
 * Two spawns only (they are slow): a good netlist (exit 0, one JSON object,
 * values by Ohm's law) and a broken one (exit 2, docs/output.md, Exit status;
 * the position on standard error, no stack trace).
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { fileURLToPath } from 'node:url';
import { join } from 'node:path';
import { beforeAll, describe, expect, test } from 'vitest';
import { netlistFile, STACK_LINE } from './support.js';

const root = fileURLToPath(new URL('../../', import.meta.url));
const bundle = join(root, 'packages/cli/dist/railcheck.mjs');

function spawnCli(args: readonly string[]): { status: number | null; stdout: string; stderr: string } {
  const r = spawnSync(process.execPath, [bundle, ...args], { cwd: root, encoding: 'utf8', timeout: 60_000 });
  return { status: r.status, stdout: r.stdout, stderr: r.stderr };
}

describe('the bundled railcheck command', () => {
  beforeAll(() => {
    execFileSync(process.execPath, [join(root, 'scripts/build.mjs')], { cwd: root, stdio: 'pipe', timeout: 120_000 });
  }, 130_000);

  test('run FILE --json exits 0 and prints one JSON object with the divider\'s values', () => {
    const file = netlistFile('Bench divider\nV1 in 0 12\nR1 in out 3k\nR2 out 0 1k\n.op\n');
    const r = spawnCli(['run', file, '--json']);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const json = JSON.parse(r.stdout) as { title: string; op: { nodes: Record<string, number>; currents: Record<string, number> } };
    expect(json.title).toBe('Bench divider');
    // Ohm's law: 12 V across 4 kΩ is 3 mA; out sits 1k × 3 mA above ground.
    // Observed 0 for both (exact); bounds 2·eps·|value|.
    expect(Math.abs(json.op.nodes['out']! - 3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3);
    expect(Math.abs(json.op.currents['R1']! - 3e-3)).toBeLessThanOrEqual(2 * Number.EPSILON * 3e-3);
  });

  test('a broken netlist exits 2 with the position on standard error and no stack trace', () => {
    const file = netlistFile('Broken\nV1 in 0 12\nD1 in 0 nomodel\n');
    const r = spawnCli(['run', file]);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toContain(`${file}:3:1`);
    expect(r.stderr).toContain('D1 in 0 nomodel');
    expect(r.stderr).not.toMatch(STACK_LINE);
  });
});
