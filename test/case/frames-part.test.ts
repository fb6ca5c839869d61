import { describe, expect, it } from 'vitest';
import { analyseCase } from '../../src/case/analysis';
import { analyseCaseBeside, framesOnly } from '../../src/case/frames-part';
import { bigCase } from './big-case';

/*
 * The frames solved on another thread (the command-line recompute's worker) must give what one
 * thread gives. Held here against analyseCase itself on the invented pass (big-case.ts), with the
 * frames crossing through structuredClone as a worker's message does; the printed bytes are held
 * against the goldens in test/cli/solve.test.ts.
 */
const opts = { draws: 2_000, seriesDraws: 200 };
const c = bigCase({ timestamps: 12 });

describe('analyseCaseBeside', () => {
  it('gives the same analysis as analyseCase when the frames cross a thread boundary', async () => {
    const here = analyseCase(c, opts);
    const beside = await analyseCaseBeside(c, async (copy) => structuredClone(framesOnly(structuredClone(copy), opts)), opts);
    expect(JSON.stringify(beside)).toBe(JSON.stringify(here));
    // the frames point at this thread's own marks, not at copies
    expect(beside.timestamps.every((ts) => c.marks.includes(ts.objectMark))).toBe(true);
    expect(beside.timestamps.some((ts) => ts.fitted !== null)).toBe(true);
  });

  it('solves the frames itself when the other thread fails', async () => {
    const here = analyseCase(c, opts);
    const beside = await analyseCaseBeside(c, () => Promise.reject(new Error('no thread')), opts);
    expect(JSON.stringify(beside)).toBe(JSON.stringify(here));
  });
});
