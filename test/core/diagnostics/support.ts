/**
 * Helpers for the diagnostics tests: netlist files in a fresh temporary
 * folder, and the command line run with captured output.
 */
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join } from 'node:path';
import { main } from '@railcheck/cli';

/** A fresh folder under the system's temporary folder. */
export function freshDir(tag: string): string {
  return mkdtempSync(join(tmpdir(), `railcheck-${tag}-`));
}

/** Writes `files` (relative path → text or bytes) under `dir`; returns the absolute path of each. */
export function writeFiles(dir: string, files: Readonly<Record<string, string | Uint8Array>>): Record<string, string> {
  const paths: Record<string, string> = {};
  for (const [rel, body] of Object.entries(files)) {
    const p = join(dir, rel);
    mkdirSync(dirname(p), { recursive: true });
    writeFileSync(p, body);
    paths[rel] = p;
  }
  return paths;
}

/** What one command line produced. */
export interface CliRun {
  readonly status: number;
  readonly out: string;
  readonly err: string;
}

/** Runs `railcheck argv...` in-process with captured standard output and error. */
export async function cli(argv: readonly string[]): Promise<CliRun> {
  const out: string[] = [];
  const err: string[] = [];
  const status = await main(argv, { out: (t) => out.push(t), err: (t) => err.push(t) });
  return { status, out: out.join('\n'), err: err.join('\n') };
}

/** Lines that look like a JavaScript stack frame ("    at f (file:1:2)"). */
export const STACK_LINE = /^\s{4}at /m;

/** The fast-check seed for a file, printed once so that a failure can be replayed with FC_SEED=... */
export function seedFor(file: string): number {
  const seed = Number(process.env.FC_SEED ?? Date.now() % 2 ** 31);
  console.log(`[${file}] fast-check seed ${seed} (replay with FC_SEED=${seed})`);
  return seed;
}
