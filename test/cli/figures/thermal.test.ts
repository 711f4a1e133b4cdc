/**
 * `railcheck run` on the thermal example (examples/sensor-rail-thermal.cir)
 * prints the thermal figure's values. The junction temperature of the pass
 * transistor is checked by hand against its printed dissipation: Tj = Ta +
 * P·(Rth(j-c) + Rth(c-a)), the series thermal path of JEDEC JESD51-1 (from
 * memory), with Ta = 45 °C (the example's .temp, the default ambient), rth = 5 K/W and rthsink = 40 K/W as the example
 * writes them.
 */
import { describe, expect, test } from 'vitest';
import { fileURLToPath } from 'node:url';
import { main } from '@railcheck/cli';

const EXAMPLE = fileURLToPath(new URL('../../../examples/sensor-rail-thermal.cir', import.meta.url));

async function run(flags: readonly string[]): Promise<{ status: number; out: string }> {
  const out: string[] = [];
  const status = await main(['run', EXAMPLE, ...flags], { out: (t) => out.push(t), err: () => {} });
  return { status, out: out.join('\n') };
}

describe('railcheck run with .figure thermal', () => {
  test('the text report lists each junction temperature, margin, heatsink allowance and the self-heating drift', async () => {
    const text = await run([]);
    expect(text.status).toBe(0);
    const json = await run(['--json']);
    const figures = (JSON.parse(json.out) as { figures: Record<string, number> }).figures;
    // JESD51-1 series path, by hand from the dissipation figure's pd.Q1.
    const tj = 45 + figures['pd.Q1']! * (5 + 40);
    // Rounding of the sum only: observed 0; bound 1e-12 °C.
    expect(Math.abs(figures['thermal.Q1.tj']! - tj)).toBeLessThan(1e-12);
    const row = (name: string): string => text.out.split('\n').find((l) => l.trim().startsWith(`${name} `)) ?? '';
    expect(text.out).toMatch(/junction temperatures — ambient 45 °C/);
    expect(row('thermal.Q1.tj')).toContain(`${tj.toFixed(2)} °C`);
    // tjmax of Q1 is the default 150 °C (docs/thermal.md): margin = 150 − Tj.
    expect(row('thermal.Q1.margin')).toContain(`${(150 - tj).toFixed(2)} K`);
    expect(row('thermal.Q1.rthsink_max')).toMatch(/\d K\/W$/);
    expect(row('thermal.DZ.tj')).toMatch(/°C$/);
    expect(row('thermal.worst_margin')).toMatch(/ K$/);
    expect(row('thermal.vout_drift')).toMatch(/mV$/);
    expect(text.out).toMatch(/thermal\.worst_margin >= 20 .* pass/);
  });
});
