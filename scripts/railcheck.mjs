// Launcher for `pnpm railcheck` (for developers): rebuilds the bundled CLI
// first when a source file is newer than it (a walk over the sources, a few
// tens of milliseconds), then runs it in the folder pnpm was started in.
// pnpm runs scripts at the workspace root and names the user's folder in
// INIT_CWD, so relative paths on the command line are read from there.
// The root `railcheck` script skips the rebuild check and starts faster.
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

const userFolder = process.env.INIT_CWD;
if (userFolder) {
  try {
    process.chdir(userFolder);
  } catch (e) {
    process.stderr.write(`railcheck: cannot work in the folder pnpm was started in, ${userFolder} (${e instanceof Error ? e.message : String(e)})\n`);
    process.exit(2);
  }
}
const sources = ['devices', 'core', 'cli'].map((p) => join(root, 'packages', p, 'src'));
const stale = !existsSync(bundle) || sources.some((s) => newestSource(s) > statSync(bundle).mtimeMs);
if (stale) await import(pathToFileURL(join(root, 'scripts/build.mjs')).href);
const { main } = await import(pathToFileURL(bundle).href);
process.exitCode = await main(process.argv.slice(2));
