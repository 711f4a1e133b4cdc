/**
 * Runs the `railcheck` command in-process on netlist text written to a
 * fresh temporary folder, capturing standard output and standard error.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { main } from '@railcheck/cli';

/** What one command line produced. */
export interface CliRun {
  readonly status: number;
  readonly out: string;
  readonly err: string;
  /** Path of the netlist that was run. */
  readonly file: string;
}

/** The JSON members these tests read (docs/output.md, "The JSON object"). */
export interface FiguresJson {
  figures: Record<string, number>;
  limits: { figure: string; op: string; value: number; actual: number; pass: boolean; status: 'pass' | 'fail' | 'not-evaluated'; reason?: string }[];
  /** docs/output.md: what could not be measured, with the reason and its place. */
  not_measured: { figure: string; value?: string; code: string; reason: string; expected?: string; file?: string; line?: number; column?: number }[];
  warnings: string[];
}

/** Writes the netlist lines (plus `.end`) to a fresh folder and runs `railcheck run FILE ...flags`. */
export async function runLines(lines: readonly string[], flags: readonly string[] = []): Promise<CliRun> {
  const file = join(mkdtempSync(join(tmpdir(), 'railcheck-figures-')), 'stage.cir');
  writeFileSync(file, [...lines, '.end', ''].join('\n'));
  const out: string[] = [];
  const err: string[] = [];
  const status = await main(['run', file, ...flags], { out: (t) => out.push(t), err: (t) => err.push(t) });
  return { status, out: out.join('\n'), err: err.join('\n'), file };
}

/** Runs with --json and parses standard output (status not checked here). */
export async function runJson(lines: readonly string[]): Promise<{ status: number; json: FiguresJson; err: string }> {
  const r = await runLines(lines, ['--json']);
  if (r.out === '') throw new Error(`no JSON on standard output (status ${r.status}):\n${r.err}`);
  return { status: r.status, json: JSON.parse(r.out) as FiguresJson, err: r.err };
}
