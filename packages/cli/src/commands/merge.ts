/**
 * `railcheck merge SHARD.json... [--junit FILE] [--json]`: combines the
 * `check --json` or the `spread --json` results of shards 1..N of one run
 * into exactly what the unsharded run reports: the same text (or JSON with
 * --json), the same JUnit file (check), the same exit status. The shards'
 * `format` member tells a check from a spread. A shard missing, given
 * twice, of another run or of another command is a usage error (exit 2).
 */
import { readFileSync } from 'node:fs';
import { mergeCheckResults, mergeSpreadResults, SPREAD_FORMAT } from '@railcheck/core';
import { commandArgs, flagHelp, type FlagSpec } from '../args.js';
import { EXIT_ERROR, type CliIo } from '../main.js';
import { netlistText } from '../present/check.js';
import { finish } from './check.js';
import { presentSpread } from './spread.js';

const MERGE_FLAGS: readonly FlagSpec[] = [
  { name: 'junit', takesValue: true, valueName: 'FILE', help: 'write the merged results as JUnit XML to FILE' },
  { name: 'json', short: 'j', takesValue: false, help: 'print the merged results as one JSON object, as check --json or spread --json does' },
  { name: 'all-runs', takesValue: false, help: 'spread shards, with --json: every run\'s sample and figures too, as spread --json --all-runs' },
  { name: 'histograms', takesValue: true, valueName: 'limits|all', help: 'spread shards: histograms for the figures with a limit (limits, the default) or for all, as spread --histograms' },
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Help of `railcheck merge`. */
export const MERGE_HELP = `usage: railcheck merge SHARD.json... [options]

Combines the results of railcheck check --shard K/N --json, or of
railcheck spread FILE --shard K/N --json, one file per shard (every K from
1 to N once, any order), into the report of the whole run, as the
unsharded command prints it: the same text, or with --json the same JSON,
byte for byte. The shards' format member tells which command wrote them.

options:
${flagHelp(MERGE_FLAGS)}

exit status: check shards: 0 every netlist passed, 1 a netlist failed;
spread shards: 0 every limit passes in every run and every run ran, 1 a run
fails a limit, misses its figure or does not run; 2 a usage error (a shard
file missing, unreadable, given twice, of another run, or shards of check
and spread mixed).`;

/** `railcheck merge SHARD.json... [options]`. */
export function mergeCommand(argv: readonly string[], io: CliIo): number {
  const parsed = commandArgs('merge', argv, MERGE_FLAGS, MERGE_HELP, io);
  if (!parsed.ok) return parsed.status;
  const { positionals, flags } = parsed.args;
  if (positionals.length === 0) {
    io.err(`railcheck merge: expected the shard result files (railcheck check --shard K/N --json > FILE, or railcheck spread FILE --shard K/N --json > FILE)\n\n${MERGE_HELP}`);
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
  const formats = [...new Set(shards.map(formatOf))];
  if (formats.length > 1) {
    io.err(`railcheck merge: the shard files are of different commands (${formats.join(', ')}); merge the shards of one run`);
    return EXIT_ERROR;
  }
  if (formats[0] === SPREAD_FORMAT) return mergeSpread(shards, flags, io);
  if (flags.has('all-runs') || flags.has('histograms')) {
    io.err(`railcheck merge: --${flags.has('all-runs') ? 'all-runs' : 'histograms'} is for the shards of railcheck spread; these are check's`);
    return EXIT_ERROR;
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

/** The `format` member of a shard file ('' when it has none: check's merge then says what is wrong with it). */
function formatOf(shard: unknown): string {
  return typeof shard === 'object' && shard !== null && 'format' in shard && typeof shard.format === 'string' ? shard.format : '';
}

/** The merge of spread shards: the unsharded spread's text or JSON and status. */
function mergeSpread(shards: readonly unknown[], flags: ReadonlyMap<string, string | true>, io: CliIo): number {
  if (flags.has('junit')) {
    io.err('railcheck merge: --junit is for the shards of railcheck check; these are spread\'s');
    return EXIT_ERROR;
  }
  const histograms = flags.get('histograms') ?? 'limits';
  if (histograms !== 'limits' && histograms !== 'all') {
    io.err(`railcheck merge: --histograms ${String(histograms)}: expected limits or all`);
    return EXIT_ERROR;
  }
  const json = flags.has('json');
  if (flags.has('all-runs') && !json) {
    io.err('railcheck merge: --all-runs needs --json (every run\'s figures go into the JSON)');
    return EXIT_ERROR;
  }
  const merged = mergeSpreadResults(shards);
  if (!merged.ok) {
    for (const e of merged.errors) io.err(`railcheck merge: ${e.message}`);
    return EXIT_ERROR;
  }
  return presentSpread(io, merged.result, json, flags.has('all-runs'), histograms);
}
