// `npm run solve`: bundles solve.ts with esbuild, then runs the bundle. Run straight from TypeScript
// through a loader, every imported binding becomes a getter call and the whole engine is compiled
// on each start: a case at the mark limit took minutes that way. The bundle computes the same
// numbers (the same code, the same order of operations), so the output is byte for byte the same.
import { build } from 'esbuild';
import { mkdirSync, rmSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { pathToFileURL } from 'node:url';

const root = resolve(import.meta.dirname, '../..');
// two folders below the project, so that solve.ts finds ../../package.json from the bundle too
const cache = join(root, 'node_modules/.cache');
mkdirSync(cache, { recursive: true });
const out = join(cache, `clip-caliper-solve-${process.pid}.mjs`);
process.on('exit', () => rmSync(out, { force: true }));
await build({
  entryPoints: [join(root, 'extension/tools/solve.ts')],
  bundle: true,
  platform: 'node',
  format: 'esm',
  target: 'node20',
  outfile: out,
  logLevel: 'warning',
});
await import(pathToFileURL(out).href);
