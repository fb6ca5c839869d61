import { readFileSync } from 'node:fs';
import { analyseCase } from '../../src/case/analysis';
import { defaultAssumptions } from '../../src/case/assumptions';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import type { CaseRecord, Mark } from '../../src/case/schema';

/*
 * The popup's recompute when an assumption changes: analyseCase on a typical case, the invented
 * pass-tracked clip marked at three timestamps with the mast on each and the observer's speed given
 * (20 000 draws per timestamp, the fit's 2 000, as the popup runs it). Target: one display frame.
 * Prints figures; asserts nothing.
 */
const FRAME_MS = 1000 / 60;
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };

function typicalCase(): CaseRecord {
  const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8'));
  const video = { pageUrl: 'http://127.0.0.1/invented', pageTitle: 'Invented clip', src: '', width: 640, height: 360, duration: truth.video.duration };
  let c = newCase('bench-case', video, '0.1.0', 1);
  const span = (id: string, kind: Mark['kind'], t: number, p: Record<'x1' | 'y1' | 'x2' | 'y2', number>): Mark => ({
    id,
    kind,
    t,
    points: [{ x: p.x1, y: p.y1 }, { x: p.x2, y: p.y2 }],
    edgeSigmaPx: 0.5,
    mapping,
    createdAt: 1,
  });
  const frames = truth.frames.slice(0, 3);
  frames.forEach((f: { t: number; object: Record<'x1' | 'y1' | 'x2' | 'y2', number>; landmarks: ({ id: string } & Record<'x1' | 'y1' | 'x2' | 'y2', number>)[] }, i: number) => {
    c = upsertMark(c, { ...span(`o${i}`, 'object-span', f.t, f.object), dimension: 'wingspan' }, 2);
    const mast = f.landmarks.find((l) => l.id === 'mast');
    if (mast) c = upsertMark(c, { ...span(`l${i}`, 'landmark-span', f.t, mast), landmarkId: 'mast' }, 2);
  });
  return withAssumptions(c, { ...defaultAssumptions(), observerSpeedMs: { lo: 24, hi: 26 } }, 3);
}

export function caseBench(): void {
  const c = typicalCase();
  const until = performance.now() + 400;
  while (performance.now() < until) analyseCase(c);
  const times: number[] = [];
  for (let i = 0; i < 30; i++) {
    const t0 = performance.now();
    analyseCase(c);
    times.push(performance.now() - t0);
  }
  times.sort((a, b) => a - b);
  const ms = times[times.length >> 1]!;
  console.log(
    `popup recompute, typical case (3 timestamps with a landmark, the fit): median ${ms.toFixed(2)} ms = ` +
      `${(ms / FRAME_MS).toFixed(2)} of a 16.7 ms frame (target < 1: ${ms < FRAME_MS ? 'within' : 'OVER'})`,
  );
}
