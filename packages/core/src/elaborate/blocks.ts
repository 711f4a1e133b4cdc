/**
 * Biconnected components ("blocks") of an undirected graph, by the
 * depth-first search of Hopcroft and Tarjan (J. Hopcroft, R. Tarjan,
 * "Algorithm 447: efficient algorithms for graph manipulation", Comm. ACM
 * 16(6), 1973), written with explicit stacks so that a circuit of any size
 * cannot overflow the call stack. Two distinct vertices lie on a common
 * simple cycle exactly when some block of two or more edges holds both
 * (Whitney; Menger's theorem for two disjoint paths).
 */

/** An undirected graph on vertices 0…n−1, given by its edges (pairs of vertex indices; parallel edges allowed). */
export interface UndirectedGraph {
  readonly vertexCount: number;
  readonly edges: ReadonlyArray<readonly [number, number]>;
}

/** The blocks of a graph: the block index of every edge, and how many edges each block has. */
export interface Blocks {
  /** Block index of each edge, in the order of {@link UndirectedGraph.edges} (−1 for a self-loop, which belongs to no block). */
  readonly blockOfEdge: Int32Array;
  /** Number of edges of each block. */
  readonly blockSize: Int32Array;
}

/** Adjacency in compressed rows: the edges at vertex v are `edgeAt[start[v] … start[v+1]−1]`. */
function adjacency(g: UndirectedGraph): { start: Int32Array; edgeAt: Int32Array } {
  const start = new Int32Array(g.vertexCount + 1);
  for (const [a, b] of g.edges) {
    if (a === b) continue;
    start[a + 1]!++;
    start[b + 1]!++;
  }
  for (let v = 0; v < g.vertexCount; v++) start[v + 1]! += start[v]!;
  const fill = start.slice(0, g.vertexCount);
  const edgeAt = new Int32Array(start[g.vertexCount]!);
  g.edges.forEach(([a, b], e) => {
    if (a === b) return;
    edgeAt[fill[a]!++] = e;
    edgeAt[fill[b]!++] = e;
  });
  return { start, edgeAt };
}

/** Splits the edges of `g` into blocks (Hopcroft–Tarjan). Time and memory linear in the size of the graph. */
export function findBlocks(g: UndirectedGraph): Blocks {
  const n = g.vertexCount;
  const { start, edgeAt } = adjacency(g);
  const disc = new Int32Array(n).fill(-1);
  const low = new Int32Array(n);
  const blockOfEdge = new Int32Array(g.edges.length).fill(-1);
  const sizes: number[] = [];
  // Depth-first frames: the vertex, the tree edge it was entered by (−1 at a root), the next adjacency slot.
  const frameVertex = new Int32Array(n);
  const frameEdge = new Int32Array(n);
  const frameNext = new Int32Array(n);
  const edgeStack = new Int32Array(g.edges.length);
  const seen = new Uint8Array(g.edges.length);
  let time = 0;
  for (let root = 0; root < n; root++) {
    if (disc[root] !== -1) continue;
    let depth = 0;
    let top = 0;
    frameVertex[0] = root;
    frameEdge[0] = -1;
    frameNext[0] = start[root]!;
    disc[root] = low[root] = time++;
    while (depth >= 0) {
      const v = frameVertex[depth]!;
      if (frameNext[depth]! < start[v + 1]!) {
        const e = edgeAt[frameNext[depth]!++]!;
        if (seen[e]) continue;
        seen[e] = 1;
        const [a, b] = g.edges[e]!;
        const w = a === v ? b : a;
        edgeStack[top++] = e;
        if (disc[w] === -1) {
          disc[w] = low[w] = time++;
          depth++;
          frameVertex[depth] = w;
          frameEdge[depth] = e;
          frameNext[depth] = start[w]!;
        } else if (disc[w]! < low[v]!) low[v] = disc[w]!;
        continue;
      }
      const entered = frameEdge[depth]!;
      depth--;
      if (depth < 0) break;
      const u = frameVertex[depth]!;
      if (low[v]! < low[u]!) low[u] = low[v]!;
      if (low[v]! >= disc[u]!) {
        // u separates v's subtree: the edges pushed since the tree edge u–v form one block.
        const id = sizes.length;
        let count = 0;
        let e: number;
        do {
          e = edgeStack[--top]!;
          blockOfEdge[e] = id;
          count++;
        } while (e !== entered);
        sizes.push(count);
      }
    }
  }
  return { blockOfEdge, blockSize: Int32Array.from(sizes) };
}

/**
 * True when vertices `a` and `b` (distinct) lie on a common simple cycle
 * of `g`: some block of two or more edges touches both. `blocks` is
 * {@link findBlocks} of `g`.
 */
export function shareCycle(g: UndirectedGraph, blocks: Blocks, a: number, b: number): boolean {
  const atA = new Set<number>();
  g.edges.forEach(([p, q], e) => {
    const id = blocks.blockOfEdge[e]!;
    if ((p === a || q === a) && id >= 0 && blocks.blockSize[id]! >= 2) atA.add(id);
  });
  return g.edges.some(([p, q], e) => (p === b || q === b) && atA.has(blocks.blockOfEdge[e]!));
}
