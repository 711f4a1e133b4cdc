// Bundles each package's barrel and the CLI entry with esbuild, so that the
// `railcheck` command starts from plain JavaScript (no transpiling at start-up).
import { build } from 'esbuild';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const common = { bundle: true, platform: 'node', format: 'esm', target: 'node20', sourcemap: true, logLevel: 'warning' };

await Promise.all([
  build({ ...common, entryPoints: [join(root, 'packages/devices/src/index.ts')], outfile: join(root, 'packages/devices/dist/index.js'), packages: 'external' }),
  build({ ...common, entryPoints: [join(root, 'packages/core/src/index.ts')], outfile: join(root, 'packages/core/dist/index.js'), external: ['ts-pattern'] }),
  build({ ...common, entryPoints: [join(root, 'packages/core/src/internal.ts')], outfile: join(root, 'packages/core/dist/internal.js'), external: ['ts-pattern'] }),
  build({ ...common, entryPoints: [join(root, 'packages/cli/src/index.ts')], outfile: join(root, 'packages/cli/dist/index.js'), external: ['ts-pattern'] }),
  build({ ...common, entryPoints: [join(root, 'packages/cli/src/main.ts')], outfile: join(root, 'packages/cli/dist/railcheck.mjs'), external: ['ts-pattern'],
    banner: { js: '#!/usr/bin/env node' } }),
]);
