// Bundles the benchmark with esbuild first, as the shipped extension is bundled: run straight from
// TypeScript loaders, every imported binding becomes a getter call, which would dominate the figures.
import { build } from 'esbuild';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';

const dir = mkdtempSync(join(tmpdir(), 'clip-caliper-bench-'));
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
