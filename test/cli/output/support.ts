/**
 * Runs the `railcheck` command in-process on netlist text written to a
 * fresh temporary folder, capturing standard output and standard error.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { expect } from 'vitest';
import { main } from '@railcheck/cli';

/** What one command line produced. */
export interface CliRun {
  readonly status: number;
  readonly out: string;
  readonly err: string;
}

/** A fresh folder for one test's files. */
export function scratchDir(): string {
  return mkdtempSync(join(tmpdir(), 'railcheck-output-'));
}

/** Writes `text` as `name` in `dir` and returns its path. */
export function writeNetlist(dir: string, text: string, name = 'stage.cir'): string {
  const path = join(dir, name);
  writeFileSync(path, text);
  return path;
}

/** Runs `railcheck <argv>` with captured io. */
export async function cli(argv: readonly string[]): Promise<CliRun> {
  const out: string[] = [];
  const err: string[] = [];
  const status = await main(argv, { out: (t) => out.push(t), err: (t) => err.push(t) });
  return { status, out: out.join('\n'), err: err.join('\n') };
}

/** Parses CSV text as written by --csv (no quoted cells expected for these names). */
export function parseCsv(text: string): { header: string[]; rows: number[][] } {
  expect(text.endsWith('\n')).toBe(true);
  const lines = text.slice(0, -1).split('\n');
  const header = lines[0]!.split(',');
  const rows = lines.slice(1).map((l) => l.split(',').map((cell) => {
    // SI units as plain decimal numbers: no prefixes, no units, nothing Number() would coerce oddly.
    expect(cell).toMatch(/^-?(\d+(\.\d*)?|\.\d+)(e[+-]?\d+)?$/i);
    return Number(cell);
  }));
  rows.forEach((r) => expect(r.length).toBe(header.length));
  return { header, rows };
}
