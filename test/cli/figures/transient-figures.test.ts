/**
 * `railcheck run` prints the start-up and load-step figures (docs/figures.md,
 * "startup" and "step") in the text report and in `--json`. The stage is a
 * source V = 12 V through R = 10 Ω into C = 1 mF with a 100 mA current-source
 * load: at switch-on the input current at t = 0+ is V/R = 1.2 A (the
 * discharged capacitor a short; Ohm's law), and a first-order step response
 * (Thévenin seen from C, τ = RC = 10 ms) settles into the 1 % band of its
 * 11 V at τ·ln(100) = 46.05 ms; the load step 100 → 300 mA moves the output
 * towards 11 − 0.2·10 = 9 V and comes within band=90m of it at
 * τ·ln(2 V / 90 mV) = 31.0 ms (the 1 µs rise shifts it by 5 ns).
 */
import { describe, expect, test } from 'vitest';
import { cli, netlistFile } from '../support.js';

const STAGE = `weather-station rail, start-up and load step
V1 in 0 12
R1 in out 10
C1 out 0 1m
ILOAD out 0 100m
.supply in=V1 out=out load=ILOAD
.figure startup fall=1%
.figure step from=100m to=300m band=90m
.end
`;

describe('railcheck run with the startup and step figures', () => {
  test('text report and --json carry the values, the rectifier peak not measured with its reason', async () => {
    const file = netlistFile(STAGE);
    const text = await cli(['run', file]);
    expect(text.status).toBe(0);
    expect(text.out).toMatch(/switch-on — from everything discharged/);
    expect(text.out).toMatch(/startup\.inrush\s+1\.2 A/);
    expect(text.out).toMatch(/startup\.settle\s+46\.0\d ms/);
    expect(text.out).toMatch(/load step — load 100 mA → 300 mA/);
    expect(text.out).toMatch(/step\.recovery\s+31(\.0\d?)? ms/);
    expect(text.out).toMatch(/not measured: startup\.ipk_rect: the stage has no diode/);

    const json = await cli(['run', file, '--json']);
    expect(json.status).toBe(0);
    const r = JSON.parse(json.out) as { figures: Record<string, number>; not_measured: { value?: string; reason: string }[] };
    // Closed forms above; the bounds are those of test/core/measure/transient (inrush 3e-9, times 1.5e-3 relative).
    expect(Math.abs(r.figures['startup.inrush']! - 1.2) / 1.2).toBeLessThan(3e-9);
    expect(Math.abs(r.figures['startup.settle']! - 0.01 * Math.log(100)) / 0.04605).toBeLessThan(1.5e-3);
    expect(r.figures['startup.overshoot']).toBe(0);
    expect(Math.abs(r.figures['step.recovery']! - 0.01 * Math.log(2 / 0.09)) / 0.031).toBeLessThan(1.5e-3);
    expect(r.figures['step.dip']).toBeGreaterThan(2 - 0.009);
    expect(r.figures['step.peak']).toBe(0);
    expect(r.figures['startup.ipk_rect']).toBeUndefined();
    expect(r.not_measured.map((m) => m.value)).toEqual(['startup.ipk_rect']);
  });
});
