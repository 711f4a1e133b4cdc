/**
 * Runs fuzz cases in worker threads with a memory cap and a time budget
 * per case: a worker that runs past the budget is terminated and its case
 * counted as a hang; a worker that dies (out of memory, or anything else)
 * counts its case as a crash. A fresh worker takes over in both events.
 * The worker (worker.ts) is bundled with esbuild once per pool, from the
 * sources, so the fuzzer always runs the code under test.
 */
import { build } from 'esbuild';
import { Worker } from 'node:worker_threads';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fileURLToPath } from 'node:url';
import type { CaseOutcome, CaseRequest } from './classify.js';

const root = fileURLToPath(new URL('../../../', import.meta.url));
const src = (p: string): string => join(root, 'packages', p, 'src', 'index.ts');

/** Limits of one worker: old and young generation in MB, and the time budget of one case in ms. */
export interface PoolLimits {
  readonly oldMb: number;
  readonly youngMb: number;
  readonly caseMs: number;
  readonly workers: number;
}

/** Bundles worker.ts into a fresh folder; returns the bundle's path. */
async function bundleWorker(dir: string): Promise<string> {
  const outfile = join(dir, 'worker.mjs');
  await build({
    entryPoints: [fileURLToPath(new URL('./worker.ts', import.meta.url))],
    outfile, bundle: true, platform: 'node', format: 'esm', target: 'node20', logLevel: 'warning', sourcemap: 'inline',
    alias: { '@railcheck/core/internal': join(root, 'packages/core/src/internal.ts'), '@railcheck/core': src('core'), '@railcheck/devices': src('devices'), '@railcheck/cli': src('cli') },
    nodePaths: [join(root, 'node_modules'), join(root, 'packages/core/node_modules'), join(root, 'packages/cli/node_modules')],
  });
  return outfile;
}

/** Runs every case; `done` hears each outcome as it comes (index, outcome). Resolves to the outcomes in case order. */
export async function runCases(cases: readonly CaseRequest[], limits: PoolLimits, done: (k: number, o: CaseOutcome) => void = () => {}): Promise<CaseOutcome[]> {
  const dir = mkdtempSync(join(tmpdir(), 'railcheck-fuzz-'));
  const script = await bundleWorker(dir);
  const outcomes: CaseOutcome[] = new Array<CaseOutcome>(cases.length);
  let next = 0;

  const lane = async (n: number): Promise<void> => {
    let worker: Worker | undefined;
    const fresh = (): Worker => {
      const w = new Worker(script, { workerData: { dir: join(dir, `lane${n}`) }, resourceLimits: { maxOldGenerationSizeMb: limits.oldMb, maxYoungGenerationSizeMb: limits.youngMb }, stdout: true, stderr: true });
      // Whatever a case prints is not the test's output; drain it.
      w.stdout.resume();
      w.stderr.resume();
      return w;
    };
    while (next < cases.length) {
      const k = next++;
      const w = (worker ??= fresh());
      const outcome = await new Promise<CaseOutcome>((resolve) => {
        const finish = (o: CaseOutcome, dead: boolean): void => {
          clearTimeout(timer);
          w.removeAllListeners('message').removeAllListeners('error').removeAllListeners('exit');
          if (dead) {
            worker = undefined;
            void w.terminate();
          }
          resolve(o);
        };
        const timer = setTimeout(() => finish({ kind: 'hang', detail: `still running after ${limits.caseMs} ms` }, true), limits.caseMs);
        w.once('message', (o: CaseOutcome) => finish(o, false));
        w.once('error', (e) => finish({ kind: 'crash', detail: `worker died: ${e instanceof Error ? `${(e as { code?: string }).code ?? e.name}: ${e.message}` : String(e)}` }, true));
        w.once('exit', (code) => finish({ kind: 'crash', detail: `worker exited with code ${code}` }, true));
        w.postMessage(cases[k]);
      });
      outcomes[k] = outcome;
      done(k, outcome);
    }
    if (worker) await worker.terminate();
  };
  await Promise.all(Array.from({ length: Math.max(1, limits.workers) }, (_, n) => lane(n)));
  return outcomes;
}
