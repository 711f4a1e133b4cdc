/**
 * JSON text as railcheck prints it (docs/output.md, "JSON"): two-space
 * indentation as JSON.stringify(value, null, 2) gives, except that an array
 * of plain values (numbers, strings, booleans, null) is written on one line,
 * `[0, 0.0001, 0.0002]`, so that a waveform of 10^5 points is one line, not
 * 10^5. The same values as JSON.stringify's (parsing both gives equal
 * objects; test/cli/output/json-text.test.ts).
 */

/** True for a value JSON writes without nesting. */
const plain = (v: unknown): boolean => v === null || typeof v === 'number' || typeof v === 'string' || typeof v === 'boolean';

/** `value` as JSON text, indented two spaces, arrays of plain values on one line. */
export function jsonText(value: unknown): string {
  const parts: string[] = [];
  write(value, '', parts);
  return parts.join('');
}

function write(value: unknown, indent: string, out: string[]): void {
  // toJSON and the values JSON leaves out or nulls (undefined, functions, NaN) behave as in JSON.stringify.
  const v = value !== null && typeof value === 'object' && typeof (value as { toJSON?: unknown }).toJSON === 'function' ? (value as { toJSON: () => unknown }).toJSON() : value;
  if (v === null || typeof v !== 'object') {
    out.push(JSON.stringify(v) ?? 'null');
    return;
  }
  const inner = `${indent}  `;
  if (Array.isArray(v)) {
    if (v.length === 0) {
      out.push('[]');
      return;
    }
    if (v.every(plain)) {
      out.push(`[${v.map((x) => JSON.stringify(x)).join(', ')}]`);
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
