/**
 * The worker-thread pool of the runs that spread over threads
 * (`checkNetlists`, `spreadNetlist`): a fixed number of lanes, each with
 * one worker thread that takes the next job as soon as it is free. A job
 * is one message posted to the worker and one message back; a worker that
 * stops (an error, an exit) gives its job the caller's failure value and
 * the lane starts a new worker for the next job. Results come back in any
 * order, with their job's index; the callers put them in order.
 */
import { existsSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Worker } from 'node:worker_threads';

/** Resolves a worker script (default `name` beside the module `base`); undefined when it is not there (running from the sources). */
export function workerPath(script: string | URL | undefined, name: string, base: string): string | URL | undefined {
  const s = script ?? new URL(`./${name}`, base);
  const path = s instanceof URL ? (s.protocol === 'file:' ? fileURLToPath(s) : undefined) : s;
  return path !== undefined && existsSync(path) ? s : undefined;
}

/** What the pool needs of its caller: the message for a job, the result in the reply, and the result when the worker stops. */
export interface PoolJobs<J, R> {
  readonly jobs: readonly J[];
  readonly message: (job: J) => unknown;
  readonly reply: (m: unknown, job: J) => R;
  readonly stopped: (job: J, why: string) => R;
}

/** Runs the jobs on `lanes` worker threads of `script`; `done` hears each result as it finishes (any order) with its job's index. */
export async function runOnWorkers<J, R>(p: PoolJobs<J, R>, lanes: number, script: string | URL, done: (j: number, result: R) => void): Promise<void> {
  let next = 0;
  const lane = async (): Promise<void> => {
    let worker: Worker | undefined;
    try {
      while (next < p.jobs.length) {
        const j = next++;
        const job = p.jobs[j]!;
        const w = (worker ??= new Worker(script));
        const result = await new Promise<R>((resolveJob) => {
          const onMessage = (m: unknown): void => {
            w.off('error', onError);
            w.off('exit', onExit);
            resolveJob(p.reply(m, job));
          };
          const fail = (why: string): void => {
            w.off('message', onMessage);
            w.off('error', onError);
            w.off('exit', onExit);
            worker = undefined;
            resolveJob(p.stopped(job, why));
          };
          const onError = (e: Error): void => fail(e.message);
          const onExit = (code: number): void => fail(`exit code ${code}`);
          w.once('message', onMessage);
          w.once('error', onError);
          w.once('exit', onExit);
          w.postMessage(p.message(job));
        });
        done(j, result);
      }
    } finally {
      if (worker) await worker.terminate();
    }
  };
  await Promise.all(Array.from({ length: lanes }, lane));
}
