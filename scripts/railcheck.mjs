// Launcher for `pnpm railcheck`: runs the bundled CLI, rebuilding it first
// only when a source file is newer than the bundle (a developer edited it).
import { statSync, readdirSync, existsSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { dirname, join } from 'node:path';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bundle = join(root, 'packages/cli/dist/railcheck.mjs');

function newestSource(dir) {
  let newest = 0;
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, entry.name);
    if (entry.isDirectory()) newest = Math.max(newest, newestSource(p));
    else if (entry.name.endsWith('.ts')) newest = Math.max(newest, statSync(p).mtimeMs);
  }
  return newest;
}

const sources = ['devices', 'core', 'cli'].map((p) => join(root, 'packages', p, 'src'));
const stale = !existsSync(bundle) || sources.some((s) => newestSource(s) > statSync(bundle).mtimeMs);
if (stale) await import(pathToFileURL(join(root, 'scripts/build.mjs')).href);
const { main } = await import(pathToFileURL(bundle).href);
process.exitCode = await main(process.argv.slice(2));
