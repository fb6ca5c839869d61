// Bundles the recompute command (solve.ts) once, as the extension is built: `npm run build` runs this
// after Vite, and `npm run solve` (run.mjs) only when the bundle is missing or older than a file it
// was made from. Plain JavaScript, so that checking freshness costs no compiler.
import { mkdirSync, readFileSync, renameSync, statSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

export const ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '../..');
export const OUT_DIR = join(ROOT, 'dist-cli');
const ENTRY = 'src/cli/solve.ts';
// beside the bundle: what it was made from, and when the build began (a source saved during the
// build is newer than that, so the next run builds again)
const META = 'solve.meta.json';
const THIS_FILE = fileURLToPath(import.meta.url);

/** Where the bundle is (or would be) in `outDir`. */
export function bundlePath(outDir = OUT_DIR) {
  return join(outDir, 'solve.mjs');
}

/**
 * Why the bundle in `outDir` must be made again, or null when it is fresh: missing, unreadable
 * record, or a file it was made from (sources, package.json, the lock file, this bundler) changed or
 * went.
 */
export function staleness(outDir = OUT_DIR) {
  let meta;
  try {
    statSync(bundlePath(outDir));
    meta = JSON.parse(readFileSync(join(outDir, META), 'utf8'));
  } catch {
    return 'no bundle yet';
  }
  if (!Array.isArray(meta.inputs) || typeof meta.startedAt !== 'number') return `${META}: unreadable`;
  for (const input of [...meta.inputs, THIS_FILE]) {
    let mtime;
    try {
      mtime = statSync(resolve(ROOT, input)).mtimeMs;
    } catch {
      return `${input}: gone`;
    }
    if (mtime > meta.startedAt) return `${input}: changed`;
  }
  return null;
}

/**
 * Bundles solve.ts into `outDir`/solve.mjs with esbuild (the same code as the TypeScript, in the
 * same order of operations, so the same bytes out). Written to a temporary name and renamed, so a
 * second command running at the same moment never reads half a file.
 */
export async function bundleCli(outDir = OUT_DIR) {
  const { build } = await import('esbuild');
  const startedAt = Date.now();
  const result = await build({
    absWorkingDir: ROOT,
    entryPoints: [ENTRY],
    bundle: true,
    platform: 'node',
    format: 'esm',
    target: 'node20',
    write: false,
    metafile: true,
    outfile: bundlePath(outDir),
    logLevel: 'warning',
  });
  mkdirSync(outDir, { recursive: true });
  const out = bundlePath(outDir);
  const tmp = `${out}.${process.pid}.tmp`;
  writeFileSync(tmp, result.outputFiles[0].contents);
  renameSync(tmp, out);
  const metaTmp = join(outDir, `${META}.${process.pid}.tmp`);
  // dependencies stand for their thousand files by the lock file (they change only with it)
  const inputs = [...Object.keys(result.metafile.inputs).filter((f) => !f.includes('node_modules/')), 'package-lock.json'];
  writeFileSync(metaTmp, `${JSON.stringify({ startedAt, inputs })}\n`);
  renameSync(metaTmp, join(outDir, META));
  return out;
}

// `node src/cli/bundle.mjs`: the build step (npm run build, build:cli)
if (process.argv[1] && pathToFileURL(resolve(process.argv[1])).href === import.meta.url) {
  const out = await bundleCli();
  console.log(`recompute command bundled: ${out.slice(ROOT.length + 1)}`);
}
