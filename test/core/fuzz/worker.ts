/**
 * The fuzz worker (bundled by pool.ts with esbuild, run in a worker thread
 * with a memory cap): takes one case at a time, writes it to a folder of
 * its own, runs it through the whole pipeline and every presenter the
 * command line uses (text, JSON, CSV, diagnostics), and the command line
 * itself in-process, and answers with the case's class.
 */
import { parentPort, workerData } from 'node:worker_threads';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { formatDiagnostic, runNetlistFile, sampleTrace, acceptedTimes, type Diagnostic, type RunResult } from '@railcheck/core';
import { formatReport, formatWarnings, main, reportJson } from '@railcheck/cli';
import { transientCsv } from '../../../packages/cli/src/present/waves.js';
import { notEvaluatedErrors } from '../../../packages/cli/src/present/figures.js';
import type { CaseOutcome, CaseRequest } from './classify.js';
import { badText, nonFiniteIn } from './classify.js';

const dir: string = (workerData as { dir: string }).dir;
mkdirSync(dir, { recursive: true });

/** Lines that look like a JavaScript stack frame. */
const STACK_LINE = /^\s{4}at /m;

function located(d: Diagnostic): boolean {
  return d.pos !== undefined && d.pos.line >= 1 && d.pos.column >= 1;
}

function classify(req: CaseRequest): CaseOutcome {
  const file = join(dir, 'case.cir');
  writeFileSync(file, req.text, 'latin1');
  writeFileSync(join(dir, 'sub.lib'), req.lib, 'latin1');
  writeFileSync(join(dir, 'loop.lib'), '.include "loop.lib"\n', 'latin1');
  let result: RunResult;
  try {
    result = runNetlistFile(file, { allowOutsideIncludes: req.flags.includes('--allow-outside-includes'), keepSteps: true });
  } catch (e) {
    return { kind: 'crash', detail: `runNetlistFile threw ${e instanceof Error ? `${e.name}: ${e.message}` : String(e)}` };
  }
  if (!result.ok) {
    const internal = result.errors.find((e) => e.code === 'internal');
    if (internal) return { kind: 'crash', detail: internal.message };
    // Rendered as the command line does; an error may rightly say an expression "evaluates to NaN".
    for (const e of result.errors) formatDiagnostic(e);
    formatWarnings(result.warnings);
    const unlocated = result.errors.filter((e) => !located(e));
    return { kind: 'clean-error', detail: unlocated.length ? `unlocated: ${unlocated.map((e) => e.code).join(', ')}` : '', unlocated: unlocated.length > 0 };
  }
  const report = result.report;
  const text = formatReport(report);
  const json = reportJson(report, req.flags.includes('--steps'));
  JSON.stringify(json);
  for (const t of report.transients) {
    const times = acceptedTimes(t);
    transientCsv(times, sampleTrace(report.compiled, t.trace!, times).nodes);
    transientCsv(t.times, t.nodes);
  }
  const notes = [formatWarnings(report.warnings), ...notEvaluatedErrors(report.figures?.limits ?? []).map(formatDiagnostic)].join('\n');
  const badJson = nonFiniteIn(json, req.text);
  if (badJson) return { kind: 'non-finite', detail: `in the JSON report: ${badJson}` };
  const bad = badText(`${text}\n${notes}`, req.text);
  if (bad) return { kind: 'non-finite', detail: `in the text report: ${bad}` };
  return { kind: 'ok', detail: '' };
}

/** The command line itself, in-process: a status of 0, 1 or 2, no stack trace, no internal error. */
async function command(req: CaseRequest): Promise<string | undefined> {
  const out: string[] = [];
  const err: string[] = [];
  const status = await main(['run', join(dir, 'case.cir'), ...req.flags], { out: (t) => out.push(t), err: (t) => err.push(t) });
  const all = `${out.join('\n')}\n${err.join('\n')}`;
  if (![0, 1, 2].includes(status)) return `exit status ${status}`;
  if (STACK_LINE.test(all)) return 'a stack trace was printed';
  if (/internal error/.test(all)) return all.slice(all.indexOf('internal error'), all.indexOf('internal error') + 200);
  if (status === 2 && err.length === 0) return 'status 2 with nothing on standard error';
  return undefined;
}

parentPort!.on('message', (req: CaseRequest) => {
  void (async () => {
    let outcome: CaseOutcome;
    try {
      outcome = classify(req);
      if (req.viaCommand && (outcome.kind === 'ok' || outcome.kind === 'clean-error')) {
        const wrong = await command(req);
        if (wrong) outcome = { kind: 'crash', detail: `command line: ${wrong}` };
      }
    } catch (e) {
      outcome = { kind: 'crash', detail: `a presenter threw ${e instanceof Error ? `${e.name}: ${e.message}\n${e.stack ?? ''}` : String(e)}` };
    }
    parentPort!.postMessage(outcome);
  })();
});
