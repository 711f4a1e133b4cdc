/**
 * `railcheck check PATH...`: regression runs of saved netlists, with a
 * baseline, JUnit XML, worker threads and shares (docs/output.md,
 * "railcheck check"). Exit status 0 when every netlist passes, 1 when any
 * fails, 2 only for a usage error (a bad option, no path, a path that does
 * not exist, a missing or malformed baseline).
 */
import { jsonText } from '../present/json-text.js';
import { writeFileSync } from 'node:fs';
import { checkNetlists, formatDiagnostic, type CheckResult, type Diagnostic } from '@railcheck/core';
import { commandArgs, flagHelp, type FlagSpec } from '../args.js';
import { EXIT_ERROR, EXIT_LIMIT_FAILED, EXIT_OK, type CliIo } from '../main.js';
import { checkJunit, netlistText, summaryText } from '../present/check.js';

const CHECK_FLAGS: readonly FlagSpec[] = [
  { name: 'baseline', short: 'b', takesValue: true, valueName: 'FILE', help: 'compare every figure and node voltage with the values saved in FILE' },
  { name: 'update-baseline', takesValue: false, help: 'with --baseline: write FILE from this run instead of comparing (tolerance overrides are kept)' },
  { name: 'junit', takesValue: true, valueName: 'FILE', help: 'write the results as JUnit XML to FILE' },
  { name: 'json', short: 'j', takesValue: false, help: 'print the results as one JSON object on standard output (the per-netlist lines go to standard error)' },
  { name: 'jobs', takesValue: true, valueName: 'N', help: 'run on N worker threads (default: the number of cores); the output is the same for any N' },
  { name: 'shard', takesValue: true, valueName: 'K/N', help: 'run only the K-th of N shares of the netlists (those at places p with p mod N = K-1)' },
  { name: 'allow-outside-includes', takesValue: false, help: 'let .include reach files outside each netlist\'s folder tree' },
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Help of `railcheck check`. */
export const CHECK_HELP = `usage: railcheck check PATH... [options]

Runs every netlist named (a folder stands for its *.cir files, recursively,
in sorted order) with its limits; with --baseline, also compares each figure
and each operating-point node voltage with its saved value, within the
tolerances of docs/output.md ("Baseline tolerances"). Prints a line per
netlist as it finishes, in order, and a summary line last.

options:
${flagHelp(CHECK_FLAGS)}

exit status: 0 every netlist passed, 1 a netlist failed (a limit, a moved or
gone baseline value, a netlist that does not read or converge), 2 a usage
error (a bad option, no PATH, a PATH that does not exist, a missing or
malformed baseline).`;

/** Netlists from which on a progress bar is drawn (standard error a terminal). */
const PROGRESS_FROM = 6;

/** Writes the JUnit file; a message when it cannot. */
export function writeJunit(file: string, r: CheckResult): string | undefined {
  try {
    writeFileSync(file, checkJunit(r));
    return undefined;
  } catch (e) {
    return `cannot write ${file}: ${(e as NodeJS.ErrnoException).code ?? String(e)}`;
  }
}

/** Exit status of a result: 0 when every netlist passed, else 1. */
export function checkStatus(r: CheckResult): number {
  return r.summary.failed === 0 ? EXIT_OK : EXIT_LIMIT_FAILED;
}

/** Reads `--jobs N` and `--shard K/N`; a message for a value that is not one. */
function numbers(flags: ReadonlyMap<string, string | true>): { ok: true; jobs?: number; shard?: { index: number; count: number } } | { ok: false; message: string } {
  const jobsText = flags.get('jobs');
  const shardText = flags.get('shard');
  let jobs: number | undefined;
  let shard: { index: number; count: number } | undefined;
  if (typeof jobsText === 'string') {
    if (!/^[0-9]+$/.test(jobsText) || Number(jobsText) < 1) return { ok: false, message: `--jobs ${jobsText}: expected a whole number of threads, 1 or more` };
    jobs = Number(jobsText);
  }
  if (typeof shardText === 'string') {
    const m = /^([0-9]+)\/([0-9]+)$/.exec(shardText);
    const index = Number(m?.[1]);
    const count = Number(m?.[2]);
    if (!m || count < 1 || index < 1 || index > count) return { ok: false, message: `--shard ${shardText}: expected K/N with whole numbers 1 ≤ K ≤ N, e.g. --shard 2/3` };
    shard = { index, count };
  }
  return { ok: true, ...(jobs !== undefined ? { jobs } : {}), ...(shard !== undefined ? { shard } : {}) };
}

/** A progress bar on standard error (cli-progress), when that is a terminal and the run is long. */
async function progressBar(): Promise<{ start: (total: number) => void; tick: (done: number) => void; log: ((text: string) => void) | undefined; stop: () => void } | undefined> {
  if (!process.stderr.isTTY) return undefined;
  const { MultiBar, Presets } = await import('cli-progress');
  let multi: InstanceType<typeof MultiBar> | undefined;
  let bar: ReturnType<InstanceType<typeof MultiBar>['create']> | undefined;
  return {
    start: (total) => {
      if (total < PROGRESS_FROM) return;
      multi = new MultiBar({ stream: process.stderr, clearOnComplete: true, hideCursor: true, format: 'checking [{bar}] {value}/{total} netlists' }, Presets.shades_classic);
      bar = multi.create(total, 0);
    },
    tick: (done) => bar?.update(done),
    get log() {
      const m = multi;
      return m ? (text: string) => m.log(`${text}\n`) : undefined;
    },
    stop: () => {
      // The bar writes logged lines at its next redraw: draw once more so the last ones are not lost, then clear it.
      multi?.update();
      multi?.stop();
    },
  };
}

/** `railcheck check PATH... [options]`. */
export async function checkCommand(argv: readonly string[], io: CliIo): Promise<number> {
  const parsed = commandArgs('check', argv, CHECK_FLAGS, CHECK_HELP, io);
  if (!parsed.ok) return parsed.status;
  const { positionals, flags } = parsed.args;
  if (positionals.length === 0) {
    io.err(`railcheck check: expected one or more netlist files or folders\n\n${CHECK_HELP}`);
    return EXIT_ERROR;
  }
  const nums = numbers(flags);
  if (!nums.ok) {
    io.err(`railcheck check: ${nums.message}`);
    return EXIT_ERROR;
  }
  const baseline = flags.get('baseline');
  const update = flags.has('update-baseline');
  if (update && typeof baseline !== 'string') {
    io.err('railcheck check: --update-baseline needs --baseline FILE (the file to write)');
    return EXIT_ERROR;
  }
  if (update && nums.shard && nums.shard.count > 1) {
    io.err('railcheck check: --update-baseline cannot be given with --shard: a share runs only part of the netlists; update from an unsharded run');
    return EXIT_ERROR;
  }
  const json = flags.has('json');
  // With --json standard output is the JSON alone; the lines go to standard error.
  const sink = json ? io.err : io.out;
  const bar = await progressBar();
  const outcome = await checkNetlists(positionals, {
    ...(typeof baseline === 'string' ? { baseline } : {}),
    updateBaseline: update,
    ...(nums.jobs !== undefined ? { jobs: nums.jobs } : {}),
    ...(nums.shard !== undefined ? { shard: nums.shard } : {}),
    allowOutsideIncludes: flags.has('allow-outside-includes'),
    onStart: (total) => bar?.start(total),
    onProgress: (done) => bar?.tick(done),
    onNetlist: (c) => {
      const text = netlistText(c);
      // With a bar up on the same terminal, the line is written above it.
      const log = bar?.log;
      if (log && (json || process.stdout.isTTY)) log(text);
      else sink(text);
    },
  });
  bar?.stop();
  if (!outcome.ok) {
    for (const e of outcome.errors) io.err(`railcheck check: ${usageText(e)}`);
    return EXIT_ERROR;
  }
  return finish(outcome.result, io, json, flags.get('junit'), 'check');
}

/** A usage error in one line (plus what was expected). */
function usageText(d: Diagnostic): string {
  return d.pos ? formatDiagnostic(d) : `${d.message}${d.expected ? ` (expected ${d.expected})` : ''}`;
}

/** The end of a check or a merge: the summary, the JSON, the JUnit file, the status. */
export function finish(r: CheckResult, io: CliIo, json: boolean, junit: string | true | undefined, command: 'check' | 'merge'): number {
  (json ? io.err : io.out)(summaryText(r));
  if (json) io.out(jsonText(r));
  if (typeof junit === 'string') {
    const failed = writeJunit(junit, r);
    if (failed) {
      io.err(`railcheck ${command}: --junit: ${failed}`);
      return EXIT_ERROR;
    }
  }
  return checkStatus(r);
}
