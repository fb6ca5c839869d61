import { readCaseRecord } from '../../src/case/migrate';
import { bigCase, limitCaseOptions } from '../case/big-case';

/*
 * Reading the invented case at the mark limit (test/case/big-case.ts, 10 000 marks) through the
 * reader every stored record and import goes through (nesting bound, migrations, the definition in
 * shape.ts): median of 15 runs after 3 warm-ups. Target: 100 ms, a tenth of the whole import's
 * budget (import.ts). Prints one line, asserts nothing.
 */
const TARGET_MS = 100;
const RUNS = 15;

export function validateBench(): void {
  const stored = JSON.parse(JSON.stringify(bigCase(limitCaseOptions()))) as unknown;
  const once = () => {
    const t0 = performance.now();
    readCaseRecord(stored);
    return performance.now() - t0;
  };
  for (let i = 0; i < 3; i++) once();
  const times = Array.from({ length: RUNS }, once).sort((a, b) => a - b);
  const median = times[RUNS >> 1]!;
  console.log(
    `reading a stored case of 10 000 marks (bound, migrate, validate): median ${median.toFixed(1)} ms of ${RUNS}, fastest ${times[0]!.toFixed(1)} ms ` +
      `(target < ${TARGET_MS} ms: ${median < TARGET_MS ? 'within' : 'OVER'})`,
  );
}
