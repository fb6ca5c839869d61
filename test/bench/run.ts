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
 * bench is bundled on its own here, its playwright-core import pinned to the project's copy by
 * absolute URL. esbuild and that path are resolved from the project folder, not from this bundle.
 */
{
  const { createRequire } = await import('node:module');
  const { mkdtempSync, rmSync } = await import('node:fs');
  const { tmpdir } = await import('node:os');
  const { dirname, join, resolve } = await import('node:path');
  const { pathToFileURL } = await import('node:url');
  const fromProject = createRequire(resolve('package.json'));
  const esbuild = fromProject('esbuild') as typeof import('esbuild');
  const playwright = pathToFileURL(join(dirname(fromProject.resolve('playwright-core/package.json')), 'index.mjs')).href;
  const dir = mkdtempSync(join(tmpdir(), 'clip-caliper-bench-overlay-'));
  try {
    const outfile = join(dir, 'overlay.mjs');
    await esbuild.build({
      entryPoints: ['test/bench/overlay.ts'],
      bundle: true,
      platform: 'node',
      format: 'esm',
      target: 'node20',
      outfile,
      logLevel: 'warning',
      plugins: [{ name: 'pin-playwright', setup: (b) => void b.onResolve({ filter: /^playwright-core$/ }, () => ({ path: playwright, external: true })) }],
    });
    const { overlayBench } = (await import(pathToFileURL(outfile).href)) as typeof import('./overlay');
    await overlayBench();
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}
