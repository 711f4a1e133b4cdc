/**
 * `railcheck merge SHARD.json... [--junit FILE] [--json]`: combines the
 * `check --json` results of shards 1..N of one run into exactly what the
 * unsharded run reports: the same text (or JSON with --json), the same
 * JUnit file, the same exit status. A shard missing, given twice, or of
 * another run is a usage error (exit 2).
 */
import { readFileSync } from 'node:fs';
import { mergeCheckResults } from '@railcheck/core';
import { flagHelp, parseArgs, type FlagSpec } from '../args.js';
import { EXIT_ERROR, EXIT_OK, type CliIo } from '../main.js';
import { netlistText } from '../present/check.js';
import { finish } from './check.js';

const MERGE_FLAGS: readonly FlagSpec[] = [
  { name: 'junit', takesValue: true, valueName: 'FILE', help: 'write the merged results as JUnit XML to FILE' },
  { name: 'json', short: 'j', takesValue: false, help: 'print the merged results as one JSON object, as check --json does' },
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Help of `railcheck merge`. */
export const MERGE_HELP = `usage: railcheck merge SHARD.json... [options]

Combines the results of railcheck check --shard K/N --json, one file per
shard (every K from 1 to N once, any order), into the report of the whole
run, as an unsharded check prints it.

options:
${flagHelp(MERGE_FLAGS)}

exit status: 0 every netlist passed, 1 a netlist failed, 2 a usage error
(a shard file missing, unreadable, given twice or of another run).`;

/** `railcheck merge SHARD.json... [options]`. */
export function mergeCommand(argv: readonly string[], io: CliIo): number {
  const parsed = parseArgs(argv, MERGE_FLAGS);
  if (!parsed.ok) {
    io.err(`railcheck merge: ${parsed.message}`);
    return EXIT_ERROR;
  }
  const { positionals, flags } = parsed.args;
  if (flags.has('help')) {
    io.out(MERGE_HELP);
    return EXIT_OK;
  }
  if (positionals.length === 0) {
    io.err(`railcheck merge: expected the shard result files (railcheck check --shard K/N --json > FILE)\n\n${MERGE_HELP}`);
    return EXIT_ERROR;
  }
  const shards: unknown[] = [];
  for (const file of positionals) {
    try {
      shards.push(JSON.parse(readFileSync(file, 'utf8')));
    } catch (e) {
      const code = (e as NodeJS.ErrnoException).code;
      io.err(`railcheck merge: ${file}: ${code === 'ENOENT' ? 'no such file' : code ? `cannot read it (${code})` : `not JSON (${e instanceof Error ? e.message : String(e)})`}`);
      return EXIT_ERROR;
    }
  }
  const merged = mergeCheckResults(shards);
  if (!merged.ok) {
    for (const e of merged.errors) io.err(`railcheck merge: ${e.message}`);
    return EXIT_ERROR;
  }
  const json = flags.has('json');
  for (const c of merged.result.cases) (json ? io.err : io.out)(netlistText(c));
  return finish(merged.result, io, json, flags.get('junit'), 'merge');
}
