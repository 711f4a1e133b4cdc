/**
 * Data flows one way through core (docs/engine.md; the parse → elaborate →
 * compile → analyse → measure → present pipeline of circuit simulators):
 * netlist → elaborate → engine → analysis → measure → pipeline, with the
 * top-level shared files (errors.ts, units.ts, figure-registry.ts, budgets.ts) below
 * them all and the barrel index.ts above. Reads the import and re-export
 * statements of every source file and fails on an import that points
 * upward, on a cycle between files of core, and on a package that imports
 * one above it (devices knows nothing of core, core nothing of cli).
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve, sep } from 'node:path';
import { fileURLToPath } from 'node:url';
import { describe, expect, test } from 'vitest';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
const coreSrc = join(root, 'packages/core/src');

/** Layers of core from the lowest; a file may import its own layer and those below. */
const LAYERS = ['shared', 'netlist', 'elaborate', 'engine', 'analysis', 'measure', 'pipeline', 'barrel'] as const;
type Layer = (typeof LAYERS)[number];
const SHARED_FILES = ['errors.ts', 'arguments.ts', 'units.ts', 'figure-registry.ts', 'budgets.ts', 'stats.ts', 'corner-design.ts', 'part-data.ts'];

function sourceFiles(dir: string): string[] {
  return readdirSync(dir, { withFileTypes: true }).flatMap((e) => (e.isDirectory() ? sourceFiles(join(dir, e.name)) : e.name.endsWith('.ts') ? [join(dir, e.name)] : []));
}

/** Module specifiers of every static import, re-export, side-effect import and dynamic import (comments removed first). */
export function importsOf(text: string): string[] {
  const code = text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/^\s*\/\/.*$/gm, '');
  const out: string[] = [];
  const patterns = [/(?:^|[;\n])\s*(?:import|export)\s[^;'"]*?\sfrom\s*['"]([^'"]+)['"]/g, /(?:^|[;\n])\s*import\s*['"]([^'"]+)['"]/g, /\bimport\(\s*['"]([^'"]+)['"]\s*\)/g];
  for (const p of patterns) for (const m of code.matchAll(p)) out.push(m[1]!);
  return out;
}

/** The layer of a core file from its path relative to packages/core/src; undefined for a file no layer claims. */
export function layerOf(rel: string): Layer | undefined {
  const parts = rel.split(/[\\/]/);
  if (parts.length === 1) return parts[0] === 'index.ts' || parts[0] === 'internal.ts' ? 'barrel' : SHARED_FILES.includes(parts[0]!) ? 'shared' : undefined;
  const folder = parts[0] as Layer;
  return LAYERS.includes(folder) && folder !== 'shared' && folder !== 'barrel' ? folder : undefined;
}

/** Upward imports: [importer, imported] pairs whose layers run the wrong way. */
export function upwardImports(graph: ReadonlyMap<string, readonly string[]>): Array<[string, string]> {
  const rank = (f: string): number => LAYERS.indexOf(layerOf(f)!);
  return [...graph].flatMap(([from, tos]) => tos.filter((to) => rank(to) > rank(from)).map((to): [string, string] => [from, to]));
}

/** One import cycle (its files in order, the first repeated at the end), or undefined. Depth-first search with three colours. */
export function findCycle(graph: ReadonlyMap<string, readonly string[]>): string[] | undefined {
  const state = new Map<string, 'open' | 'done'>();
  const stack: string[] = [];
  const visit = (f: string): string[] | undefined => {
    state.set(f, 'open');
    stack.push(f);
    for (const g of graph.get(f) ?? []) {
      if (state.get(g) === 'open') return [...stack.slice(stack.indexOf(g)), g];
      if (!state.has(g)) {
        const c = visit(g);
        if (c) return c;
      }
    }
    stack.pop();
    state.set(f, 'done');
    return undefined;
  };
  for (const f of graph.keys()) {
    if (state.has(f)) continue;
    const c = visit(f);
    if (c) return c;
  }
  return undefined;
}

/** Core's file graph: file (relative to src) → the core files it imports. */
function coreGraph(): Map<string, string[]> {
  const graph = new Map<string, string[]>();
  for (const file of sourceFiles(coreSrc)) {
    const rel = relative(coreSrc, file).split(sep).join('/');
    const targets = importsOf(readFileSync(file, 'utf8'))
      .filter((s) => s.startsWith('.'))
      .map((s) => relative(coreSrc, resolve(dirname(file), s.replace(/\.js$/, '.ts'))).split(sep).join('/'));
    graph.set(rel, targets);
  }
  return graph;
}

describe('the rule itself (a graph made up for the purpose)', () => {
  const made = new Map<string, string[]>([
    ['netlist/a.ts', ['errors.ts']],
    ['engine/b.ts', ['netlist/a.ts', 'measure/c.ts']],
    ['measure/c.ts', ['engine/b.ts']],
    ['errors.ts', []],
  ]);
  test('an engine file importing measure is upward', () => {
    expect(upwardImports(made)).toEqual([['engine/b.ts', 'measure/c.ts']]);
  });
  test('b → c → b is a cycle', () => {
    expect(findCycle(made)).toEqual(['engine/b.ts', 'measure/c.ts', 'engine/b.ts']);
  });
  test('imports are read from every statement form, not from comments', () => {
    const text = "/* import x from './no.js' */\n// import y from './no2.js'\nimport {\n  a,\n  b,\n} from './one.js';\nimport type { T } from '../two.js';\nexport { c } from './three.js';\nexport type * from './four.js';\nimport './five.js';\nconst m = import('./six.js');";
    expect(importsOf(text).sort()).toEqual(['../two.js', './five.js', './four.js', './one.js', './six.js', './three.js']);
  });
});

describe('core layers: netlist → elaborate → engine → analysis → measure → pipeline', () => {
  const graph = coreGraph();

  test('every file of core belongs to a layer', () => {
    expect([...graph.keys()].filter((f) => layerOf(f) === undefined)).toEqual([]);
  });

  test('every relative import resolves to a file of core', () => {
    const missing = [...graph].flatMap(([f, tos]) => tos.filter((t) => !graph.has(t)).map((t) => `${f} → ${t}`));
    expect(missing).toEqual([]);
  });

  test('nothing imports upward', () => {
    expect(upwardImports(graph).map(([a, b]) => `${a} → ${b}`)).toEqual([]);
  });

  test('the shared files import only each other', () => {
    const bad = [...graph].filter(([f]) => layerOf(f) === 'shared').flatMap(([f, tos]) => tos.filter((t) => layerOf(t) !== 'shared').map((t) => `${f} → ${t}`));
    expect(bad).toEqual([]);
  });

  test('no import cycle between files of core', () => {
    expect(findCycle(graph)?.join(' → ')).toBeUndefined();
  });
});

describe('packages: devices → core → cli', () => {
  const importsIn = (pkg: string): Array<[string, string]> =>
    sourceFiles(join(root, 'packages', pkg, 'src')).flatMap((f) => importsOf(readFileSync(f, 'utf8')).map((s): [string, string] => [relative(root, f), s]));
  const reaches = (pkg: string, specifier: string, fromFile: string): boolean =>
    specifier === `@railcheck/${pkg}` || specifier.startsWith(`@railcheck/${pkg}/`) || (specifier.startsWith('.') && resolve(root, dirname(fromFile), specifier).startsWith(join(root, 'packages', pkg) + sep));

  test('devices imports nothing from core or cli', () => {
    expect(importsIn('devices').filter(([f, s]) => reaches('core', s, f) || reaches('cli', s, f))).toEqual([]);
  });

  test('core imports nothing from cli', () => {
    expect(importsIn('core').filter(([f, s]) => reaches('cli', s, f))).toEqual([]);
  });
});
