/**
 * The `railcheck` command. Exit status of run (figures.md, docs/output.md): 0
 * when every limit passes, 1 when a limit fails, 2 when the netlist has an
 * error, an analysis fails, or a limit could not be evaluated because its
 * figure was not measured (the messages on standard error; in that last
 * case the report is still printed). A figure not measured without a limit
 * on it is a note in the report and leaves the status alone. `spread`,
 * `check`, `merge`, `compare` and `model` say theirs in their own modules. A user
 * never sees a stack trace.
 */
import { jsonText, writeJson } from './present/json-text.js';
import { syncStream } from './present/stdio.js';
import { formatDiagnostic, runNetlistFile, type Diagnostic, type FigureCurves, type LimitResult, type RunReport, type RunResult } from '@railcheck/core';
import { match } from 'ts-pattern';
import { isAbsolute, relative } from 'node:path';
import { transientColumns, transientCsvPieces } from './present/waves.js';
import { refuseOutput, writeOutputFiles } from './present/files.js';
import { existsSync, readFileSync, realpathSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { commandArgs, flagHelp, parseArgs, type FlagSpec } from './args.js';
import { formatReport, formatWarnings } from './present/text.js';
import { reportJson } from './present/json.js';
import { notEvaluatedErrors } from './present/figures.js';
import { COMPARE_HELP, compareCommand } from './commands/compare.js';
import { CHECK_HELP, checkCommand } from './commands/check.js';
import { MERGE_HELP, mergeCommand } from './commands/merge.js';
import { SAMPLE_FLAGS, SPREAD_HELP, sampleCommand, spreadCommand } from './commands/spread.js';
import { MODEL_HELP, modelCommand } from './commands/model.js';
import { PLOT_FLAG, curvesOf, writePlotFolder } from './plot/command.js';
import { reportCaution, runSections } from './plot/from-report.js';

/** Where output goes; tests pass their own. */
export interface CliIo {
  /** Standard output: one text, a newline added when it has none. */
  readonly out: (text: string) => void;
  readonly err: (text: string) => void;
  /**
   * Standard output a piece at a time, as it is (no newline added): what a
   * long report is streamed through. Without it the pieces are gathered
   * and handed to `out` as one text.
   */
  readonly write?: (piece: string) => void;
}

const stdout = syncStream(1);
const stderr = syncStream(2);
// Written synchronously (present/stdio.ts): a pipe's reader sets the pace, and one that closes early ends the output quietly.
const defaultIo: CliIo = {
  out: (t) => stdout.write(t.endsWith('\n') ? t : `${t}\n`),
  err: (t) => stderr.write(t.endsWith('\n') ? t : `${t}\n`),
  write: (piece) => stdout.write(piece),
};

/** Characters gathered before a piece of streamed output is written. */
const STREAM_PIECE = 1 << 16;

/**
 * Prints `value` as JSON text (present/json-text.ts) and a newline: through
 * `io.write` in pieces of about STREAM_PIECE characters when the io has
 * it, else as one text through `io.out`. The bytes are the same either way.
 */
export function printJson(io: CliIo, value: unknown): void {
  const write = io.write;
  if (!write) {
    io.out(jsonText(value));
    return;
  }
  let pending: string[] = [];
  let size = 0;
  writeJson(value, (piece) => {
    pending.push(piece);
    size += piece.length;
    if (size >= STREAM_PIECE) {
      write(pending.join(''));
      pending = [];
      size = 0;
    }
  });
  write(`${pending.join('')}\n`);
}

/** Exit status: everything ran and every limit passed. */
export const EXIT_OK = 0;
/** Exit status: a limit failed (the report is printed). */
export const EXIT_LIMIT_FAILED = 1;
/** Exit status: a netlist error, a failed analysis, a wrong command line, or a limit not evaluated. */
export const EXIT_ERROR = 2;

const RUN_FLAGS: readonly FlagSpec[] = [
  { name: 'json', short: 'j', takesValue: false, help: 'print the result as one JSON object on standard output' },
  { name: 'csv', short: 'c', takesValue: true, valueName: 'OUT.csv', help: 'write the transient waveforms (time and every node) to OUT.csv, and the ripple and sag figures\' waveforms beside it' },
  PLOT_FLAG,
  { name: 'steps', short: 's', takesValue: false, help: 'with --json or --csv: every accepted time step instead of the tstep grid' },
  { name: 'allow-outside-includes', takesValue: false, help: 'let .include reach files outside the netlist\'s folder tree' },
  ...SAMPLE_FLAGS,
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Options of run that only --sample takes. */
const SAMPLE_ONLY = SAMPLE_FLAGS.map((f) => f.name).filter((n) => n !== 'sample');

const DEMO_FLAGS: readonly FlagSpec[] = [
  { name: 'json', short: 'j', takesValue: false, help: 'print the result as JSON' },
  PLOT_FLAG,
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Options before (or instead of) a command. */
const TOP_FLAGS: readonly FlagSpec[] = [
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
  { name: 'version', short: 'V', takesValue: false, help: 'print the version of railcheck' },
];

const USAGE = `railcheck: checks a discrete linear supply stage from its netlist before you solder.

usage:
  railcheck run FILE [--json] [--csv OUT.csv]
                                  simulate a netlist and report its operating point, sweeps, waveforms and figures
  railcheck compare ORIGINAL MODIFIED [--json]
                                  run two versions of a stage under the same conditions, side by side
  railcheck demo [--json]         run the built-in example stage
  railcheck run FILE --sample RUN [--seed S]
                                  repeat one run of a spread with its sampled values
  railcheck spread FILE [--runs N] [--seed S] [--corners] [--temp LIST] [--json [--all-runs]] [--jobs N] [--shard K/N]
                                  tolerance run over the .spread lines: yield per limit, statistics, worst units
  railcheck check PATH... [--baseline FILE] [--update-baseline] [--junit FILE] [--jobs N] [--shard K/N]
                                  regression run of saved netlists (files or folders of *.cir)
  railcheck merge SHARD.json... [--junit FILE] [--json]
                                  combine the --json results of check's or spread's shards into one report
  railcheck model TYPE KEY=VALUE... [--json]
                                  datasheet values (VZ=5.6 IZT=5m ...) to a .model line of physical parameters, checked by simulation
  railcheck model FILE MODELNAME [--json]
                                  a netlist's model as written, resolved, and the datasheet values it implies
  railcheck help [COMMAND]        show help (also: railcheck COMMAND --help)
  railcheck --version             print the version (also -V)

Paths are read from the folder you are in.

exit status of run, compare and demo: 0 all limits pass, 1 a limit failed, 2 a netlist has an error, an analysis failed
or a limit could not be evaluated (its figure was not measured).
spread: 0 every limit passes in every run, 1 a run fails a limit, misses its figure or does not run, 2 a netlist
or usage error.
check and merge: 0 every netlist passed, 1 any failed, 2 a usage error (merge of spread shards: as spread).
model: 0 the model was resolved and simulated, 2 a usage error or a model that cannot be resolved or simulated.
The netlist language is described in docs/netlist.md.`;

const RUN_HELP = `usage: railcheck run FILE [options]

Reads FILE, simulates every analysis it asks for at every .temp temperature,
and prints the operating point (node voltages, element currents, dissipation),
DC sweeps and the notes found on the way. With --sample RUN it repeats run
RUN of railcheck spread FILE instead (give the spread's --seed, or
--corners, as its report's repeat line does): the sampled values, the
figures at each temperature and the limits.

options:
${flagHelp(RUN_FLAGS)}`;

const DEMO_HELP = `usage: railcheck demo [options]

Runs the built-in example: a Zener-referenced follower regulator for a
weather-station sensor rail (examples/sensor-rail-follower.cir).

options:
${flagHelp(DEMO_FLAGS)}`;

/** The version of the command: the `version` of the CLI package's package.json (beside src/ and dist/ alike). */
export function cliVersion(): string {
  const pkg: unknown = JSON.parse(readFileSync(new URL('../package.json', import.meta.url), 'utf8'));
  const v = typeof pkg === 'object' && pkg !== null && 'version' in pkg ? pkg.version : undefined;
  return typeof v === 'string' ? v : 'unknown';
}

/**
 * Path of the built-in demo netlist. An installed package carries a copy in
 * its own examples/ folder (packages/cli/examples/, made by scripts/build.mjs);
 * in the workspace the sources fall back to the repository's examples/.
 */
export function demoPath(): string {
  const inPackage = fileURLToPath(new URL('../examples/sensor-rail-follower.cir', import.meta.url));
  return existsSync(inPackage) ? inPackage : fileURLToPath(new URL('../../../examples/sensor-rail-follower.cir', import.meta.url));
}

function printErrors(io: CliIo, errors: readonly Diagnostic[], warnings: readonly Diagnostic[]): void {
  for (const e of errors) io.err(formatDiagnostic(e));
  const notes = formatWarnings(warnings);
  if (notes) io.err(notes);
  io.err(`railcheck: ${errors.length} error${errors.length === 1 ? '' : 's'}; nothing was run to completion`);
}

function present(io: CliIo, result: RunResult, flags: ReadonlyMap<string, string | true>, file: string): number {
  if (!result.ok) {
    printErrors(io, result.errors, result.warnings);
    return EXIT_ERROR;
  }
  const steps = flags.has('steps');
  const csv = flags.get('csv');
  const plot = flags.get('plot');
  // The curves and waveforms behind the figures are measured once, for the plots and the CSV files.
  const notes: string[] = [];
  const curves = typeof plot === 'string' ? curvesOf(result.report, notes) : typeof csv === 'string' ? curvesOf(result.report, notes, ['ripple', 'sag']) : undefined;
  if (typeof csv === 'string') {
    const written = writeCsv(io, result.report, csv, steps, file, curves);
    if (written !== EXIT_OK) return written;
    // Without --plot, which prints them, a waveform left out says why here.
    if (typeof plot !== 'string') for (const n of notes) io.err(`railcheck run: --csv: ${n}`);
  }
  if (typeof plot === 'string') {
    const r = result.report;
    const caution = reportCaution(r);
    const status = writePlotFolder(plot, { title: r.title, ...(caution ? { caution } : {}), sections: runSections(r, curves) }, file, 'run', notes, (l) => io.err(l));
    if (status !== EXIT_OK) return status;
  }
  if (flags.has('json')) printJson(io, reportJson(result.report, steps));
  else io.out(formatReport(result.report));
  const limits = result.report.figures?.limits ?? [];
  const unevaluated = notEvaluatedErrors(limits);
  if (unevaluated.length > 0) {
    for (const e of unevaluated) io.err(formatDiagnostic(e));
    io.err(`railcheck: ${unevaluated.length} ${unevaluated.length === 1 ? 'limit was' : 'limits were'} not evaluated; the report is on standard output`);
  }
  return limitStatus(limits);
}

/** Exit status of a run that produced a report: the worst over its limits (pass 0, fail 1, not evaluated 2). */
export function limitStatus(limits: readonly LimitResult[]): number {
  return limits.reduce(
    (worst, l) => Math.max(worst, match(l.status).with('pass', () => EXIT_OK).with('fail', () => EXIT_LIMIT_FAILED).with('not-evaluated', () => EXIT_ERROR).exhaustive()),
    EXIT_OK,
  );
}

/** The CSV file of transient `k`: the first at `path`, each further one numbered beside it (docs/output.md). */
function csvName(path: string, k: number): string {
  return k === 0 ? path : path.replace(/(\.csv)?$/i, `-${k + 1}$1`);
}

/**
 * Writes the first transient to `path` and any further ones (other
 * temperatures, other .tran lines) beside it: all of them or none, never
 * over the netlist `file`.
 */
function writeCsv(io: CliIo, report: RunReport, path: string, steps: boolean, file: string, curves: FigureCurves | undefined): number {
  const waves = [
    ...(curves?.ripple ? [{ suffix: 'ripple', w: curves.ripple }] : []),
    ...(curves?.sag ? [{ suffix: 'sag', w: curves.sag }] : []),
  ];
  if (report.transients.length === 0 && waves.length === 0) {
    io.err('railcheck run: --csv needs a .tran analysis, or a ripple or sag figure, in the netlist; none was run');
    return EXIT_ERROR;
  }
  // Each file's text is made a block of rows at a time as it is written (present/files.ts), never as one string.
  const files = report.transients.map((t, k) => ({
    path: csvName(path, k),
    text: {
      [Symbol.iterator]: () => {
        const { times, nodes } = transientColumns(t, report.compiled, steps);
        return transientCsvPieces(times, nodes);
      },
    },
  }));
  // The figures' own waveforms (docs/output.md): OUT-ripple.csv and OUT-sag.csv, every accepted point.
  for (const { suffix, w } of waves) files.push({ path: path.replace(/(\.csv)?$/i, `-${suffix}$1`), text: { [Symbol.iterator]: () => transientCsvPieces(w.time, { input: w.input, ...(w.feed ? { feed: w.feed } : {}), output: w.output }) } });
  const written = writeOutputFiles(files, file);
  if (!written.ok) {
    io.err(`railcheck run: --csv: ${written.message}`);
    return EXIT_ERROR;
  }
  return EXIT_OK;
}

function runCommand(argv: readonly string[], io: CliIo, demo: boolean): number {
  const parsed = commandArgs(demo ? 'demo' : 'run', argv, demo ? DEMO_FLAGS : RUN_FLAGS, demo ? DEMO_HELP : RUN_HELP, io);
  if (!parsed.ok) return parsed.status;
  const { positionals, flags } = parsed.args;
  const without = SAMPLE_ONLY.find((n) => flags.has(n));
  if (without && !flags.has('sample')) {
    io.err(`railcheck run: --${without} goes with --sample RUN (repeating one run of a spread)`);
    return EXIT_ERROR;
  }
  if (flags.has('sample') && (flags.has('csv') || flags.has('steps') || flags.has('plot'))) {
    io.err('railcheck run: --csv, --steps and --plot do not go with --sample: a repeated run reports its sample, figures and limits');
    return EXIT_ERROR;
  }
  const expected = demo ? 0 : 1;
  if (positionals.length !== expected) {
    io.err(demo ? `railcheck demo: takes no file (got ${positionals.join(' ')})` : `railcheck run: expected one netlist FILE${positionals.length ? `, got ${positionals.length}: ${positionals.join(' ')}` : ''}\n\n${RUN_HELP}`);
    return EXIT_ERROR;
  }
  // The demo's path is shown relative to where the user stands when that is shorter.
  const demoFile = (): string => {
    const rel = relative(process.cwd(), demoPath());
    return rel && !rel.startsWith('..') && !isAbsolute(rel) ? rel : demoPath();
  };
  const file = demo ? demoFile() : positionals[0]!;
  if (flags.has('sample')) return sampleCommand(file, flags, io);
  const csv = flags.get('csv');
  // Refused before the run, so a long simulation is not spent on an output that cannot be written.
  const refused = typeof csv === 'string' ? refuseOutput(csv, file) : undefined;
  if (refused) {
    io.err(`railcheck run: --csv: ${refused}`);
    return EXIT_ERROR;
  }
  // Every accepted point is kept only when --steps writes them (docs/transient.md, "Output").
  const result = runNetlistFile(file, { allowOutsideIncludes: flags.has('allow-outside-includes'), keepSteps: flags.has('steps') });
  return present(io, result, flags, file);
}

/** `railcheck --help [COMMAND]`, `railcheck --version`, or a mistake among the options before a command. */
function topOptions(argv: readonly string[], io: CliIo): number {
  const parsed = parseArgs(argv, TOP_FLAGS);
  if (!parsed.ok) {
    io.err(`railcheck: ${parsed.message}; a command's options go after the command\n\n${USAGE}`);
    return EXIT_ERROR;
  }
  const { positionals, flags } = parsed.args;
  if (flags.has('version')) {
    if (flags.size > 1 || positionals.length > 0) {
      io.err(`railcheck --version: takes nothing else (got ${argv.join(' ')})`);
      return EXIT_ERROR;
    }
    io.out(cliVersion());
    return EXIT_OK;
  }
  return helpCommand(positionals, io);
}

/** `railcheck help [COMMAND]`: the help asked for on standard output. */
function helpCommand(rest: readonly string[], io: CliIo): number {
  const topic = rest[0];
  const helps: Record<string, string> = { run: RUN_HELP, compare: COMPARE_HELP, demo: DEMO_HELP, check: CHECK_HELP, merge: MERGE_HELP, spread: SPREAD_HELP, model: MODEL_HELP, help: USAGE };
  if (rest.length > 1 || (topic !== undefined && !Object.hasOwn(helps, topic))) {
    io.err(`railcheck help: no command '${rest.join(' ')}'; expected run, compare, spread, check, merge, model, demo or help\n\n${USAGE}`);
    return EXIT_ERROR;
  }
  io.out(topic === undefined ? USAGE : helps[topic]!);
  return EXIT_OK;
}

/** Runs the command line `argv` (without `node` and the script); resolves to the exit status. */
export async function main(argv: readonly string[], io: CliIo = defaultIo): Promise<number> {
  try {
    const [command, ...rest] = argv;
    switch (command) {
      case 'run':
        return runCommand(rest, io, false);
      case 'demo':
        return runCommand(rest, io, true);
      case 'compare':
        return compareCommand(rest, io);
      case 'spread':
        return await spreadCommand(rest, io);
      case 'check':
        return await checkCommand(rest, io);
      case 'merge':
        return mergeCommand(rest, io);
      case 'model':
        return modelCommand(rest, io);
      case undefined:
        io.err(`railcheck: no command given; expected run, compare, spread, check, merge, model, demo, help or --version\n\n${USAGE}`);
        return EXIT_ERROR;
      case 'help':
        return helpCommand(rest, io);
      default:
        if (command.startsWith('-')) return topOptions(argv, io);
        io.err(`railcheck: unknown command '${command}'; expected run, compare, spread, check, merge, model, demo or help\n\n${USAGE}`);
        return EXIT_ERROR;
    }
  } catch (e) {
    io.err(`railcheck: internal error: ${e instanceof Error ? e.message : String(e)} (please report this with the netlist)`);
    return EXIT_ERROR;
  }
}

/** True when this module is the script node was started with (the bundled `railcheck` command), not an import. */
function startedAsCommand(): boolean {
  const script = process.argv[1];
  if (script === undefined) return false;
  try {
    // realpath: an installed bin is usually a symlink to the bundle.
    return pathToFileURL(realpathSync(script)).href === import.meta.url;
  } catch {
    return false;
  }
}

if (startedAsCommand()) {
  void main(process.argv.slice(2)).then((status) => {
    process.exitCode = status;
  });
}
