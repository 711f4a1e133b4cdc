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
  /**
   * The job run on the calling thread. When given, the calling thread is
   * one of the lanes (it takes jobs from the same queue as the workers,
   * yielding to the event loop as `local` does, so that replies are taken
   * in), and one worker fewer is started: the calling thread is warm
   * already and starts no thread.
   */
  readonly local?: ((job: J) => Promise<R>) | undefined;
}

/** Runs the jobs on `lanes` lanes: worker threads of `script` (and the calling thread, with `p.local`); `done` hears each result as it finishes (any order) with its job's index. */
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
  const local = p.local;
  const here = async (): Promise<void> => {
    while (local !== undefined && next < p.jobs.length) {
      const j = next++;
      done(j, await local(p.jobs[j]!));
    }
  };
  const workers = local === undefined ? lanes : lanes - 1;
  await Promise.all([...Array.from({ length: Math.max(workers, 0) }, lane), ...(local === undefined ? [] : [here()])]);
}
