/**
 * Linear ladders driven by piecewise-constant and piecewise-linear sources
 * against their exact solutions from the matrix exponential (mathjs expm).
 * The state-space models x' = A·x + B·u are derived here by hand from KCL
 * and the element laws, independently of the engine's MNA stamps.
 *
 * Piecewise-constant input u on a segment starting at t0 (b = B·u):
 *   x(t) = e^{A(t−t0)}·x(t0) + A⁻¹·(e^{A(t−t0)} − I)·b
 * (variation of constants; any linear-systems text, e.g. Kailath, Linear
 * Systems, 1980, §2.5 — from memory).
 * Piecewise-linear input (a pwl ramp): the input and its slope join the state,
 * z = [x; u; s] with z' = [[A, B, 0], [0, 0, 1], [0, 0, 0]]·z, so z(t) =
 * e^{M(t−t0)}·z(t0) (Van Loan, IEEE Trans. Automatic Control 23(3), 1978,
 * block-matrix exponentials — from memory).
 *
 * Bounds: the largest error of each probe at the default tolerances, set at
 * 2–3× the error observed (as in closed-forms.test.ts; far inside the
 * accumulation bound steps × (lteReltol·peak + lteVntol)), and tightening
 * lteReltol 100× must shrink the error at least 5× (order ≥ 1 in the step,
 * step ∝ tol^(1/(p+1)); the factor is margin, common practice, no source).
 */
import { describe, expect, it } from 'vitest';
import { expm, flatten, identity, lusolve, matrix, multiply, subtract, type Matrix, type MathCollection } from 'mathjs';
import type { IntegrationMethod } from '@railcheck/core/internal';
import { at, branch, compile, node, run } from './support.js';

type Vec = number[];

/** A mathjs vector or column (array or Matrix) as a flat number array. */
const vec = (v: MathCollection): Vec => flatten(matrix(v)).toArray() as Vec;

/** x(t0 + dt) for constant input vector b: e^{A·dt}·x0 + A⁻¹(e^{A·dt} − I)·b. */
function affineStep(a: number[][], b: Vec, x0: Vec, dt: number): Vec {
  const e = expm(matrix(a).map((v: number) => v * dt)) as Matrix;
  const free = vec(multiply(e, x0));
  const forced = vec(lusolve(matrix(a), multiply(subtract(e, identity(a.length)) as Matrix, b)));
  return free.map((v, i) => v + forced[i]!);
}

/** x(t0 + dt) for input u0 + s·(t − t0) entering through column `bcol`, by the augmented exponential. */
function rampStep(a: number[][], bcol: Vec, x0: Vec, u0: number, s: number, dt: number): Vec {
  const n = a.length;
  const m = Array.from({ length: n + 2 }, (_, i) => Array.from({ length: n + 2 }, (_, j) => (i < n && j < n ? a[i]![j]! : i < n && j === n ? bcol[i]! : i === n && j === n + 1 ? 1 : 0)));
  const z = vec(multiply(expm(matrix(m).map((v: number) => v * dt)) as Matrix, [...x0, u0, s]));
  return z.slice(0, n);
}

interface Segment {
  readonly t0: number;
  readonly u0: number;
  readonly slope: number;
}

/** Exact trajectory for a piecewise-linear input given by its segments (ascending t0, first at 0). */
function trajectory(a: number[][], bcol: Vec, x0: Vec, segments: readonly Segment[]): (t: number) => Vec {
  const starts: Vec[] = [x0];
  for (let k = 1; k < segments.length; k++) {
    const p = segments[k - 1]!;
    starts.push(piece(p, starts[k - 1]!, segments[k]!.t0 - p.t0));
  }
  function piece(seg: Segment, x: Vec, dt: number): Vec {
    if (dt === 0) return x;
    return seg.slope === 0 ? affineStep(a, bcol.map((v) => v * seg.u0), x, dt) : rampStep(a, bcol, x, seg.u0, seg.slope, dt);
  }
  return (t) => {
    let k = 0;
    // A corner belongs to the segment before it (the state is continuous, so either side gives the same x).
    while (k + 1 < segments.length && segments[k + 1]!.t0 < t) k++;
    return piece(segments[k]!, starts[k]!, t - segments[k]!.t0);
  };
}

/** Segments of a pwl source through points (t, v), held before the first and after the last (netlist.md). */
function pwlSegments(points: ReadonlyArray<readonly [number, number]>): Segment[] {
  const segs: Segment[] = [{ t0: 0, u0: points[0]![1], slope: 0 }];
  for (let k = 0; k + 1 < points.length; k++) {
    const [ta, va] = points[k]!;
    const [tb, vb] = points[k + 1]!;
    segs.push({ t0: ta, u0: va, slope: (vb - va) / (tb - ta) });
  }
  const last = points[points.length - 1]!;
  segs.push({ t0: last[0], u0: last[1], slope: 0 });
  return segs.filter((s, i) => i === 0 || s.t0 > 0);
}

interface Case {
  readonly name: string;
  readonly netlist: string;
  readonly fromIc: boolean;
  readonly tstop: number;
  /** Engine unknowns in state order: node names or `branch:<element>`. */
  readonly probes: readonly string[];
  readonly a: number[][];
  readonly b: Vec;
  readonly x0: Vec;
  readonly segments: readonly Segment[];
  /** Largest error allowed per probe (V or A) at lteReltol 1e-3, per method: 2–3× the error observed. */
  readonly bounds: { readonly trap: readonly number[]; readonly be: readonly number[] };
}

// Three-section RC ladder: Ck·vk' = (v(k−1) − vk)/Rk − (vk − v(k+1))/R(k+1), v0 = u.
const [R1, R2, R3, C1, C2, C3] = [1e3, 2e3, 4e3, 1e-6, 0.5e-6, 0.22e-6];
const rcLadder: Case = {
  name: 'RC ladder, pulse with ideal edges (up at 1 ms, down at 3 ms)',
  netlist: `ladder\nV1 in 0 pulse(0 2 1m 0 0 2m)\nR1 in n1 1k\nC1 n1 0 1u\nR2 n1 n2 2k\nC2 n2 0 0.5u\nR3 n2 n3 4k\nC3 n3 0 0.22u\n.end\n`,
  fromIc: false,
  tstop: 8e-3,
  probes: ['n1', 'n2', 'n3'],
  a: [
    [-(1 / R1 + 1 / R2) / C1, 1 / R2 / C1, 0],
    [1 / R2 / C2, -(1 / R2 + 1 / R3) / C2, 1 / R3 / C2],
    [0, 1 / R3 / C3, -1 / R3 / C3],
  ],
  b: [1 / R1 / C1, 0, 0],
  x0: [0, 0, 0],
  segments: [
    { t0: 0, u0: 0, slope: 0 },
    { t0: 1e-3, u0: 2, slope: 0 },
    { t0: 3e-3, u0: 0, slope: 0 },
  ],
  // Observed (V): trap 1.01e-3, 9.50e-4, 7.11e-4; be 6.52e-3, 8.59e-3, 8.93e-3.
  bounds: { trap: [2.5e-3, 2.5e-3, 1.8e-3], be: [1.6e-2, 2.2e-2, 2.2e-2] },
};

// R–L–C–R–C ladder, states (iL, vb, vc): L·iL' = u − Ra·iL − vb, Cb·vb' = iL − (vb − vc)/Rb, Cc·vc' = (vb − vc)/Rb.
const [RA, L, CB, RB, CC] = [50, 10e-3, 1e-6, 100, 2.2e-6];
const rlcA: number[][] = [
  [-RA / L, -1 / L, 0],
  [1 / CB, -1 / RB / CB, 1 / RB / CB],
  [0, 1 / RB / CC, -1 / RB / CC],
];
const PWL: ReadonlyArray<readonly [number, number]> = [[0.5e-3, 0], [0.6e-3, 3], [2e-3, 3], [2.2e-3, -1], [4e-3, -1]];
const rlcPwl: Case = {
  name: 'RLC ladder, pwl with steep ramps',
  netlist: `rlc ladder\nV1 in 0 pwl(${PWL.map(([t, v]) => `${t} ${v}`).join(' ')})\nRA in a 50\nL1 a b 10m\nCB b 0 1u\nRB b c 100\nCC c 0 2.2u\n.end\n`,
  fromIc: false,
  tstop: 6e-3,
  probes: ['branch:L1', 'b', 'c'],
  a: rlcA,
  b: [1 / L, 0, 0],
  x0: [0, 0, 0],
  segments: pwlSegments(PWL),
  // Observed (A, V, V): trap 6.88e-5, 5.35e-3, 3.83e-3; be 4.78e-4, 4.36e-2, 3.52e-2.
  bounds: { trap: [1.7e-4, 1.3e-2, 1e-2], be: [1.2e-3, 0.11, 9e-2] },
};
const rlcIc: Case = {
  name: 'RLC ladder, DC source switched on at t = 0 from ic= values (fromic)',
  netlist: `rlc ladder ic\nV1 in 0 3\nRA in a 50\nL1 a b 10m ic=20m\nCB b 0 1u ic=1\nRB b c 100\nCC c 0 2.2u\n.end\n`,
  fromIc: true,
  tstop: 4e-3,
  probes: ['branch:L1', 'b', 'c'],
  a: rlcA,
  b: [1 / L, 0, 0],
  x0: [0.02, 1, 0],
  segments: [{ t0: 0, u0: 3, slope: 0 }],
  // Observed (A, V, V): trap 5.57e-5, 5.26e-3, 3.89e-3; be 3.73e-4, 2.82e-2, 2.98e-2.
  bounds: { trap: [1.4e-4, 1.3e-2, 1e-2], be: [9e-4, 7e-2, 7.5e-2] },
};

function errors(k: Case, method: IntegrationMethod, lteReltol: number): { err: number[]; peak: number[]; steps: number } {
  const c = compile(k.netlist);
  const idx = k.probes.map((p) => (p.startsWith('branch:') ? branch(c, p.slice(7)) : node(c, p)));
  const { trace, stats } = run(c, { tstep: 1e-5, tstop: k.tstop, method, fromIc: k.fromIc, lteReltol });
  const exact = trajectory(k.a, k.b, k.x0, k.segments);
  const err = idx.map(() => 0);
  const peak = idx.map(() => 0);
  for (let p = 0; p < trace.count; p++) {
    const x = exact(trace.times[p]!);
    idx.forEach((i, j) => {
      err[j] = Math.max(err[j]!, Math.abs(at(trace, p, i) - x[j]!));
      peak[j] = Math.max(peak[j]!, Math.abs(x[j]!));
    });
  }
  return { err, peak, steps: stats.accepted };
}

describe.each(['trap', 'be'] as const)('exact state-space solutions, method %s', (method) => {
  it.each([rcLadder, rlcPwl, rlcIc])('$name', (k) => {
    const loose = errors(k, method, 1e-3);
    const tight = errors(k, method, 1e-5);
    console.log(`${method} ${k.name}: max errors ${loose.err.map((e) => e.toExponential(2)).join(', ')} in ${loose.steps} steps; lteReltol 1e-5: ${tight.err.map((e) => e.toExponential(2)).join(', ')} in ${tight.steps} steps`);
    k.probes.forEach((p, j) => {
      expect(loose.err[j], p).toBeLessThan(k.bounds[method][j]!);
      expect(tight.err[j]).toBeLessThan(loose.err[j]! / 5);
    });
  });
});

it('the reference itself: the exponential solution obeys the ODE and its piece joins are continuous', () => {
  // Guards the reference, not the engine: a central difference of the exact trajectory equals A·x + B·u.
  const exact = trajectory(rlcA, [1 / L, 0, 0], [0, 0, 0], pwlSegments(PWL));
  for (const t of [0.55e-3, 1.3e-3, 2.1e-3, 3e-3, 5e-3]) {
    const d = 1e-9;
    const xp = exact(t + d);
    const xm = exact(t - d);
    const x = exact(t);
    const u = t < 0.5e-3 ? 0 : t < 0.6e-3 ? (3 * (t - 0.5e-3)) / 0.1e-3 : t < 2e-3 ? 3 : t < 2.2e-3 ? 3 - (4 * (t - 2e-3)) / 0.2e-3 : -1;
    rlcA.forEach((row, i) => {
      const rhs = row.reduce((s, v, j) => s + v * x[j]!, 0) + (i === 0 ? u / L : 0);
      // Round-off of the difference quotient, eps·|x|/d: observed 1.0e-6·(1 + |rhs|) at most; bound 2.5e-6·(1 + |rhs|).
      expect(Math.abs((xp[i]! - xm[i]!) / (2 * d) - rhs)).toBeLessThan(2.5e-6 * (1 + Math.abs(rhs)));
    });
  }
  const before = exact(2e-3 - 1e-12);
  const after = exact(2e-3 + 1e-12);
  // Observed 1.0e-10 (the state moves that much in 2 ps); bound 2.5e-10.
  before.forEach((v, i) => expect(Math.abs(v - after[i]!)).toBeLessThan(2.5e-10));
});
