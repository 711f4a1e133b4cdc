/**
 * The parts library (packages/core/parts, docs/parts.md): every model
 * elaborates in a circuit that includes its file by name, and simulated in
 * its datasheet's test circuits (impliedDatasheet) gives back the values
 * written on its line. The outside reference is the datasheet value as
 * written in the file (typical datasheet values, from memory, as the files
 * say); the check is that the datasheet-form equations (devices/datasheet.ts)
 * invert the model there. The Zener voltages are checked against the E24
 * series of IEC 60063, written out below from the standard, not read from
 * the files.
 */
import { readFileSync, readdirSync } from 'node:fs';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';
import { impliedDatasheet, readModelLine, runNetlist, type ModelCard } from '@railcheck/core/internal';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const dir = join(root, 'packages/core/parts');

interface Part {
  readonly file: string;
  readonly line: string;
  readonly card: ModelCard;
  readonly given: ReadonlyMap<string, number>;
}

/** Every `.model` line of every library file, read with the netlist reader. */
const PARTS: Part[] = readdirSync(dir)
  .filter((f) => f.endsWith('.lib'))
  .sort()
  .flatMap((file) =>
    readFileSync(join(dir, file), 'utf8')
      .split('\n')
      .filter((l) => /^\.model\s/i.test(l))
      .map((line) => {
        const r = readModelLine(line);
        if (!r.ok) throw new Error(`${file}: ${line}: ${r.errors.map((e) => e.message).join('; ')}`);
        const given = new Map(r.card.params.flatMap((p) => (p.value.kind === 'number' ? [[p.name.toUpperCase(), p.value.value] as const] : [])));
        return { file: file.slice(0, -4), line, card: r.card, given };
      }),
  );

/** IEC 60063, the E24 series (one decade). */
const E24 = [1.0, 1.1, 1.2, 1.3, 1.5, 1.6, 1.8, 2.0, 2.2, 2.4, 2.7, 3.0, 3.3, 3.6, 3.9, 4.3, 4.7, 5.1, 5.6, 6.2, 6.8, 7.5, 8.2, 9.1];
/** E24 values from 2.7 V to 33 V (the decades 1, 10 and 100 V of the series, clipped). */
const ZENER_VOLTAGES = [1, 10, 100].flatMap((d) => E24.map((m) => Math.round(m * d * 10) / 10)).filter((v) => v >= 2.7 && v <= 33);
const ZENER_CLASSES = ['500mw', '1w3', '5w'];

/**
 * Relative tolerances of the implied values, each from the worst error
 * observed over the library, times about three:
 * - VF on a Zener: worst 1.9e-6 (zener_2v7_500mw): the breakdown term still
 *   carries up to 1e-4 of IF at the forward point (the RS of zeners.lib is
 *   chosen to keep it there), which the forward-point equation leaves out;
 * - VF of the other diodes: worst 3.8e-11 (signal_100v at 1 mA: the
 *   operating point's own convergence tolerance on the node voltage); VF2
 *   worst 3.7e-12, VF3 worst 3.3e-13 (the same, at higher currents);
 * - VZ: worst 9e-11 (Newton's convergence on the steep breakdown);
 * - ZZT: worst 3.3e-5, the truncation of the ±1 % central difference on a
 *   logarithmic curve, ε²/3 with ε = 0.01 (Taylor series of ln(1 ± ε));
 * - TCVZ: worst 7e-8, the difference of two operating points 2 K apart;
 * - HFE: worst 3.7e-7, the secant search on the base current stops at
 *   |ln(IC/ICHFE)| < 1e-12, and the base current is found at that accuracy;
 * - VBE: worst 4e-15 (exact within the arithmetic); 1e-13 allows the
 *   solver's own stopping tolerance.
 */
const TOLERANCE: Record<string, number> = { VF: 1.2e-10, VF2: 1.2e-11, VF3: 1e-12, VZ: 3e-10, ZZT: 1e-4, TCVZ: 2e-7, HFE: 1e-6, VBE: 1e-13 };
const ZENER_VF_TOLERANCE = 6e-6;

describe('the parts library', () => {
  test('holds the four files and a fair number of parts with unique names of the generic form', () => {
    expect(PARTS.map((p) => p.file).filter((f, i, a) => a.indexOf(f) === i)).toEqual(['leds', 'rectifiers', 'transistors', 'zeners']);
    const names = PARTS.map((p) => p.card.name);
    expect(new Set(names).size).toBe(names.length);
    for (const n of names) expect(n).toMatch(/^[a-z][a-z0-9_]*$/);
    expect(PARTS.filter((p) => p.file === 'zeners')).toHaveLength(ZENER_VOLTAGES.length * ZENER_CLASSES.length);
  });

  test.each(PARTS.map((p) => [p.card.name, p] as const))('%s elaborates and runs in a circuit that includes its file by name', (name, part) => {
    const type = part.card.type;
    const circuit =
      type === 'D' ? ['I1 0 a 1m', `D1 a 0 ${name}`] : type === 'NPN' ? ['VC c 0 5', 'RB c b 470k', `Q1 c b 0 ${name}`] : ['VC c 0 -5', 'RB c b 470k', `Q1 c b 0 ${name}`];
    const r = runNetlist(['model check', `.include "parts:${part.file}"`, ...circuit, '.op', ''].join('\n'), { file: join(dir, 'check.cir') });
    expect(r.ok ? [] : r.errors.map((e) => e.message)).toEqual([]);
  });

  test.each(PARTS.map((p) => [p.card.name, p] as const))('%s: its test circuits give back the datasheet values written in the file', (_name, part) => {
    const s = impliedDatasheet(part.card);
    expect(s.ok ? [] : s.errors.map((e) => e.message)).toEqual([]);
    if (!s.ok) return;
    const keys = part.card.type === 'D' ? ['VF', 'VF2', 'VF3', 'VZ', 'ZZT', 'TCVZ'] : ['HFE', 'VBE'];
    let compared = 0;
    for (const k of keys) {
      const written = part.given.get(k);
      if (written === undefined) continue;
      const implied = s.values.find((v) => v.key === k);
      expect(implied, k).toBeDefined();
      const tol = k === 'VF' && part.given.has('VZ') ? ZENER_VF_TOLERANCE : TOLERANCE[k]!;
      expect(Math.abs(implied!.value - written) / Math.abs(written), `${k}: written ${written}, implied ${implied!.value}`).toBeLessThanOrEqual(tol);
      compared++;
    }
    // Every part states its main datasheet values: a forward point (diodes), gain and VBE (transistors).
    expect(compared).toBeGreaterThanOrEqual(part.card.type === 'D' ? 1 : 2);
  });

  test('the Zeners cover every E24 value (IEC 60063) from 2.7 V to 33 V in each power class, and their names say their voltage', () => {
    expect(ZENER_VOLTAGES).toHaveLength(27);
    for (const cls of ZENER_CLASSES) {
      const inClass = PARTS.filter((p) => p.file === 'zeners' && p.card.name.endsWith(`_${cls}`));
      expect(inClass.map((p) => p.given.get('VZ')).sort((a, b) => a! - b!), cls).toEqual(ZENER_VOLTAGES);
      for (const p of inClass) {
        const m = /^zener_(\d+)v(\d?)_/.exec(p.card.name);
        expect(m, p.card.name).not.toBeNull();
        expect(Number(`${m![1]}.${m![2] || '0'}`), p.card.name).toBe(p.given.get('VZ'));
      }
    }
  });

  test('every Zener has a test current, dynamic resistance, temperature coefficient, forward point and power rating', () => {
    for (const p of PARTS.filter((q) => q.file === 'zeners')) {
      for (const k of ['VZ', 'IZT', 'ZZT', 'TCVZ', 'VF', 'IF', 'PMAX']) expect(p.given.has(k), `${p.card.name} ${k}`).toBe(true);
    }
  });

  test('the Zener temperature coefficient is negative below 5 V and positive from 5.6 V up', () => {
    // Tunnelling (field emission) dominates below about 5 V and has a
    // negative coefficient; avalanche above, with a positive one (handbook
    // statement, from memory); the crossover lies between 5 V and 5.6 V.
    for (const p of PARTS.filter((q) => q.file === 'zeners')) {
      const vz = p.given.get('VZ')!;
      const tc = p.given.get('TCVZ')!;
      if (vz < 5) expect(tc, p.card.name).toBeLessThan(0);
      if (vz >= 5.6) expect(tc, p.card.name).toBeGreaterThan(0);
    }
  });

  test('the Zener test current falls with voltage in the 1.3 W and 5 W classes (datasheet practice: about a fixed power at IZT)', () => {
    for (const cls of ['1w3', '5w']) {
      const inClass = PARTS.filter((p) => p.file === 'zeners' && p.card.name.endsWith(`_${cls}`)).sort((a, b) => a.given.get('VZ')! - b.given.get('VZ')!);
      for (let k = 1; k < inClass.length; k++) expect(inClass[k]!.given.get('IZT')!, inClass[k]!.card.name).toBeLessThanOrEqual(inClass[k - 1]!.given.get('IZT')!);
    }
  });

  test('diode ratings and transistor ratings are given on every part', () => {
    for (const p of PARTS) {
      const keys = p.card.type === 'D' ? (p.file === 'zeners' ? ['PMAX'] : ['VRRM', 'IFAV', 'IFRM', 'PMAX']) : ['VCEMAX', 'VCBMAX', 'ICMAX', 'PMAX'];
      for (const k of keys) expect(p.given.has(k), `${p.card.name} ${k}`).toBe(true);
    }
  });

  test('docs/parts.md names every part of the library', () => {
    const doc = readFileSync(join(root, 'docs/parts.md'), 'utf8');
    const missing = PARTS.map((p) => p.card.name).filter((n) => !new RegExp(`\`${n}\``).test(doc));
    expect(missing).toEqual([]);
  });
});
