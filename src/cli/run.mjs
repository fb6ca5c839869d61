// `npm run solve -- FILE ...`: runs the bundled recompute command (dist-cli/solve.mjs, written by
// `npm run build`), bundling it first only when it is missing or a source is newer. The check is a
// few stat calls; esbuild is loaded only when a build is due.
import { pathToFileURL } from 'node:url';
import { bundleCli, bundlePath, staleness } from './bundle.mjs';

// silent: what the command prints stays exactly what solve.ts prints
if (staleness() !== null) await bundleCli();
await import(pathToFileURL(bundlePath()).href);
