/**
 * Benchmarks (run with `pnpm bench`; never part of the tests). Figures are
 * compared as ratios within one run: our in-place LU against ml-matrix's
 * allocating decomposition, and the two integration methods on a
 * half-wave rectifier.
 */
import { bench, describe } from 'vitest';
import { Matrix, LuDecomposition } from 'ml-matrix';
import { parseNetlist, prepare } from '@railcheck/core';
import { createLuWorkspace, luFactor, luSolve, runTransient, solveOperatingPoint } from '@railcheck/core/internal';
import { readFileSync } from 'node:fs';

function randomSystem(n: number, seed: number): { dense: number[][]; b: number[] } {
  let s = seed;
  const rnd = (): number => ((s = (s * 1103515245 + 12345) % 2 ** 31) / 2 ** 31) - 0.5;
  const dense = Array.from({ length: n }, (_, i) => Array.from({ length: n }, (_, j) => rnd() + (i === j ? n : 0)));
  return { dense, b: Array.from({ length: n }, rnd) };
}

describe('dense LU, 40 unknowns', () => {
  const n = 40;
  const { dense, b } = randomSystem(n, 7);
  const ws = createLuWorkspace(n);
  const rhs = new Float64Array(n + 1);
  const x = new Float64Array(n + 1);
  b.forEach((v, i) => (rhs[i + 1] = v));
  bench('railcheck in-place LU (factor + solve)', () => {
    for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) ws.matrix[(i + 1) * (n + 1) + j + 1] = dense[i]![j]!;
    luFactor(ws);
    luSolve(ws, rhs, x);
  });
  bench('ml-matrix LuDecomposition (factor + solve)', () => {
    new LuDecomposition(new Matrix(dense)).solve(Matrix.columnVector(b));
  });
});

describe('operating point of the demo stage', () => {
  const text = readFileSync(new URL('../examples/sensor-rail-follower.cir', import.meta.url), 'utf8');
  const p = prepare(parseNetlist(text));
  if (!p.ok) throw new Error('demo netlist does not compile');
  bench('cold-start Newton', () => {
    solveOperatingPoint(p.compiled);
  });
});

describe('half-wave rectifier, 200 ms of 50 Hz', () => {
  const text = `rectifier\nVS sec 0 sin(0 12 50)\nD1 sec res DR\nCRES res 0 1000u\nRL res 0 100\n.model DR D (IS=1e-9 N=1.8 RS=0.05 CJO=50p)\n.end\n`;
  const p = prepare(parseNetlist(text));
  if (!p.ok) throw new Error('rectifier netlist does not compile');
  bench('trapezoidal', () => {
    runTransient(p.compiled, { tstep: 1e-4, tstop: 0.2, method: 'trap' });
  });
  bench('backward Euler', () => {
    runTransient(p.compiled, { tstep: 1e-4, tstop: 0.2, method: 'be' });
  });
});
