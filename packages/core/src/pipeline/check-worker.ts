/**
 * The worker thread of `checkNetlists`: runs one netlist per message
 * (`{ file, allowOutsideIncludes }`) and posts back `{ run }`, the run as
 * plain data. Built to `check-worker.js` beside core's bundle and the
 * CLI's (scripts/build.mjs).
 */
import { parentPort } from 'node:worker_threads';
import { runForCheck, type NetlistRun } from './check-run.js';

parentPort?.on('message', (m: { file: string; allowOutsideIncludes: boolean }) => {
  let run: NetlistRun;
  try {
    run = runForCheck(m.file, m.allowOutsideIncludes);
  } catch (e) {
    run = { ok: false, errors: [`${m.file}: error: internal error: ${e instanceof Error ? e.message : String(e)} (please report this with the netlist)`], aboveElv: false };
  }
  parentPort?.postMessage({ run });
});
