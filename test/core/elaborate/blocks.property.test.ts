/**
 * Biconnected components (packages/core/src/elaborate/blocks.ts) against
 * Menger's theorem (K. Menger, Fund. Math. 10, 1927; for two paths also
 * H. Whitney, 1932): two distinct, non-adjacent vertices lie on a common
 * simple cycle exactly when they are connected and no third vertex
 * separates them. The reference removes each other vertex in turn and
 * searches the rest breadth-first; it shares nothing with the depth-first
 * low-link method under test.
 */
import { describe, expect, test } from 'vitest';
import fc from 'fast-check';
import { findBlocks, shareCycle, type UndirectedGraph } from '../../../packages/core/src/elaborate/blocks.js';
import { seedFor } from './support.js';

const seed = seedFor('blocks.property.test.ts');

/** Whether a and b are connected in g with vertex `without` (−1: none) removed, by breadth-first search. */
function connected(g: UndirectedGraph, a: number, b: number, without: number): boolean {
  const seen = new Uint8Array(g.vertexCount);
  const queue = [a];
  seen[a] = 1;
  while (queue.length > 0) {
    const v = queue.shift()!;
    if (v === b) return true;
    for (const [p, q] of g.edges) {
      const w = p === v ? q : q === v ? p : -1;
      if (w < 0 || w === without || seen[w]) continue;
      seen[w] = 1;
      queue.push(w);
    }
  }
  return false;
}

/** Menger's criterion for non-adjacent a, b. */
function onCommonCycleByMenger(g: UndirectedGraph, a: number, b: number): boolean {
  if (!connected(g, a, b, -1)) return false;
  for (let w = 0; w < g.vertexCount; w++) if (w !== a && w !== b && !connected(g, a, b, w)) return false;
  return true;
}

const graphs = fc.integer({ min: 2, max: 9 }).chain((n) =>
  fc.record({
    vertexCount: fc.constant(n),
    edges: fc.array(fc.tuple(fc.integer({ min: 0, max: n - 1 }), fc.integer({ min: 0, max: n - 1 })), { maxLength: 16 }),
  }),
);

describe('blocks', () => {
  test('two non-adjacent vertices share a block exactly when Menger says they lie on a common cycle', () => {
    fc.assert(
      fc.property(graphs, (g) => {
        const blocks = findBlocks(g);
        for (let a = 0; a < g.vertexCount; a++) {
          for (let b = a + 1; b < g.vertexCount; b++) {
            if (g.edges.some(([p, q]) => (p === a && q === b) || (p === b && q === a))) continue;
            expect(shareCycle(g, blocks, a, b), `${a}–${b} in ${JSON.stringify(g.edges)}`).toBe(onCommonCycleByMenger(g, a, b));
          }
        }
      }),
      { seed, numRuns: 400 },
    );
  });

  test('every edge but a self-loop lies in one block; a bridge is a block of its own', () => {
    // A triangle 0-1-2 with a pendant edge 2-3 and a self-loop at 3: two blocks (the triangle, the bridge).
    const g: UndirectedGraph = { vertexCount: 4, edges: [[0, 1], [1, 2], [2, 0], [2, 3], [3, 3]] };
    const b = findBlocks(g);
    expect(b.blockOfEdge[4]).toBe(-1);
    expect(new Set([b.blockOfEdge[0], b.blockOfEdge[1], b.blockOfEdge[2]]).size).toBe(1);
    expect(b.blockOfEdge[3]).not.toBe(b.blockOfEdge[0]);
    expect([...b.blockSize].sort()).toEqual([1, 3]);
  });

  test('a path of 200 000 vertices (deeper than any call stack) is split into its bridges', () => {
    const n = 200_000;
    const g: UndirectedGraph = { vertexCount: n, edges: Array.from({ length: n - 1 }, (_, i) => [i, i + 1] as const) };
    const b = findBlocks(g);
    expect(b.blockSize.length).toBe(n - 1);
  });
});
