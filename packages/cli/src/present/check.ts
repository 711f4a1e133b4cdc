/**
 * The text and JUnit XML renderings of a check result (`railcheck check`,
 * `railcheck merge`), both from the one CheckResult, so that a merge of
 * shards prints what the unsharded run prints (docs/output.md,
 * "railcheck check").
 */
import type { CheckResult, CheckTest, NetlistCheck } from '@railcheck/core';
import { match } from 'ts-pattern';

const plural = (n: number, word: string): string => `${n} ${word}${n === 1 ? '' : 's'}`;
const indent = (text: string, pad: string): string => text.split('\n').map((l) => (l ? pad + l : l)).join('\n');

/** The lines of one netlist: `pass` or `FAIL`, its path and counts, then one line per failed test and per new value. */
export function netlistText(c: NetlistCheck): string {
  const limits = c.tests.filter((t) => t.kind === 'limit').length;
  const values = c.tests.filter((t) => t.kind === 'figure' || t.kind === 'node').length;
  const failed = c.tests.filter((t) => t.status === 'fail');
  const baseline = match(c.baseline)
    .with('compared', () => `, ${plural(values, 'baseline value')}`)
    .with('new', () => ', new: not in the baseline')
    .with('none', 'not-run', () => '')
    .exhaustive();
  const head = c.passed
    ? `pass  ${c.path}  (${plural(limits, 'limit')}${baseline})`
    : `FAIL  ${c.path}  (${failed.length} of ${plural(c.tests.length, 'test')} failed${baseline})`;
  const line = (t: CheckTest): string => indent(`${t.name}: ${t.message}`, '      ');
  return [head, ...failed.map(line), ...c.tests.filter((t) => t.status === 'new').map(line)].join('\n');
}

/** The closing lines: gone or dropped baseline netlists, the baseline written, the caution, the share, and `N netlists, N passed, N failed` last. */
export function summaryText(r: CheckResult): string {
  const lines: string[] = [];
  const updated = r.baseline?.mode === 'updated';
  for (const g of r.gone) lines.push(updated ? `dropped from the baseline: ${g} (not among the netlists checked)` : `gone: ${g} (in the baseline, not among the netlists checked)`);
  if (r.baseline && updated) {
    const written = r.cases.filter((c) => c.run.ok).length;
    lines.push(`baseline written: ${r.baseline.file} (${plural(written, 'netlist')} measured${written < r.cases.length ? `; ${plural(r.cases.length - written, 'netlist')} that did not run: left as the old baseline had ${r.cases.length - written === 1 ? 'it' : 'them'}` : ''})`);
  }
  if (r.caution) lines.push(`caution (${r.cases.filter((c) => c.run.aboveElv).map((c) => c.path).join(', ')}): ${r.caution}`);
  if (r.shard.count > 1) lines.push(`shard ${r.shard.index}/${r.shard.count} of ${plural(r.netlists.length, 'netlist')}`);
  lines.push(`${plural(r.summary.netlists, 'netlist')}, ${r.summary.passed} passed, ${r.summary.failed} failed`);
  return lines.join('\n');
}

/** The whole text report: every netlist in run order, then the summary. */
export function checkText(r: CheckResult): string {
  return [...r.cases.map(netlistText), summaryText(r)].join('\n');
}

/** Text as XML character data or attribute value: markup characters escaped, characters XML 1.0 does not allow dropped, line ends kept in attributes. */
function xml(text: string, attribute: boolean): string {
  // eslint-disable-next-line no-control-regex
  const clean = text.replace(/[\u0000-\u0008\u000b\u000c\u000e-\u001f\ufffe\uffff]/g, '');
  const escaped = clean.replace(/&/g, '&amp;').replace(/</g, '&lt;').replace(/>/g, '&gt;').replace(/"/g, '&quot;').replace(/'/g, '&apos;');
  return attribute ? escaped.replace(/\n/g, '&#10;').replace(/\r/g, '&#13;').replace(/\t/g, '&#9;') : escaped;
}

const attrs = (a: Readonly<Record<string, string | number>>): string => Object.entries(a).map(([k, v]) => ` ${k}="${xml(String(v), true)}"`).join('');

/**
 * JUnit XML: one `testsuite` per netlist (named by its path) with one
 * `testcase` for the run, one per limit and one per baseline value; a
 * failed test carries a `failure` whose message says what moved and by
 * how much; a new value passes with the note in `system-out`. A baseline
 * netlist that is gone is a suite with one skipped case. No times, so the
 * file is the same for the same results.
 */
export function checkJunit(r: CheckResult): string {
  const suites: string[] = [];
  let tests = 0;
  let failures = 0;
  let skipped = 0;
  for (const c of r.cases) {
    const failed = c.tests.filter((t) => t.status === 'fail').length;
    tests += c.tests.length;
    failures += failed;
    const cases = c.tests.map((t) => {
      const open = `    <testcase${attrs({ name: t.name, classname: c.path })}`;
      return match(t.status)
        .with('pass', () => `${open}/>`)
        .with('new', () => `${open}>\n      <system-out>${xml(t.message, false)}</system-out>\n    </testcase>`)
        .with('fail', () => `${open}>\n      <failure${attrs({ message: t.message, type: t.kind })}>${xml(t.message, false)}</failure>\n    </testcase>`)
        .exhaustive();
    });
    suites.push([`  <testsuite${attrs({ name: c.path, tests: c.tests.length, failures: failed, errors: 0, skipped: 0 })}>`, ...cases, '  </testsuite>'].join('\n'));
  }
  for (const g of r.gone) {
    tests += 1;
    skipped += 1;
    const message = r.baseline?.mode === 'updated' ? 'dropped from the baseline: not among the netlists checked' : 'gone: in the baseline, not among the netlists checked';
    suites.push([`  <testsuite${attrs({ name: g, tests: 1, failures: 0, errors: 0, skipped: 1 })}>`, `    <testcase${attrs({ name: 'baseline', classname: g })}>`, `      <skipped${attrs({ message })}/>`, '    </testcase>', '  </testsuite>'].join('\n'));
  }
  const head = `<testsuites${attrs({ name: 'railcheck check', tests, failures, errors: 0, skipped })}>`;
  return ['<?xml version="1.0" encoding="UTF-8"?>', head, ...suites, '</testsuites>', ''].join('\n');
}
