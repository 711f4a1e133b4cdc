/**
 * The command line's options, read by Node's own `util.parseArgs` (its
 * tokens), with every word it cannot mean refused by name: an unknown long
 * or short option, an option that needs a value and gets none or gets
 * another option instead (`--csv --json`), a value given to an option that
 * takes none, an empty value, an option given twice.
 */
import { parseArgs as nodeParseArgs } from 'node:util';
import { EXIT_ERROR, EXIT_OK, type CliIo } from './main.js';

/** Specification of one option. */
export interface FlagSpec {
  /** Long name without dashes, e.g. `json`. */
  readonly name: string;
  /** One-letter alias without the dash, e.g. `j` for `-j`. */
  readonly short?: string;
  /** True when the option takes a value (`--csv out.csv`). */
  readonly takesValue: boolean;
  /** One-line description for `--help`. */
  readonly help: string;
  /** Placeholder shown in help for the value. */
  readonly valueName?: string;
}

/** Parsed arguments: positionals and options (by long name). */
export interface ParsedArgs {
  readonly positionals: readonly string[];
  readonly flags: ReadonlyMap<string, string | true>;
}

function spelled(spec: FlagSpec): string {
  return spec.short ? `-${spec.short}/--${spec.name}` : `--${spec.name}`;
}

/**
 * Parses `argv` against `specs`. Words after `--` are positionals. Returns
 * a message naming the word for anything it cannot mean.
 */
export function parseArgs(argv: readonly string[], specs: readonly FlagSpec[]): { ok: true; args: ParsedArgs } | { ok: false; message: string } {
  const options: Record<string, { type: 'string' | 'boolean'; short?: string }> = {};
  for (const s of specs) options[s.name] = s.short ? { type: s.takesValue ? 'string' : 'boolean', short: s.short } : { type: s.takesValue ? 'string' : 'boolean' };
  // strict: false so that the tokens come back and the messages are ours; every check strict mode makes is made below.
  const { tokens } = nodeParseArgs({ args: [...argv], options, strict: false, allowPositionals: true, tokens: true });
  const positionals: string[] = [];
  const flags = new Map<string, string | true>();
  const expected = `expected one of: ${specs.map(spelled).join(', ')}`;
  for (const t of tokens) {
    if (t.kind === 'positional') {
      positionals.push(t.value);
      continue;
    }
    if (t.kind === 'option-terminator') continue;
    const spec = specs.find((s) => s.name === t.name);
    if (!spec) return { ok: false, message: `unknown option '${t.rawName}'; ${expected}` };
    const shown = spelled(spec);
    if (flags.has(spec.name)) return { ok: false, message: `option '${t.rawName}' is given twice (${shown}); give it once` };
    if (!spec.takesValue) {
      if (t.value !== undefined) return { ok: false, message: `option '${t.rawName}' takes no value (got '${t.value}')` };
      flags.set(spec.name, true);
      continue;
    }
    const what = spec.valueName ?? 'a value';
    if (t.value === undefined || t.value === '') return { ok: false, message: `option '${t.rawName}' needs a value (${what})` };
    if (!t.inlineValue && t.value.startsWith('-') && t.value !== '-') {
      return { ok: false, message: `option '${t.rawName}' needs a value (${what}) but is followed by the option '${t.value}'; write ${t.rawName.startsWith('--') ? `${t.rawName}=${t.value}` : `--${spec.name}=${t.value}`} if that is the name meant` };
    }
    flags.set(spec.name, t.value);
  }
  return { ok: true, args: { positionals, flags } };
}

/** Renders the option list for help text. */
export function flagHelp(specs: readonly FlagSpec[]): string {
  const rows = specs.map((s) => [`${s.short ? `-${s.short}, ` : '    '}--${s.name}${s.takesValue ? ` ${s.valueName ?? 'VALUE'}` : ''}`, s.help] as const);
  const width = Math.max(...rows.map(([l]) => l.length));
  return rows.map(([l, h]) => `  ${l.padEnd(width)}  ${h}`).join('\n');
}

/**
 * The first step of every command: its arguments parsed against `specs`, or
 * the exit status already settled: a word it cannot mean (`railcheck
 * COMMAND: message` on standard error, EXIT_ERROR) or `--help` (`help` on
 * standard output, EXIT_OK).
 */
export function commandArgs(command: string, argv: readonly string[], specs: readonly FlagSpec[], help: string, io: CliIo): { ok: true; args: ParsedArgs } | { ok: false; status: number } {
  const parsed = parseArgs(argv, specs);
  if (!parsed.ok) {
    io.err(`railcheck ${command}: ${parsed.message}`);
    return { ok: false, status: EXIT_ERROR };
  }
  if (parsed.args.flags.has('help')) {
    io.out(help);
    return { ok: false, status: EXIT_OK };
  }
  return parsed;
}
