import { engineBench, type BenchRow } from './engine';

// `npm run bench`: prints figures, asserts nothing. Targets are stated beside the figures.
const TARGET_FRAME_SHARE = 0.25;

function print(rows: BenchRow[]): void {
  for (const r of rows) {
    const ok = r.frameShare < TARGET_FRAME_SHARE ? 'within' : 'OVER';
    console.log(
      `${r.name}: median ${r.medianMs.toFixed(2)} ms = ${r.frameShare.toFixed(3)} of a 16.7 ms frame ` +
        `(target < ${TARGET_FRAME_SHARE}: ${ok}); heap growth ${Math.round(r.heapBytesPerSolve)} B per solve, ` +
        `${r.heapBytesPerDraw.toFixed(2)} B per draw`,
    );
  }
}

console.log(`engine benchmark on ${process.version}, ${(await import('node:os')).cpus().length} cores`);
print(engineBench());

/*
 * The overlay part drives Chromium through playwright-core, which this bundle keeps external; but
 * the bundle runs from a temporary folder, where Node cannot resolve that package. So the overlay
 * bench runs in a child process from the project folder, through tsx: its Node side only drives
 * the browser, and its figures are all taken inside the page, so the loader's overhead is not in them.
 */
const { spawnSync } = await import('node:child_process');
const overlay = spawnSync(
  process.execPath,
  ['--import', 'tsx', '--input-type=module', '-e', "await (await import('./test/bench/overlay.ts')).overlayBench();"],
  { stdio: 'inherit' },
);
if (overlay.status !== 0) {
  console.log(`overlay benchmark did not finish (${overlay.error?.message ?? `exit ${overlay.status ?? overlay.signal}`})`);
  process.exitCode = 1;
}
