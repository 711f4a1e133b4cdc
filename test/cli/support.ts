/**
 * Helpers for the command-line tests: the same in-process runner and
 * temporary files as the diagnostics tests use.
 */
export { cli, freshDir, STACK_LINE, writeFiles } from '../core/diagnostics/support.js';
export type { CliRun } from '../core/diagnostics/support.js';
import { freshDir, writeFiles } from '../core/diagnostics/support.js';

/** Writes `text` as a netlist file in a fresh folder; returns its path. */
export function netlistFile(text: string, name = 'stage.cir'): string {
  return writeFiles(freshDir('cli'), { [name]: text })[name]!;
}
