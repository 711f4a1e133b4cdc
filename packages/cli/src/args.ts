/**
 * A small, strict command-line parser: known flags only, each unknown or
 * misplaced word an error that says what was expected.
 */

/** Specification of one flag. */
export interface FlagSpec {
  /** Long name without dashes, e.g. `json`. */
  readonly name: string;
  /** True when the flag takes a value (`--csv out.csv`). */
  readonly takesValue: boolean;
  /** One-line description for `--help`. */
  readonly help: string;
  /** Placeholder shown in help for the value. */
  readonly valueName?: string;
}

/** Parsed arguments: positionals and flags. */
export interface ParsedArgs {
  readonly positionals: readonly string[];
  readonly flags: ReadonlyMap<string, string | true>;
}

/** Parses `argv` against `specs`; returns an error message for unknown flags or missing values. */
export function parseArgs(argv: readonly string[], specs: readonly FlagSpec[]): { ok: true; args: ParsedArgs } | { ok: false; message: string } {
  const positionals: string[] = [];
  const flags = new Map<string, string | true>();
  for (let i = 0; i < argv.length; i++) {
    const word = argv[i]!;
    if (word === '--') {
      positionals.push(...argv.slice(i + 1));
      break;
    }
    if (word === '-h') {
      flags.set('help', true);
      continue;
    }
    if (!word.startsWith('--') || word === '-') {
      positionals.push(word);
      continue;
    }
    const eq = word.indexOf('=');
    const name = word.slice(2, eq < 0 ? undefined : eq);
    const spec = specs.find((s) => s.name === name);
    if (!spec) return { ok: false, message: `unknown option '--${name}'; expected one of: ${specs.map((s) => `--${s.name}`).join(', ')}` };
    if (!spec.takesValue) {
      if (eq >= 0) return { ok: false, message: `option '--${name}' takes no value` };
      flags.set(name, true);
      continue;
    }
    const value = eq >= 0 ? word.slice(eq + 1) : argv[++i];
    if (value === undefined || value === '') return { ok: false, message: `option '--${name}' needs a value (${spec.valueName ?? 'value'})` };
    flags.set(name, value);
  }
  return { ok: true, args: { positionals, flags } };
}

/** Renders the flag list for help text. */
export function flagHelp(specs: readonly FlagSpec[]): string {
  const rows = specs.map((s) => [`--${s.name}${s.takesValue ? ` ${s.valueName ?? 'VALUE'}` : ''}`, s.help] as const);
  const width = Math.max(...rows.map(([l]) => l.length));
  return rows.map(([l, h]) => `  ${l.padEnd(width)}  ${h}`).join('\n');
}
