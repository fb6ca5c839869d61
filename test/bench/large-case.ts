import { execFileSync } from 'node:child_process';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { toCaseFile } from '../../src/case/casefile';
import { bigCase, limitCaseOptions } from '../case/big-case';

/*
 * `npm run solve` on the invented case at the mark limit (test/case/big-case.ts, 10 000 marks) and on
 * the same pass marked at 100 timestamps: wall time of the whole command (bundling included), median
 * of 3 runs. Target: 5 s for the large case. Prints figures; asserts nothing. The popup on the same
 * case is timed in popup-large.ts.
 */
const TARGET_MS = 5_000;

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1]!;
}

function timeSolve(file: string, runs = 3): number {
  const times: number[] = [];
  for (let i = 0; i < runs; i++) {
    const t0 = performance.now();
    execFileSync('node', ['extension/tools/solve-run.mjs', file], { stdio: ['ignore', 'ignore', 'inherit'] });
    times.push(performance.now() - t0);
  }
  return median(times);
}

export function largeCaseBench(): void {
  const dir = mkdtempSync(join(tmpdir(), 'clip-caliper-large-'));
  const big = join(dir, 'limit.json');
  const small = join(dir, 't100.json');
  writeFileSync(big, JSON.stringify(toCaseFile(bigCase(limitCaseOptions()), '0.1.0')));
  writeFileSync(small, JSON.stringify(toCaseFile(bigCase({ timestamps: 100 }), '0.1.0')));
  const b = timeSolve(big);
  const s = timeSolve(small);
  console.log(`npm run solve, 10 000-mark case: median ${(b / 1000).toFixed(2)} s of 3 (target < ${TARGET_MS / 1000} s: ${b < TARGET_MS ? 'within' : 'OVER'})`);
  console.log(`npm run solve, 100-timestamp case: median ${(s / 1000).toFixed(2)} s of 3`);
}
