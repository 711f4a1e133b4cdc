/**
 * JSON text as railcheck prints it (docs/output.md, "JSON"): two-space
 * indentation as JSON.stringify(value, null, 2) gives, except that an array
 * of plain values (numbers, strings, booleans, null) is written on one line,
 * `[0, 0.0001, 0.0002]`, so that a waveform of 10^5 points is one line, not
 * 10^5. The same values as JSON.stringify's (parsing both gives equal
 * objects; test/cli/output/json-text.test.ts). A typed array of numbers (a
 * transient's waveforms are Float64Arrays) is written as the array of its
 * numbers. {@link writeJson} hands the text out in pieces as it is made, a
 * long array a block of numbers at a time, so a report with waveforms of
 * 10^5 points is never one string.
 */

/** True for a value JSON writes without nesting. */
const plain = (v: unknown): boolean => v === null || typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean';

/** Numbers of a long array written per piece (bounds the size of one piece of output). */
const BLOCK = 1024;

/** `value` as JSON text, indented two spaces, arrays of plain values on one line. */
export function jsonText(value: unknown): string {
  const parts: string[] = [];
  writeJson(value, (piece) => parts.push(piece));
  return parts.join('');
}

/** Writes `value` as {@link jsonText} does, handing each piece of the text to `emit` in order (their concatenation is jsonText's text). */
export function writeJson(value: unknown, emit: (piece: string) => void): void {
  write(value, '', { push: emit });
}

/** The writer's output: pieces of text, in order. */
interface Sink {
  push(piece: string): void;
}

/** A list of plain values on one line, `[a, b, c]`, a block at a time. */
function writeLine(v: ArrayLike<unknown>, out: Sink): void {
  out.push('[');
  for (let k = 0; k < v.length; k += BLOCK) {
    const block: string[] = [];
    for (let j = k; j < Math.min(v.length, k + BLOCK); j++) block.push(JSON.stringify(v[j]) ?? 'null');
    out.push(`${k > 0 ? ', ' : ''}${block.join(', ')}`);
  }
  out.push(']');
}

function write(value: unknown, indent: string, out: Sink): void {
  // toJSON and the values JSON leaves out or nulls (undefined, functions, NaN) behave as in JSON.stringify.
  const v = value !== null && typeof value === 'object' && typeof (value as { toJSON?: unknown }).toJSON === 'function' ? (value as { toJSON: () => unknown }).toJSON() : value;
  if (v === null || typeof v !== 'object') {
    out.push(JSON.stringify(v) ?? 'null');
    return;
  }
  const inner = `${indent}  `;
  if (v instanceof Float64Array || v instanceof Float32Array || v instanceof Int32Array || v instanceof Uint8Array) {
    if (v.length === 0) out.push('[]');
    else writeLine(v, out);
    return;
  }
  if (Array.isArray(v)) {
    if (v.length === 0) {
      out.push('[]');
      return;
    }
    if (v.every(plain)) {
      writeLine(v, out);
      return;
    }
    out.push('[\n');
    v.forEach((x, k) => {
      out.push(inner);
      if (x === undefined || typeof x === 'function' || typeof x === 'symbol') out.push('null');
      else write(x, inner, out);
      out.push(k < v.length - 1 ? ',\n' : '\n');
    });
    out.push(`${indent}]`);
    return;
  }
  const entries = Object.entries(v as Record<string, unknown>).filter(([, x]) => x !== undefined && typeof x !== 'function' && typeof x !== 'symbol');
  if (entries.length === 0) {
    out.push('{}');
    return;
  }
  out.push('{\n');
  entries.forEach(([k, x], i) => {
    out.push(`${inner}${JSON.stringify(k)}: `);
    write(x, inner, out);
    out.push(i < entries.length - 1 ? ',\n' : '\n');
  });
  out.push(`${indent}}`);
}
