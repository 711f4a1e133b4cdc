/**
 * Helpers for the regression-check tests: a small suite of fast netlists
 * in a fresh folder, SI-prefixed quantities read back from messages, and
 * the check worker bundled from the sources (as test/core/fuzz/pool.ts
 * bundles its worker), with a probe that marks which threads ran.
 */
import { build } from 'esbuild';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { freshDir, writeFiles } from '../diagnostics/support.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));

/** A DC divider stage with figures: out = 12 V · R2/(R1 + R2); `r1` in ohms. */
export function dividerStage(r1: number): string {
  return `Sensor divider\nV1 in 0 12\nR1 in out ${r1}\nR2 out 0 1k\n.supply in=V1 out=out load=R2\n.figure line\n.figure load\n.limit line.slope <= 0.3\n.end\n`;
}

/** The suite: a divider stage, the Zener shunt example, a plain divider, a netlist that does not read. */
export function suiteFiles(r1 = 3000): Record<string, string> {
  return {
    'rail/divider.cir': dividerStage(r1),
    'rail/zener.cir': readFileSync(join(root, 'examples/bench-reference-shunt.cir'), 'utf8'),
    'spare/plain.cir': 'Plain divider\nV1 in 0 10\nR1 in mid 2k\nR2 mid 0 3k\n.op\n.end\n',
    'spare/broken.cir': 'Broken\nV1 in 0 12\nD1 in 0 nomodel\n.end\n',
    'spare/notes.txt': 'not a netlist',
  };
}

/** Writes the suite into a fresh folder; returns the folder. */
export function suiteDir(r1 = 3000): string {
  const dir = freshDir('check');
  writeFiles(dir, suiteFiles(r1));
  return dir;
}

const PREFIX: Readonly<Record<string, number>> = { f: 1e-15, p: 1e-12, n: 1e-9, 'µ': 1e-6, m: 1e-3, '': 1, k: 1e3, M: 1e6, G: 1e9 };

/** A quantity as railcheck prints it ("-50.8 mV", "3 kΩ", "0.25 V/V") in base units. */
export function quantity(number: string, unitWord: string, unit: string): number {
  const prefix = unitWord.slice(0, unitWord.length - unit.length);
  const scale = PREFIX[prefix];
  if (!unitWord.endsWith(unit) || scale === undefined) throw new Error(`not a quantity in ${unit}: ${number} ${unitWord}`);
  return Number(number) * scale;
}

/** Reads `now X, baseline Y, difference Z` (unit `unit`) out of a moved value's message. */
export function movedValues(message: string, unit: string): { now: number; baseline: number; difference: number } {
  const m = /now (\S+) (\S+), baseline (\S+) (\S+), difference (\S+) (\S+)/.exec(message);
  if (!m) throw new Error(`no values in: ${message}`);
  return { now: quantity(m[1]!, m[2]!, unit), baseline: quantity(m[3]!, m[4]!, unit), difference: quantity(m[5]!, m[6]!, unit) };
}

/** Bundles the check worker (through a probe that touches a file named by its thread id in CHECK_PROBE_DIR); returns the bundle's path. */
export async function bundledCheckWorker(): Promise<string> {
  const outfile = join(mkdtempSync(join(tmpdir(), 'railcheck-check-worker-')), 'check-worker.mjs');
  await build({
    entryPoints: [fileURLToPath(new URL('./check-probe-worker.ts', import.meta.url))],
    outfile, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning',
    // core's package.json says sideEffects: false; the probe's import of the worker is all side effect.
    ignoreAnnotations: true,
    nodePaths: [join(root, 'node_modules'), join(root, 'packages/core/node_modules')],
  });
  return outfile;
}
