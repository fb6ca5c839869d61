// Bundles the benchmark with esbuild first, as the shipped extension is bundled: run straight from
// TypeScript loaders, every imported binding becomes a getter call, which would dominate the figures.
import { build } from 'esbuild';
import { mkdirSync, mkdtempSync, rmSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

// inside the project, so that the external playwright-core resolves from node_modules; keepNames
// stays off, because functions sent into a page must not call a helper the page does not have
const cache = resolve('node_modules/.cache');
mkdirSync(cache, { recursive: true });
const dir = mkdtempSync(join(cache, 'clip-caliper-bench-'));
const out = join(dir, 'bench.mjs');
try {
  await build({
    entryPoints: ['test/bench/run.ts'],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    outfile: out,
    logLevel: 'warning',
    // playwright stays external: the browser part of the bench drives a real Chromium
    external: ['playwright-core'],
  });
  await import(pathToFileURL(out).href);
} finally {
  rmSync(dir, { recursive: true, force: true });
}
