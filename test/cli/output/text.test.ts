/**
 * The text report of `railcheck run FILE`: the transient summary (per-node
 * minimum, maximum, peak-to-peak and final value with the stepper's
 * counters) and the small-signal table (dB and degrees per node at up to
 * about a dozen frequencies), as described in docs/output.md. Values are
 * checked against hand calculations.
 */
import { describe, expect, test } from 'vitest';
import { cli, scratchDir, writeNetlist } from './support.js';

async function report(lines: readonly string[]): Promise<string> {
  const file = writeNetlist(scratchDir(), [...lines, '.end', ''].join('\n'));
  const r = await cli(['run', file]);
  expect(r.status, r.err).toBe(0);
  return r.out;
}

/** The lines of the section whose heading starts with `title`, up to the next blank line. */
function section(text: string, title: string): string[] {
  const lines = text.split('\n');
  const at = lines.findIndex((l) => l.startsWith(title));
  expect(at, `section "${title}" in\n${text}`).toBeGreaterThanOrEqual(0);
  const end = lines.indexOf('', at);
  return lines.slice(at, end < 0 ? undefined : end);
}

/** Cells of a table row (two or more spaces separate cells). */
const cells = (line: string): string[] => line.trim().split(/\s{2,}/);

describe('transient summary', () => {
  test('heading, method and counters, and min / max / peak-peak / final per node', async () => {
    // Resistive divider from a pwl ramp 0 → 4 V: V(mid) = V(in)/2 exactly (equal resistors).
    const text = await report([
      'model-railway controller: ramp',
      'V1 in 0 pwl(0 0 0.4m 4 1m 4)',
      'R1 in mid 1k',
      'R2 mid 0 1k',
      '.tran 0.1m 1m',
    ]);
    const s = section(text, 'Transient to 1 ms at 27 °C');
    expect(s[1]).toMatch(/^─+$/);
    expect(s[2]).toMatch(/^ {2}trapezoidal rule, from the operating point; \d+ steps \(.+ to .+\), \d+ rejected, \d+ Newton iterations$/);
    expect(cells(s[3]!)).toEqual(['node', 'min', 'max', 'peak-peak', 'at end']);
    expect(cells(s.find((l) => l.trim().startsWith('in '))!)).toEqual(['in', '0 V', '4 V', '4 V', '4 V']);
    expect(cells(s.find((l) => l.trim().startsWith('mid '))!)).toEqual(['mid', '0 V', '2 V', '2 V', '2 V']);
  });

  test('a long output grid (500 001 points) is summarised, not an internal error', async () => {
    // tstop/tstep = 5e5: the summary must not spread the grid into Math.min/Math.max arguments,
    // which overflows V8's stack (engine limit, common knowledge).
    const text = await report(['long log', 'V1 in 0 dc 1', 'R1 in out 1k', 'C1 out 0 1u', '.tran 1u 0.5']);
    expect(cells(section(text, 'Transient to 500 ms').find((l) => l.trim().startsWith('out '))!)).toEqual(['out', '1 V', '1 V', '0 V', '1 V']);
  });

  test('backward Euler from ic= values is said so', async () => {
    const text = await report(['rc from ic', 'V1 in 0 dc 1', 'R1 in out 1k', 'C1 out 0 1u ic=0.5', '.tran 0.1m 1m be fromic']);
    expect(section(text, 'Transient to 1 ms')[2]).toMatch(/^ {2}backward Euler, from the ic= values;/);
  });
});

describe('small-signal table', () => {
  const FC = 1 / (2 * Math.PI * 1e3 * 100e-9);

  test('dB / degrees per node; at the RC corner −3.01 dB and −45°', async () => {
    const text = await report(['filter', 'V1 in 0 dc 5 ac 1', 'R1 in out 1k', 'C1 out 0 100n', `.ac lin 1 ${FC} ${FC}`]);
    const s = section(text, 'Small-signal sweep at 27 °C');
    expect(cells(s[2]!)).toEqual(['frequency', 'in dB / °', 'out dB / °']);
    // |H(fc)| = 1/√2 → −3.01 dB, arg −45° (textbook, from memory); the source node is 1∠0.
    expect(cells(s[3]!)).toEqual(['1.592 kHz', '0.00 / 0.0', '-3.01 / -45.0']);
  });

  test('a long sweep is thinned to about a dozen rows, first frequency kept', async () => {
    // dec 10 from 1 Hz to 1 MHz: 61 points; every ceil(61/12) = 6th is printed → 11 rows.
    const text = await report(['filter', 'V1 in 0 ac 1', 'R1 in out 1k', 'C1 out 0 100n', '.ac dec 10 1 1meg']);
    const rows = section(text, 'Small-signal sweep').slice(3);
    expect(rows.length).toBe(11);
    expect(cells(rows[0]!)[0]).toBe('1 Hz');
    // 6 points at 10 per decade = 10^0.6 ≈ 3.981 Hz.
    expect(cells(rows[1]!)[0]).toBe('3.981 Hz');
    // Far above the corner: −20 dB/decade, so 1 MHz is 20·log10(f/fc) ≈ 55.98 dB down (to 0.01 dB).
    const last = cells(rows[10]!);
    expect(last[0]).toBe('1 MHz');
    expect(Number(last[2]!.split(' / ')[0])).toBeCloseTo(-20 * Math.log10(1e6 / FC), 2);
  });

  test('more than six nodes: the rest are named as being in --json', async () => {
    const ladder = ['ladder', 'V1 n0 0 ac 1'];
    for (let k = 1; k <= 8; k++) ladder.push(`R${k} n${k - 1} n${k} 1k`, `C${k} n${k} 0 1n`);
    const s = section(await report([...ladder, '.ac lin 1 1k 1k']), 'Small-signal sweep');
    expect(cells(s[2]!).length).toBe(7);
    expect(s[s.length - 1]).toBe('  (3 more node(s) in --json output)');
  });

  test('no source with an ac value: the Notes section carries the warning', async () => {
    const text = await report(['no drive', 'V1 in 0 dc 5', 'R1 in out 1k', 'C1 out 0 100n', '.ac dec 1 10 100']);
    const notes = section(text, 'Notes');
    expect(notes.join('\n')).toMatch(/no source has an ac value/);
  });
});
