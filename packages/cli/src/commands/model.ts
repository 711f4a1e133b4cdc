/**
 * `railcheck model`: a `.model` card between its datasheet form and its
 * physical parameters, both ways (docs/models.md, "Datasheet form" →
 * "railcheck model"):
 *
 * - `railcheck model TYPE KEY=VALUE...`: the datasheet values resolved to a
 *   `.model` line of physical parameters, the defaults that filled what they
 *   left open, and as a check the datasheet values that model gives when
 *   simulated in the test circuits, beside the values given;
 * - `railcheck model FILE MODELNAME`: a model of a netlist as written,
 *   resolved, and the datasheet values it implies with their conditions.
 *
 * Exit status 0 on success, 2 for a usage error or a model that cannot be
 * resolved or simulated.
 */
import { jsonText } from '../present/json-text.js';
import { formatDiagnostic, impliedDatasheet, parseNetlist, parseScaledNumber, readModelLine, readNetlistFile, resolveModelCard, resolveNetlistModel, modelLine, type Diagnostic, type ModelCard, type ParseResult, type ResolvedModel, type SheetConditions, type SheetValue } from '@railcheck/core';
import { MODEL_TYPES, type ModelType } from '@railcheck/devices';
import { commandArgs, flagHelp, type FlagSpec } from '../args.js';
import { EXIT_ERROR, EXIT_OK, type CliIo } from '../main.js';
import { formatModel, modelJson, type ModelSource, type SheetRow } from '../present/model.js';

/** `format` member of the JSON object. */
export const MODEL_FORMAT = 'railcheck-model';
/** `version` member of the JSON object. */
export const MODEL_VERSION = 1;

/** Name of the model line printed for datasheet values given on the command line, unless --name says another. */
export const DEFAULT_MODEL_NAME = 'from_sheet';

/** Place given to the datasheet values of the command line in messages. */
const COMMAND_LINE = '(command line)';

const MODEL_FLAGS: readonly FlagSpec[] = [
  { name: 'name', takesValue: true, valueName: 'NAME', help: `name of the printed .model line, datasheet values only (default ${DEFAULT_MODEL_NAME})` },
  { name: 'if', takesValue: true, valueName: 'LIST', help: 'forward currents of the VF points, comma-separated, at most 3 (default the model\'s IF, IF2, IF3, else 10m)' },
  { name: 'izt', takesValue: true, valueName: 'A', help: 'Zener test current of VZ, ZZT and TCVZ (default the model\'s IZT, else its IBV)' },
  { name: 'izk', takesValue: true, valueName: 'A', help: 'knee current of ZZK (default the model\'s IZK; without one no ZZK)' },
  { name: 'ichfe', takesValue: true, valueName: 'A', help: 'collector current of the HFE and HOE point (default the model\'s ICHFE, else 10m)' },
  { name: 'icvbe', takesValue: true, valueName: 'A', help: 'collector current of the VBE point (default the model\'s ICVBE, else the HFE point\'s)' },
  { name: 'vce', takesValue: true, valueName: 'V', help: 'collector-emitter voltage of the transistor points (default the model\'s VCE, else 5)' },
  { name: 'allow-outside-includes', takesValue: false, help: 'let .include reach files outside the netlist\'s folder tree' },
  { name: 'json', short: 'j', takesValue: false, help: 'print the result as one JSON object on standard output' },
  { name: 'help', short: 'h', takesValue: false, help: 'show this help' },
];

/** Help of `railcheck model`. */
export const MODEL_HELP = `usage: railcheck model TYPE KEY=VALUE... [options]
       railcheck model FILE MODELNAME [options]

The first form turns datasheet values (TYPE D, NPN or PNP; keys of the
datasheet form of docs/models.md, values with SI suffixes as in netlists,
e.g. VZ=5.6 IZT=5m ZZT=40) into a .model line of physical parameters whose
numbers read back exactly, lists the defaults that filled what the values
left open, and simulates that model in the datasheet's test circuits: the
values it gives beside the values given, with their difference.

The second form reads the netlist FILE (its includes as railcheck run
reads them; FILE parts:NAME reads the parts library NAME where this
railcheck has one) and shows its model MODELNAME as written, its physical
parameters, and the datasheet values it implies with their conditions.

examples:
  railcheck model D VZ=5.6 IZT=5m ZZT=40 TCVZ=2.5m VF=0.8 IF=10m
  railcheck model NPN HFE=150 ICHFE=50m VBE=0.65 ICVBE=10m VA=100
  railcheck model stage.cir zref --izt 2m

options:
${flagHelp(MODEL_FLAGS)}

exit status: 0 the model was resolved and simulated, 2 a usage error or a
model that cannot be resolved or simulated (the messages on standard error).`;

/** The given value the implied `v` stands beside: the key itself, TCVZ also from TCVZPCT (%/K of VZ), HOE from VA (IC/VA, the resolver's h_oe = Icc/VAF with Icc ≈ IC). */
function givenFor(v: SheetValue, given: ReadonlyMap<string, number>): number | undefined {
  if (given.has(v.key)) return given.get(v.key);
  if (v.key === 'TCVZ' && given.has('TCVZPCT') && given.has('VZ')) return (given.get('TCVZPCT')! / 100) * given.get('VZ')!;
  return undefined;
}

/** A condition option read with SI suffixes, or a message. */
function conditionValue(flag: string, text: string): { ok: true; value: number } | { ok: false; message: string } {
  const x = parseScaledNumber(text);
  return x !== undefined && x > 0 ? { ok: true, value: x } : { ok: false, message: `--${flag} ${text}: expected a positive number (SI suffixes as in netlists, e.g. 5m)` };
}

/** The test conditions of the options, or a message. */
function conditionsOf(flags: ReadonlyMap<string, string | true>): { ok: true; conditions: SheetConditions } | { ok: false; message: string } {
  const out: { -readonly [K in keyof SheetConditions]: SheetConditions[K] } = {};
  for (const k of ['izt', 'izk', 'ichfe', 'icvbe', 'vce'] as const) {
    const t = flags.get(k);
    if (typeof t !== 'string') continue;
    const r = conditionValue(k, t);
    if (!r.ok) return r;
    out[k] = r.value;
  }
  const list = flags.get('if');
  if (typeof list === 'string') {
    const words = list.split(',');
    if (words.length > 3) return { ok: false, message: `--if ${list}: at most 3 forward currents (VF, VF2, VF3)` };
    const values: number[] = [];
    for (const w of words) {
      const r = conditionValue('if', w);
      if (!r.ok) return r;
      values.push(r.value);
    }
    out.if = values;
  }
  return { ok: true, conditions: out };
}

/** Diagnostics of the command line's values: their place is its one line, not the title-led netlist they were read as. */
const onCommandLine = (d: Diagnostic): Diagnostic => (d.pos && d.pos.file === COMMAND_LINE ? { ...d, pos: { ...d.pos, line: 1 } } : d);

function fail(io: CliIo, errors: readonly Diagnostic[], what: string): number {
  for (const e of errors) io.err(formatDiagnostic(onCommandLine(e)));
  io.err(`railcheck model: ${what}`);
  return EXIT_ERROR;
}

/** The type named by a word (any case), when it is one. */
const typeOf = (word: string): ModelType | undefined => MODEL_TYPES.find((t) => t === word.toUpperCase());

/** `railcheck model ...`; returns the exit status. */
export function modelCommand(argv: readonly string[], io: CliIo): number {
  const parsed = commandArgs('model', argv, MODEL_FLAGS, MODEL_HELP, io);
  if (!parsed.ok) return parsed.status;
  const { positionals, flags } = parsed.args;
  const conditions = conditionsOf(flags);
  if (!conditions.ok) {
    io.err(`railcheck model: ${conditions.message}`);
    return EXIT_ERROR;
  }
  const [first, ...rest] = positionals;
  if (first === undefined) {
    io.err(`railcheck model: expected a model TYPE and KEY=VALUE pairs, or a netlist FILE and a MODELNAME\n\n${MODEL_HELP}`);
    return EXIT_ERROR;
  }
  const type = typeOf(first);
  const sheetForm = type !== undefined && rest.every((w) => w.includes('='));
  if (sheetForm) {
    if (rest.length === 0) {
      io.err(`railcheck model: ${type} needs datasheet values as KEY=VALUE pairs, e.g. ${type === 'D' ? 'VZ=5.6 IZT=5m ZZT=40' : 'HFE=150 ICHFE=50m VBE=0.65'}`);
      return EXIT_ERROR;
    }
    return fromSheet(type, rest, flags, conditions.conditions, io);
  }
  if (rest.some((w) => w.includes('=')) || positionals.length !== 2) {
    const why = type === undefined && rest.some((w) => w.includes('=')) ? `'${first}' is not a model type (expected ${MODEL_TYPES.join(', ')})` : `expected a netlist FILE and one MODELNAME, got ${positionals.length} word${positionals.length === 1 ? '' : 's'}: ${positionals.join(' ')}`;
    io.err(`railcheck model: ${why}\n\n${MODEL_HELP}`);
    return EXIT_ERROR;
  }
  if (flags.has('name')) {
    io.err('railcheck model: --name is for datasheet values given on the command line; a netlist\'s model keeps its name');
    return EXIT_ERROR;
  }
  return fromNetlist(first, rest[0]!, flags, conditions.conditions, io);
}

function fromSheet(type: ModelType, pairs: readonly string[], flags: ReadonlyMap<string, string | true>, conditions: SheetConditions, io: CliIo): number {
  const name = flags.get('name');
  const modelName = typeof name === 'string' ? name : DEFAULT_MODEL_NAME;
  if (!/^[A-Za-z_][\w.-]*$/.test(modelName)) {
    io.err(`railcheck model: --name ${modelName}: expected a model name (a letter or _, then letters, digits, _ . -)`);
    return EXIT_ERROR;
  }
  const written = `.model ${modelName} ${type} (${pairs.join(' ')})`;
  const read = readModelLine(written, COMMAND_LINE);
  if (!read.ok) return fail(io, read.errors, 'the datasheet values cannot be read');
  const resolved = resolveModelCard(read.card);
  if (!resolved.ok) return fail(io, resolved.errors, 'the datasheet values do not resolve to a model');
  return present(io, 'datasheet', undefined, written, resolved, conditions, flags.has('json'));
}

/** The netlist of FILE, or of the parts library `parts:NAME` read as an include. */
function readSource(file: string, allowOutsideIncludes: boolean): ParseResult {
  if (file.startsWith('parts:')) return parseNetlist(`parts library ${file}\n.include "${file}"\n`, { file: COMMAND_LINE, allowOutsideIncludes });
  return readNetlistFile(file, { allowOutsideIncludes });
}

function fromNetlist(file: string, name: string, flags: ReadonlyMap<string, string | true>, conditions: SheetConditions, io: CliIo): number {
  const parsed = readSource(file, flags.has('allow-outside-includes'));
  if (!parsed.ok) return fail(io, parsed.errors, `${file} cannot be read${file.startsWith('parts:') ? ' (a parts library this railcheck may not have)' : ''}; no model was resolved`);
  const resolved = resolveNetlistModel(parsed.netlist, name);
  if (!resolved.ok) return fail(io, resolved.errors, `model ${name} of ${file} does not resolve`);
  const card = parsed.netlist.cards.find((c): c is ModelCard => c.kind === 'model' && c.name.toLowerCase() === name.toLowerCase())!;
  return present(io, 'netlist', { file, card }, modelLine(card), resolved, conditions, flags.has('json'));
}

function present(io: CliIo, source: ModelSource, from: { file: string; card: ModelCard } | undefined, written: string, resolved: ResolvedModel & { ok: true }, conditions: SheetConditions, json: boolean): number {
  // The test conditions default to the datasheet keys as written (resolved.given).
  const sheet = impliedDatasheet(resolved, conditions);
  if (!sheet.ok) return fail(io, sheet.errors, `the model ${resolved.name} cannot be simulated in its test circuits`);
  const rows: SheetRow[] = sheet.values.map((v) => ({ ...v, given: givenFor(v, resolved.given) }));
  if (json) {
    io.out(jsonText(modelJson(source, from, written, resolved, rows, MODEL_FORMAT, MODEL_VERSION)));
    return EXIT_OK;
  }
  io.out(formatModel(source, from, written, resolved, rows));
  return EXIT_OK;
}

