/**
 * The netlist fuzzer's inputs: seed netlists (examples/*.cir and the
 * netlists written out in the tests) mutated token by token and line by
 * line, fresh directive lines with random arguments, and random bytes.
 * Everything is drawn from fast-check arbitraries, so a seed (FC_SEED)
 * replays a run case for case.
 *
 * Inputs that stress budgets of the waveform, transient and include code
 * (femtosecond edges and steps) are produced when `pending` is set (the
 * default of the test; FUZZ_PENDING=0 clears it);
 * without it such values are replaced by safe ones in time-like positions
 * (waveforms, .tran, .figure keys), and element values stay within 1e12 in
 * magnitude (value ranges are being added by the same line of work).
 */
import fc from 'fast-check';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseNetlist, prepare } from '@railcheck/core';

const ROOT = fileURLToPath(new URL('../../../', import.meta.url));

/** Template literals in a test file that look like whole netlists (a title and at least two element or directive lines, no interpolation). */
function netlistsIn(text: string): string[] {
  const out: string[] = [];
  for (const m of text.matchAll(/`([^`$\\]{20,4000})`/g)) {
    const body = m[1]!;
    const lines = body.split('\n');
    const cards = lines.filter((l) => /^\s*([RCLKVIDQEGFHX]\w*\s+\S+\s+\S+|\.(model|tran|op|dc|ac|supply|figure|subckt))/i.test(l)).length;
    if (lines.length >= 3 && cards >= 2) out.push(body);
  }
  return out;
}

function walk(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? (e.name === 'fuzz' ? [] : walk(join(dir, e.name))) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []));
}

/**
 * The seed netlists: every example, then the netlists found in the test
 * files that elaborate and compile (the rest are fragments or error cases),
 * in a fixed order so that a seed replays.
 */
export function seedNetlists(): string[] {
  const examples = readdirSync(join(ROOT, 'examples')).filter((f) => f.endsWith('.cir')).sort().map((f) => readFileSync(join(ROOT, 'examples', f), 'utf8'));
  const fixtures = walk(join(ROOT, 'test')).sort().flatMap((f) => netlistsIn(readFileSync(f, 'utf8')));
  return [...examples, ...[...new Set(fixtures)].filter((t) => prepare(parseNetlist(t)).ok)];
}

/** Replacement numbers: extremes, junk and ordinary engineering values. */
const EXTREMES = ['0', '-0', '-1', '1', '1e300', '-1e300', '1e-300', '1f', '1e-15', '1e999', 'NaN', 'nan', 'Infinity', 'inf', '1e9', '999999999', '1e18', '1meg', '1t', '5%', '0%', '200%', '1e+', '.', '{1/0}', '{0/0}', '{-1e300*1e300}', '{sqrt(-1)}', '{log(0)}', '1k', '4.7u', '100n', '12', '-12'];
/** In time-like positions (waveforms, .tran, sag keys) while budgets are pending: nothing below a nanosecond. */
const SAFE_TIMES = ['0', '-1', '1', '1u', '1m', '10m', '50', 'NaN', '1e999', '{0/0}', '5%'];

const LETTERS = 'RCLKVIDQEGFHXZ'.split('');
const NODES = ['0', 'a', 'b', 'out', 'in', 'gnd', 'res', 'ref', 'nan', '0', 'x'];
/** Magnitudes beyond 1e12 in element values: in with `pending` (the default; FUZZ_PENDING=0 holds them back). */
const HUGE = new Set(['1e300', '-1e300', '1e18', '{-1e300*1e300}']);
const numbers = (pending: boolean): fc.Arbitrary<string> =>
  fc.oneof(
    fc.constantFrom(...EXTREMES.filter((x) => pending || !HUGE.has(x))),
    (pending ? fc.double({ noNaN: false }) : fc.double({ min: -1e12, max: 1e12 })).map(String),
    fc.integer({ min: -5, max: 1e7 }).map(String),
  );
/**
 * In waveform arguments while budgets are pending: no amplitude below a
 * bridge's two diode drops either (a sine-fed stage at 1 mV or -1 V takes
 * about 10 s to report not-settled; pending.ts).
 */
const WAVE_SAFE = ['0', '5', '12', '-12', '24', 'NaN', '1e999', '{0/0}', '5%'];
const NUM_SAFE = fc.oneof(fc.constantFrom(...SAFE_TIMES), fc.integer({ min: 1, max: 1e4 }).map((n) => `${n}u`));
const KEYS = ['freq', 'amp', 'depth', 'dur', 'edge', 'fall', 'method', 'step', 'from', 'to', 'at', 'ripple', 'iload', 'points'];
const FIGS = ['line', 'load', 'ripple', 'dropout', 'dissipation', 'sag', 'bogus'];
const LIMITS = ['line.delta', 'line.pct', 'load.delta', 'ripple.rr', 'dropout.v', 'pd.Q1', 'sag.max_depth', 'eff', 'x.y'];
const INCLUDES = ['"sub.lib"', '"case.cir"', '"missing.lib"', '"../x.lib"', '"/dev/null"', '"/etc/hostname"', '""', 'sub.lib', '"sub.lib" extra', '"loop.lib"'];

/** A random directive line; `pending` allows femtosecond times. */
function directive(pending: boolean): fc.Arbitrary<string> {
  const NUM = numbers(pending);
  const t = pending ? NUM : NUM_SAFE;
  const w = pending ? NUM : fc.constantFrom(...WAVE_SAFE);
  return fc.oneof(
    fc.tuple(t, t, fc.option(t, { nil: undefined }), fc.option(fc.constantFrom('be', 'fromic', 'uic', '1'), { nil: undefined })).map(([a, b, c, d]) => ['.tran', a, b, c, d].filter((x) => x !== undefined).join(' ')),
    fc.tuple(fc.constantFrom('dec', 'oct', 'lin', 'log', ''), NUM, NUM, NUM).map(([v, n, f1, f2]) => `.ac ${v} ${n} ${f1} ${f2}`),
    fc.tuple(fc.constantFrom('V1', 'VIN', 'VSEC', 'R1', 'temp', 'X'), NUM, NUM, NUM).map(([s, a, b, c]) => `.dc ${s} ${a} ${b} ${c}`),
    fc.tuple(fc.constantFrom(...FIGS), fc.array(fc.tuple(fc.constantFrom(...KEYS), pending ? NUM : fc.oneof(NUM_SAFE, fc.constantFrom('ac', 'tran', '50%', '1'))), { maxLength: 3 })).map(
      ([f, kv]) => `.figure ${f} ${kv.map(([k, v]) => `${k}=${v}`).join(' ')}`,
    ),
    fc.tuple(fc.constantFrom(...LIMITS), fc.constantFrom('<=', '>=', '<', '=', '=='), NUM).map(([n, o, v]) => `.limit ${n} ${o} ${v}`),
    fc.constantFrom(...INCLUDES).map((p) => `.include ${p}`),
    fc.array(NUM, { minLength: 0, maxLength: 4 }).map((ts) => `.temp ${ts.join(' ')}`),
    fc.constant('.op'),
    fc.tuple(fc.constantFrom('x', 'vin', 'rl', 'a'), NUM).map(([n, v]) => `.param ${n}=${v}`),
    fc.tuple(fc.constantFrom('VIN', 'V1', 'VSEC', 'R1'), fc.constantFrom(...NODES), fc.constantFrom('RL', 'ILOAD', 'R1', 'none')).map(([i, o, l]) => `.supply in=${i} out=${o} load=${l}`),
    fc.tuple(fc.constantFrom('R', 'C', 'L', 'V', 'I', 'D', 'Q'), fc.constantFrom(...NODES), fc.constantFrom(...NODES), NUM).map(([l, a, b, v]) => `${l}F9 ${a} ${b} ${v}`),
    fc.tuple(fc.constantFrom('pulse', 'sin', 'pwl', 'exp'), fc.array(w, { minLength: 0, maxLength: 8 })).map(([w, a]) => `VF9 in 0 ${w}(${a.join(' ')})`),
    fc.tuple(fc.constantFrom('.model', '.subckt', '.ends', '.end', '.spread', '.options', '.foo'), fc.array(fc.oneof(NUM, fc.constantFrom('D', 'NPN', 'PNP', 'IS=1e-14', 'BV=5', 'BF=1e300', 'x')), { maxLength: 4 })).map(([d, a]) => `${d} ${a.join(' ')}`),
  );
}

/** One mutation, applied to the lines of a netlist. */
type Mutation = (lines: string[]) => void;

/** Whether a token of `line` at index `k` is a time-like position (waveform arguments, .tran, figure keys). */
function timeLike(line: string, tokens: readonly string[], k: number): boolean {
  if (/^\s*\.tran\b/i.test(line)) return true;
  if (/^\s*\.figure\b/i.test(line) || /\b(edge|dur|freq)=/i.test(tokens[k] ?? '')) return true;
  // Any value after a waveform's opening: its times, and its amplitudes too (simpler, and only while budgets are pending).
  return /(pulse|sin|pwl|exp)\s*\(/i.test(tokens.slice(0, k + 1).join(' '));
}

function mutation(pending: boolean): fc.Arbitrary<Mutation> {
  const NUM = numbers(pending);
  const at = fc.nat();
  const numAt = (line: string, tokens: string[], k: number, v: string, safe: string, wave: string): string =>
    pending || !timeLike(line, tokens, k) ? v : /(pulse|sin|pwl|exp)\s*\(/i.test(line) ? wave : safe;
  return fc.oneof(
    // Replace a number (or any token that starts like one) in a random line with an extreme value.
    { weight: 5, arbitrary: fc.tuple(at, at, NUM, NUM_SAFE, fc.constantFrom(...WAVE_SAFE)).map(([i, j, v, safe, wave]): Mutation => (lines) => {
      const li = i % lines.length;
      const tokens = lines[li]!.split(/\s+/);
      const nums = tokens.map((t, k) => (/^[-+.{]?\d|=[-+.]?\d/.test(t) ? k : -1)).filter((k) => k >= 0);
      if (nums.length === 0) return;
      const k = nums[j % nums.length]!;
      const tok = tokens[k]!;
      const value = numAt(lines[li]!, tokens, k, v, safe, wave);
      // Keep a key= prefix and a closing parenthesis, so the line still parses far enough to reach the value.
      const eq = tok.indexOf('=');
      tokens[k] = `${eq >= 0 ? tok.slice(0, eq + 1) : ''}${value}${tok.endsWith(')') ? ')' : ''}`;
      lines[li] = tokens.join(' ');
    }) },
    // Drop, duplicate or swap tokens within a line.
    { weight: 2, arbitrary: fc.tuple(at, at, at, fc.constantFrom('drop', 'dup', 'swap')).map(([i, j, k, op]): Mutation => (lines) => {
      const li = i % lines.length;
      const tokens = lines[li]!.split(/\s+/).filter((t) => t !== '');
      if (tokens.length === 0) return;
      const a = j % tokens.length;
      const b = k % tokens.length;
      if (op === 'drop') tokens.splice(a, 1);
      else if (op === 'dup') tokens.splice(a, 0, tokens[a]!);
      else [tokens[a], tokens[b]] = [tokens[b]!, tokens[a]!];
      lines[li] = tokens.join(' ');
    }) },
    // Drop, duplicate or swap lines.
    { weight: 2, arbitrary: fc.tuple(at, at, fc.constantFrom('drop', 'dup', 'swap'), fc.integer({ min: 1, max: 50 })).map(([i, j, op, n]): Mutation => (lines) => {
      const a = i % lines.length;
      const b = j % lines.length;
      if (op === 'drop' && lines.length > 1) lines.splice(a, 1);
      else if (op === 'dup') lines.splice(a, 0, ...Array<string>(n).fill(lines[a]!));
      else [lines[a], lines[b]] = [lines[b]!, lines[a]!];
    }) },
    // Change an element's letter.
    { weight: 2, arbitrary: fc.tuple(at, fc.constantFrom(...LETTERS)).map(([i, letter]): Mutation => (lines) => {
      const elements = lines.map((l, k) => (/^[A-Za-z]/.test(l) && k > 0 ? k : -1)).filter((k) => k >= 0);
      if (elements.length === 0) return;
      const k = elements[i % elements.length]!;
      lines[k] = letter + lines[k]!.slice(1);
    }) },
    // Insert a directive or element line with random arguments.
    { weight: 3, arbitrary: fc.tuple(at, directive(pending)).map(([i, d]): Mutation => (lines) => {
      lines.splice(1 + (i % lines.length), 0, d);
    }) },
    // Insert random bytes.
    { weight: 1, arbitrary: fc.tuple(at, fc.uint8Array({ maxLength: 12 })).map(([i, b]): Mutation => (lines) => {
      const li = i % lines.length;
      const line = lines[li]!;
      const c = i % (line.length + 1);
      lines[li] = line.slice(0, c) + Buffer.from(b).toString('latin1') + line.slice(c);
    }) },
  );
}

/** One fuzz case: the netlist text, what `sub.lib` holds, and which command-line flags the CLI run gets. */
export interface FuzzCase {
  readonly text: string;
  readonly lib: string;
  readonly flags: readonly string[];
}

/** The fuzz cases: mostly mutated seeds, some whole random byte strings and some seeds with many fresh directives. */
export function fuzzCase(seeds: readonly string[], pending: boolean): fc.Arbitrary<FuzzCase> {
  const seed = fc.nat({ max: seeds.length - 1 }).map((k) => seeds[k]!);
  const mutated = fc.tuple(seed, fc.array(mutation(pending), { minLength: 1, maxLength: 6 })).map(([s, ms]) => {
    const lines = s.split('\n');
    for (const m of ms) m(lines);
    return lines.join('\n');
  });
  const text = fc.oneof(
    { weight: 8, arbitrary: mutated },
    { weight: 1, arbitrary: fc.uint8Array({ maxLength: 400 }).map((b) => Buffer.from(b).toString('latin1')) },
    { weight: 1, arbitrary: fc.tuple(seed, fc.array(directive(pending), { minLength: 1, maxLength: 5 })).map(([s, ds]) => `${s.replace(/^\.end\s*$/m, '')}\n${ds.join('\n')}\n`) },
  );
  const lib = fc.oneof(fc.constant('R9 a 0 1k\n'), fc.constant('.include "sub.lib"\n'), seed, fc.string({ maxLength: 40 }));
  const flags = fc.constantFrom<readonly string[]>([], ['--json'], ['--json', '--steps'], ['--allow-outside-includes']);
  return fc.record({ text, lib, flags });
}
