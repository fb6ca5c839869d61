/*
 * `npm run solve -- FILE [--json] [--units metric|imperial|aviation]`: recomputes a case file in
 * Node, with no browser, and prints the same summary text as the popup copies (byte for byte, for
 * the same units), or every result with its interval as JSON. A second reviewer checks a shared case
 * this way. Errors name the field.
 *
 * Never run from TypeScript: `npm run build` bundles it once to dist-cli/solve.mjs (bundle.mjs) and
 * `npm run solve` runs that bundle (run.mjs), rebuilding it only when a source changed. Through a
 * loader every imported binding becomes a getter call and the whole engine is compiled on each start.
 */
import { readFileSync, statSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { isMainThread, parentPort, workerData } from 'node:worker_threads';
import { analyseCase, analyseCaseBeside, framesOnly, MAX_CASE_FILE_BYTES, parseCaseFile, summaryText, type CaseRecord, type UnitSystem } from '../case';
import { framesOnThread } from './frames-thread';
// bundled in (only this field): the bundle reads no package.json at run time, wherever it lies
import { version } from '../../package.json';

/*
 * A case of many marked frames solves its frames on a second thread while this one fits the pass
 * (the same figures, byte for byte: test/cli/solve.test.ts runs both ways). Below a few dozen
 * frames, or on one processor, starting a thread costs more than it saves. CLIP_CALIPER_THREADS=1
 * keeps everything on one thread.
 */
const BESIDE_MIN_FRAMES = 24;
function besideWorthIt(c: CaseRecord): boolean {
  if (process.env.CLIP_CALIPER_THREADS === '1' || availableParallelism() < 2) return false;
  return c.marks.filter((m) => m.kind === 'object-span').length >= BESIDE_MIN_FRAMES;
}

if (!isMainThread) parentPort!.postMessage(framesOnly((workerData as { c: CaseRecord }).c));
else await main();

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const file = args.find((a) => !a.startsWith('--') && args[args.indexOf(a) - 1] !== '--units');
  const units = (args.includes('--units') ? args[args.indexOf('--units') + 1] : 'metric') as UnitSystem;

  function fail(message: string): never {
    process.stderr.write(`solve: ${message}\n`);
    process.exit(1);
  }

  if (!file) fail('usage: npm run solve -- FILE [--json] [--units metric|imperial|aviation]');
  if (!['metric', 'imperial', 'aviation'].includes(units)) fail(`--units: got "${units}"; allowed: metric, imperial, aviation`);
  let size = 0;
  try {
    size = statSync(file).size;
  } catch {
    fail(`${file}: no such file`);
  }
  if (size > MAX_CASE_FILE_BYTES) fail(`${file}: larger than ${MAX_CASE_FILE_BYTES} bytes`);
  try {
    const c = parseCaseFile(readFileSync(file, 'utf8'));
    const analysis = besideWorthIt(c) ? await analyseCaseBeside(c, framesOnThread) : analyseCase(c);
    if (args.includes('--json')) {
      process.stdout.write(`${JSON.stringify({ case: c.id, toolVersion: version, analysis }, (k, v) => (k === 'objectMark' || k === 'landmarkMark' ? v?.id ?? null : v), 2)}\n`);
    } else {
      process.stdout.write(summaryText(c, analysis, { format: 'text', system: units, toolVersion: version }));
    }
  } catch (e) {
    fail((e as Error).message);
  }
}
