/**
 * The worker thread of `spreadNetlist` with `jobs` > 1: reads, elaborates
 * and compiles the netlist once (at its first message; again only when a
 * message names another netlist or other options), then measures the runs
 * each message lists and posts back `{ runs }`, plain data. Built to
 * `spread-worker.js` beside core's bundle and the CLI's (scripts/build.mjs).
 */
import { parentPort } from 'node:worker_threads';
import { measureRun, setupFrom, type SpreadJobMessage, type SpreadSetup } from './spread.js';

let key = '';
let setup: SpreadSetup | undefined;

parentPort?.on('message', (m: SpreadJobMessage) => {
  try {
    const k = JSON.stringify([m.source, m.parse, m.options]);
    if (setup === undefined || k !== key) {
      setup = setupFrom(m.source, m.parse, m.options).setup;
      key = k;
    }
    const s = setup;
    parentPort?.postMessage({ runs: m.runs.map((r) => measureRun(s, r)) });
  } catch (e) {
    parentPort?.postMessage({ error: `internal error: ${e instanceof Error ? e.message : String(e)}` });
  }
});
