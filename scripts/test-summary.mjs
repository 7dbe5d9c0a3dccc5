// Prints the plain closing line CI reads, "N passed, N failed", from vitest's JSON report.
import { readFileSync, existsSync } from 'node:fs';

const file = process.argv[2] ?? 'test-results/vitest.json';
if (!existsSync(file)) {
  console.log('0 passed, 1 failed');
  console.error(`no test report at ${file}: the test command stopped before vitest ran`);
  process.exit(1);
}
const report = JSON.parse(readFileSync(file, 'utf8'));
const passed = report.numPassedTests ?? 0;
// A file that failed to load has no failing test of its own: count it as one failure.
const brokenFiles = (report.testResults ?? []).filter((f) => f.status === 'failed'
  && !(f.assertionResults ?? []).some((a) => a.status === 'failed')).length;
const failed = (report.numFailedTests ?? 0) + brokenFiles;
const skipped = (report.numPendingTests ?? 0) + (report.numTodoTests ?? 0);
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
process.exit(failed > 0 || passed === 0 ? 1 : 0);
