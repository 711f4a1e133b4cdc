// Builds what the packages ship, into each packages/X/dist/:
// - JavaScript bundles made with esbuild, so that the `railcheck` command
//   starts from plain JavaScript (no transpiling at start-up);
// - declaration files (.d.ts) emitted by tsc from the sources
//   (packages/X/tsconfig.build.json), in dependency order devices -> core -> cli,
//   because each package's declarations import the previous one's through its
//   package.json `types`;
// - packages/cli/examples/: a copy of the example netlists, so that an
//   installed CLI finds the demo netlist inside its own package;
// - packages/cli/parts/: a copy of the parts library (packages/core/parts),
//   so that `.include "parts:NAME"` finds it from the CLI bundle.
// When the launcher (scripts/railcheck.mjs) imports this file to refresh a
// stale bundle, only the JavaScript is rebuilt (quick); `node scripts/build.mjs`
// (prepare, build) does everything.
// Inside the workspace, tests and the type check read the sources (vitest
// aliases, tsconfig.json paths); see DEVELOPERS.md, Packaging.
import { build } from 'esbuild';
import { execFileSync } from 'node:child_process';
import { cpSync, mkdirSync, readdirSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join, resolve } from 'node:path';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const common = { bundle: true, platform: 'node', format: 'esm', target: 'node20', sourcemap: true, logLevel: 'warning' };
const pkg = (p) => join(root, 'packages', p);
const full = process.argv[1] !== undefined && resolve(process.argv[1]) === fileURLToPath(import.meta.url);


// dist/ is overwritten, not emptied first: two tests may build at the same time.
const examples = join(pkg('cli'), 'examples');
mkdirSync(examples, { recursive: true });
for (const f of readdirSync(join(root, 'examples'))) {
  if (f.endsWith('.cir')) cpSync(join(root, 'examples', f), join(examples, f));
}
const parts = join(pkg('cli'), 'parts');
mkdirSync(parts, { recursive: true });
for (const f of readdirSync(join(pkg('core'), 'parts'))) {
  if (f.endsWith('.lib') || f === 'README.md') cpSync(join(pkg('core'), 'parts', f), join(parts, f));
}

await Promise.all([
  build({ ...common, entryPoints: [join(pkg('devices'), 'src/index.ts')], outfile: join(pkg('devices'), 'dist/index.js'), packages: 'external' }),
  // index and internal share one chunk, so both entry points see the same classes and tables.
  // check-worker.js and spread-worker.js sit beside the chunk that starts them (new URL('./check-worker.js', import.meta.url) in pipeline/check.ts, spread-worker.js in pipeline/spread.ts).
  build({ ...common, entryPoints: [join(pkg('core'), 'src/index.ts'), join(pkg('core'), 'src/internal.ts'), { in: join(pkg('core'), 'src/pipeline/check-worker.ts'), out: 'check-worker' }, { in: join(pkg('core'), 'src/pipeline/spread-worker.ts'), out: 'spread-worker' }], outdir: join(pkg('core'), 'dist'),
    splitting: true, chunkNames: 'chunk-[hash]', external: ['ts-pattern'] }),
  build({ ...common, entryPoints: [join(pkg('cli'), 'src/index.ts')], outfile: join(pkg('cli'), 'dist/index.js'), external: ['ts-pattern', 'cli-progress'] }),
  build({ ...common, entryPoints: [join(pkg('cli'), 'src/main.ts')], outfile: join(pkg('cli'), 'dist/railcheck.mjs'), external: ['ts-pattern', 'cli-progress'],
    banner: { js: '#!/usr/bin/env node' } }),
  // The worker of `railcheck check --jobs N`, beside railcheck.mjs.
  build({ ...common, entryPoints: [join(pkg('core'), 'src/pipeline/check-worker.ts')], outfile: join(pkg('cli'), 'dist/check-worker.js'), external: ['ts-pattern'] }),
  // The worker of `railcheck spread --jobs N`, beside railcheck.mjs.
  build({ ...common, entryPoints: [join(pkg('core'), 'src/pipeline/spread-worker.ts')], outfile: join(pkg('cli'), 'dist/spread-worker.js'), external: ['ts-pattern'] }),
]);

const tsc = join(root, 'node_modules', 'typescript', 'bin', 'tsc');
for (const p of full ? ['devices', 'core', 'cli'] : []) {
  execFileSync(process.execPath, [tsc, '-p', join(pkg(p), 'tsconfig.build.json')], { cwd: root, stdio: 'inherit' });
}
