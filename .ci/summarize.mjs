// Sums the vitest JSON reports of every suite into the one closing line CI reads.
// A step that failed before its suite reported (typecheck, build) counts as one failure, so a red
// run can never print "0 failed".
import { existsSync, readFileSync, readdirSync } from 'node:fs';

const rc = Number(process.argv[2] ?? 0);
let passed = 0;
let failed = 0;
let skipped = 0;
const dir = 'test-results';
const reports = existsSync(dir) ? readdirSync(dir).filter((f) => f.endsWith('.json')) : [];
for (const f of reports) {
  const r = JSON.parse(readFileSync(`${dir}/${f}`, 'utf8'));
  passed += r.numPassedTests ?? 0;
  failed += r.numFailedTests ?? 0;
  skipped += (r.numPendingTests ?? 0) + (r.numTodoTests ?? 0);
  // a file that failed to load has no tests but is a failure all the same
  for (const s of r.testResults ?? []) if (s.status === 'failed' && (s.assertionResults ?? []).length === 0) failed++;
  console.log(`${f.replace(/\.json$/, '')}: ${r.numPassedTests ?? 0} passed, ${r.numFailedTests ?? 0} failed`);
}
if (rc !== 0 && failed === 0) failed = 1;
console.log(`${passed} passed, ${failed} failed${skipped ? `, ${skipped} skipped` : ''}`);
