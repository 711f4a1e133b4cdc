// The project's test command: type-checks the whole tree, runs every vitest
// project, and ends with the plain line `N passed, N failed` that CI reads.
import { spawnSync } from 'node:child_process';
import { readFileSync, rmSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { dirname, join } from 'node:path';

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const bin = (name) => join(root, 'node_modules', '.bin', name);
const results = join(root, '.vitest-results.json');
const extra = process.argv.slice(2);

const tsc = spawnSync(bin('tsc'), ['-p', join(root, 'tsconfig.json')], { stdio: 'inherit', cwd: root });
const typeFailures = tsc.status === 0 ? 0 : 1;
if (typeFailures) console.error('type check failed (counted as one failed test)');

rmSync(results, { force: true });
const vitest = spawnSync(bin('vitest'), ['run', '--reporter=default', '--reporter=json', `--outputFile.json=${results}`, ...extra], { stdio: 'inherit', cwd: root });

let passed = 0;
let failed = typeFailures;
try {
  const report = JSON.parse(readFileSync(results, 'utf8'));
  passed = report.numPassedTests;
  // A file that failed to load has no test results of its own: count it as one failure.
  const brokenFiles = (report.testResults ?? []).filter((f) => f.status === 'failed' && (f.assertionResults ?? []).length === 0).length;
  failed += report.numFailedTests + brokenFiles;
} catch {
  failed += 1;
  console.error('vitest produced no results file');
}
if (vitest.status !== 0 && failed === 0) failed = 1;
console.log(`${passed} passed, ${failed} failed`);
process.exit(failed === 0 ? 0 : 1);
