/**
 * Argument checks at the public boundary (README, "Using it as a library":
 * every function of @railcheck/core returns its error result or throws
 * only RailcheckError). A call from JavaScript, or with a value built by
 * hand, can pass anything; these checks turn a missing, null or
 * wrong-typed argument into a `bad-argument` diagnostic naming the
 * function, the parameter and what was expected, before the value reaches
 * code that would fail with a TypeError or RangeError. Objects that only
 * railcheck can make (a flat circuit, a compiled circuit, a bench, a
 * transient result) carry a brand: the boundary accepts only those made by
 * the functions that make them.
 */
import { errorAt, RailcheckError, type Diagnostic } from './errors.js';

/** The diagnostic of a wrong argument: `fn: parameter is <what came>, expected <what>`, with no place (it belongs to no netlist line). */
export function argumentDiagnostic(fn: string, parameter: string, expected: string, got: unknown): Diagnostic {
  return errorAt('bad-argument', `${fn}: ${parameter} is ${describeValue(got)}, expected ${expected}`, undefined, undefined, expected);
}

/** {@link argumentDiagnostic} as a RailcheckError to throw. */
export function argumentError(fn: string, parameter: string, expected: string, got: unknown): RailcheckError {
  return new RailcheckError([argumentDiagnostic(fn, parameter, expected, got)]);
}

/** A short description of any value for an argument error: its type and, for a plain value, the value. */
export function describeValue(v: unknown): string {
  if (v === null) return 'null';
  if (v === undefined) return 'missing';
  if (typeof v === 'number' || typeof v === 'boolean' || typeof v === 'bigint') return `${typeof v} ${String(v)}`;
  if (typeof v === 'string') return `the string ${JSON.stringify(v.length > 40 ? `${v.slice(0, 40)}…` : v)}`;
  if (typeof v === 'symbol' || typeof v === 'function') return `a ${typeof v}`;
  return Array.isArray(v) ? 'an array' : 'an object of another shape';
}

/** True for a non-null object that is not an array. */
export function isRecord(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/**
 * The first problem with an options object, or undefined: `opts` is
 * undefined or an object, and each named member is undefined or passes its
 * check (`finite`: a finite number; a list of strings: one of them).
 */
export function optionsProblem(fn: string, opts: unknown, members: Readonly<Record<string, 'finite' | 'boolean' | 'string' | 'function' | readonly string[]>>): Diagnostic | undefined {
  if (opts === undefined) return undefined;
  if (!isRecord(opts)) return argumentDiagnostic(fn, 'options', 'an object or nothing', opts);
  for (const [name, kind] of Object.entries(members)) {
    let v: unknown;
    try {
      v = opts[name];
    } catch {
      return argumentDiagnostic(fn, `options.${name}`, 'a readable member', undefined);
    }
    if (v === undefined) continue;
    const [ok, expected] =
      kind === 'finite' ? [typeof v === 'number' && Number.isFinite(v), 'a finite number']
      : kind === 'boolean' ? [typeof v === 'boolean', 'true or false']
      : kind === 'string' ? [typeof v === 'string', 'a string']
      : kind === 'function' ? [typeof v === 'function', 'a function']
      : [typeof v === 'string' && kind.includes(v), `one of ${kind.join(', ')}`];
    if (!ok) return argumentDiagnostic(fn, `options.${name}`, expected, v);
  }
  return undefined;
}

/** Throws the problem {@link optionsProblem} finds. */
export function checkOptions(fn: string, opts: unknown, members: Parameters<typeof optionsProblem>[2]): void {
  const problem = optionsProblem(fn, opts, members);
  if (problem) throw new RailcheckError([problem]);
}

/** Throws unless `v` is a string. */
export function checkString(fn: string, parameter: string, v: unknown): asserts v is string {
  if (typeof v !== 'string') throw argumentError(fn, parameter, 'a string', v);
}

/** Throws unless `v` is a finite number. */
export function checkFinite(fn: string, parameter: string, v: unknown): asserts v is number {
  if (typeof v !== 'number' || !Number.isFinite(v)) throw argumentError(fn, parameter, 'a finite number', v);
}

/**
 * The objects of one kind that railcheck made (held weakly, so they are
 * collected as usual): `mark` records one as it is made, `has` and
 * `check` ask at the boundary.
 */
export class Brand<T extends object> {
  private readonly made = new WeakSet<object>();

  /** @param what - how a parameter of this kind is described, e.g. "a compiled circuit from compileCircuit". */
  constructor(readonly what: string) {}

  /** Records `x` as made by railcheck; returns it. */
  mark<U extends T>(x: U): U {
    this.made.add(x);
    return x;
  }

  /** True when railcheck made `v`. */
  has(v: unknown): v is T {
    return typeof v === 'object' && v !== null && this.made.has(v);
  }

  /** The diagnostic for `v` when railcheck did not make it, else undefined. */
  problem(fn: string, parameter: string, v: unknown): Diagnostic | undefined {
    return this.has(v) ? undefined : argumentDiagnostic(fn, parameter, this.what, v);
  }

  /** Throws unless railcheck made `v`. */
  check(fn: string, parameter: string, v: unknown): asserts v is T {
    if (!this.has(v)) throw argumentError(fn, parameter, this.what, v);
  }
}

/**
 * What a foreign exception (a TypeError, a RangeError...) thrown while a
 * public function used an argument becomes: the RailcheckError itself when
 * it is one; `bad-argument` when the argument was not made by railcheck
 * (`made` false: a value built or edited by hand that is not what the type
 * describes); `internal` when it was, since then the failure is a bug of
 * railcheck's to report.
 */
export function foreignFailure(fn: string, e: unknown, made: boolean, expected: string): RailcheckError {
  if (e instanceof RailcheckError) return e;
  const why = e instanceof Error ? `${e.name}: ${e.message}` : String(e);
  return new RailcheckError([
    made
      ? errorAt('internal', `${fn}: internal error: ${why} (please report this with the netlist)`)
      : errorAt('bad-argument', `${fn}: its argument could not be used (${why}); it is not ${expected}`, undefined, undefined, expected),
  ]);
}

/** Runs `body`, turning a foreign exception into a RailcheckError ({@link foreignFailure}). */
export function shielded<T>(fn: string, made: boolean, expected: string, body: () => T): T {
  try {
    return body();
  } catch (e) {
    throw foreignFailure(fn, e, made, expected);
  }
}
