/**
 * The integrators' discrete solutions and their measured order of accuracy,
 * with fixed steps (TransientOptions.fixedStep) so that the recurrences are
 * known in closed form.
 *
 * For x' = λx: backward Euler gives x_n = x0·(1 − hλ)^(−n); the trapezoidal
 * rule x_n = x0·((1 + hλ/2)/(1 − hλ/2))^n (Hairer and Wanner, Solving ODEs II,
 * §IV.2, stability functions — from memory). The engine's trapezoidal run
 * starts with one backward-Euler step (its documented cure for ringing at
 * t = 0), so there x_1 = x0/(1 − hλ) and the trapezoidal factors follow.
 * For a linear system x' = A·x the same read (I − hA)⁻¹ and
 * (I − hA/2)⁻¹(I + hA/2), applied with mathjs lusolve.
 *
 * The circuits are linear, so Newton's second iterate is the exact solution
 * of the step's linear system and the recurrences hold to rounding (the
 * Newton reltol of DEFAULT_NEWTON is 1e-6, and a converged linear solve is
 * far inside it); the bounds are 2–3× the rounding observed.
 */
import { describe, expect, it } from 'vitest';
import { lusolve, matrix, multiply, flatten, type MathCollection } from 'mathjs';
import { DEFAULT_NEWTON, type IntegrationMethod } from '@railcheck/core/internal';
import { at, branch, compile, interpolate, node, odexOnGrid, odexSolver, run } from './support.js';

const vec = (v: MathCollection): number[] => flatten(matrix(v)).toArray() as number[];

// RC discharge from ic = 5 V, τ = RC = 1 ms, λ = −1000 /s.
const RC = 'rc discharge\nC1 out 0 1u ic=5\nR1 out 0 1k\n.end\n';
const LAMBDA = -1000;

it('relies on the Newton tolerance it assumes', () => {
  // The bounds below assume Newton converges to far better than its own reltol on a linear step.
  expect(DEFAULT_NEWTON.reltol).toBeLessThanOrEqual(1e-6);
});

describe.each([
  // `bound`: largest relative miss of the recurrence, 2–3× the one observed (5.1e-15 be, 2.2e-15 trap).
  { label: 'hλ = −0.1', h: 1e-4, steps: 50, bound: 1.2e-14 },
  // Observed 2.0e-14 for both methods.
  { label: 'hλ = −10 (stiff: the trapezoidal factor is negative, −2/3)', h: 1e-2, steps: 20, bound: 5e-14 },
])('RC discharge with fixed steps, $label', ({ h, steps, bound }) => {
  const discrete = (method: IntegrationMethod, n: number): number => {
    if (n === 0) return 5;
    if (method === 'be') return 5 * Math.pow(1 - h * LAMBDA, -n);
    const first = 5 / (1 - h * LAMBDA);
    return first * Math.pow((1 + (h * LAMBDA) / 2) / (1 - (h * LAMBDA) / 2), n - 1);
  };
  it.each(['be', 'trap'] as const)('%s meets its recurrence at every step', (method) => {
    const c = compile(RC);
    const { trace } = run(c, { tstep: h, tstop: steps * h, method, fromIc: true, fixedStep: h });
    const out = node(c, 'out');
    expect(trace.count).toBe(steps + 1);
    let worst = 0;
    for (let n = 0; n <= steps; n++) {
      // Times accumulate as sums of h: n·h to rounding (observed 7.8e-16·n·h at most; bound 2e-15·n·h).
      expect(Math.abs(trace.times[n]! - n * h)).toBeLessThanOrEqual(2e-15 * n * h);
      const expected = discrete(method, n);
      worst = Math.max(worst, Math.abs(at(trace, n, out) - expected) / Math.abs(expected));
    }
    expect(worst).toBeLessThan(bound);
  });
});

describe('a two-state system (series RLC from ic=) with fixed steps', () => {
  // States (iL, vC): L·iL' = −R·iL − vC, C·vC' = iL (the resistor from a to ground closes the loop).
  const [R, L, C, h] = [20, 10e-3, 1e-6, 2e-5];
  const a = [
    [-R / L, -1 / L],
    [1 / C, 0],
  ];
  const netlist = `rlc ic\nR1 a 0 ${R}\nL1 a b 10m ic=50m\nC1 b 0 1u ic=2\n.end\n`;
  it.each(['be', 'trap'] as const)('%s meets the matrix recurrence', (method) => {
    const c = compile(netlist);
    const { trace } = run(c, { tstep: h, tstop: 100 * h, method, fromIc: true, fixedStep: h });
    const idx = [branch(c, 'L1'), node(c, 'b')];
    const lhs = (k: number): number[][] => a.map((row, i) => row.map((v, j) => (i === j ? 1 : 0) - k * h * v));
    let x = [0.05, 2];
    for (let n = 1; n < trace.count; n++) {
      const trapezoidal = method === 'trap' && n > 1;
      const rhs = trapezoidal ? vec(multiply(lhs(-0.5), x)) : x;
      x = vec(lusolve(matrix(lhs(trapezoidal ? 0.5 : 1)), rhs));
      // Observed at most 0.003 of 1e-9·|x| + 1e-15 (be; trap 0.0025); bound 8e-12·|x| + 8e-18.
      idx.forEach((i, j) => expect(Math.abs(at(trace, n, i) - x[j]!)).toBeLessThanOrEqual(8e-12 * Math.abs(x[j]!) + 8e-18));
    }
    expect(trace.count).toBe(101);
  });
});

/** Global errors at t = tEnd for steps h, h/2, h/4 and their successive ratios. */
function ratios(netlist: string, probe: (c: ReturnType<typeof compile>) => number, exact: number, method: IntegrationMethod, h: number, tEnd: number): { errs: number[]; ratios: number[] } {
  const errs = [h, h / 2, h / 4].map((step) => {
    const c = compile(netlist);
    const { trace } = run(c, { tstep: step, tstop: tEnd, method, fromIc: true, fixedStep: step });
    return Math.abs(at(trace, trace.count - 1, probe(c)) - exact);
  });
  return { errs, ratios: [errs[0]! / errs[1]!, errs[1]! / errs[2]!] };
}

/** Error ratio when halving h for order p: 2^p (backward Euler p = 1, trapezoidal p = 2). */
const EXPECTED = { be: 2, trap: 4 } as const;

/**
 * Largest |ratio − 2^p| allowed per case, 2–3× the deviation observed (the ratios are still
 * approaching 2^p at these steps): be RC 0.0084, RLC 0.051, diode 0.0083; trap RC 0.070,
 * RLC 0.042, diode 0.18.
 */
const BAND = { rc: { be: 0.02, trap: 0.18 }, rlc: { be: 0.12, trap: 0.1 }, diode: { be: 0.02, trap: 0.45 } } as const;

describe('order of accuracy, measured (global error at a fixed time, steps h, h/2, h/4)', () => {
  const lines: string[] = [];
  const check = (name: string, method: IntegrationMethod, r: { errs: number[]; ratios: number[] }, band: number): void => {
    lines.push(`${method.padEnd(4)} ${name}: errors ${r.errs.map((e) => e.toExponential(3)).join(', ')}; ratios ${r.ratios.map((q) => q.toFixed(3)).join(', ')} (order ${r.ratios.map((q) => Math.log2(q).toFixed(2)).join(', ')})`);
    for (const q of r.ratios) expect(Math.abs(q - EXPECTED[method])).toBeLessThan(band);
  };

  it.each(['be', 'trap'] as const)('%s on the RC discharge (exact 5·e^(−t/τ) at 2 ms)', (method) => {
    check('RC discharge, h = 50 µs', method, ratios(RC, (c) => node(c, 'out'), 5 * Math.exp(-2), method, 5e-5, 2e-3), BAND.rc[method]);
  });

  it.each(['be', 'trap'] as const)('%s on an under-damped series RLC (exact by the closed form at 1 ms)', (method) => {
    // vC(t) from vC(0) = 2 V, iL(0) = 0: natural response 2·e^(−αt)(cos ωd·t + (α/ωd)·sin ωd·t)
    // (Alexander and Sadiku ch. 8, from memory); α = R/2L = 1000 /s, ω0 = 1e4 rad/s.
    const alpha = 1000;
    const wd = Math.sqrt(1e8 - alpha * alpha);
    const exact = 2 * Math.exp(-alpha * 1e-3) * (Math.cos(wd * 1e-3) + (alpha / wd) * Math.sin(wd * 1e-3));
    check('series RLC, h = 2 µs', method, ratios('rlc\nR1 a 0 20\nL1 a b 10m\nC1 b 0 1u ic=2\n.end\n', (c) => node(c, 'b'), exact, method, 2e-6, 1e-3), BAND.rlc[method]);
  });

  it.each(['be', 'trap'] as const)('%s on a nonlinear discharge (capacitor through a diode; ODEX reference)', (method) => {
    // C·v' = −IS·(exp(v/Vt) − 1) − v/R from v(0) = 0.7 V; Vt = kT/q at 27 °C (models.md, CODATA 2018).
    const vt = (1.380649e-23 * 300.15) / 1.602176634e-19;
    const [is, r, cap] = [1e-14, 1e3, 100e-6];
    const s = odexSolver(1);
    s.absoluteTolerance = 1e-13;
    s.relativeTolerance = 1e-13;
    s.maxSteps = 1e6;
    const ref = odexOnGrid(s, (_t, y) => [(-is * Math.expm1(y[0]! / vt) - y[0]! / r) / cap], 0, [0.7], [0, 2e-3])[1]![0]!;
    check('diode discharge, h = 20 µs', method, ratios(`diode rc\nC1 out 0 100u ic=0.7\nR1 out 0 1k\nD1 out 0 DX\n.model DX D (IS=1e-14)\n.end\n`, (c) => node(c, 'out'), ref, method, 2e-5, 2e-3), BAND.diode[method]);
  });

  it('reports the measured orders', () => {
    console.log(`measured order of accuracy:\n${lines.join('\n')}`);
    expect(lines.length).toBe(6);
  });
});

it('interpolate helper is linear between points (guards the helper used elsewhere)', () => {
  const c = compile(RC);
  const { trace } = run(c, { tstep: 1e-4, tstop: 1e-3, method: 'be', fromIc: true, fixedStep: 1e-4 });
  const out = node(c, 'out');
  const mid = (at(trace, 1, out) + at(trace, 2, out)) / 2;
  // Observed 0 (exact); bound 2 ulps.
  expect(Math.abs(interpolate(trace, out, 1.5e-4) - mid)).toBeLessThanOrEqual(2 * Number.EPSILON * Math.abs(mid));
});
