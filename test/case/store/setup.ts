import { createCaseStore, type CaseStore } from '../../../src/case/store/case-store';
import type { Mark, VideoInfo } from '../../../src/case/schema';
import { MemoryArea } from './memory-area';

/* A store over in-memory areas, with a clock the test moves. Every page, title and figure is invented. */
export interface Rig {
  store: CaseStore;
  local: MemoryArea;
  session: MemoryArea;
  clock: { t: number };
}

export function rig(areas: { local?: MemoryArea; session?: MemoryArea } = {}): Rig {
  const local = areas.local ?? new MemoryArea();
  const session = areas.session ?? new MemoryArea();
  const clock = { t: Date.UTC(2026, 11, 2, 10, 0, 0) };
  const store = createCaseStore({ local, session, now: () => clock.t, toolVersion: () => '9.9.9-invented' });
  return { store, local, session, clock };
}

/** The same areas, a new store: what a worker the browser stopped and started again sees. */
export function restartWorker(r: Rig): Rig {
  const again = rig({ local: r.local, session: r.session });
  again.clock.t = r.clock.t;
  return again;
}

export const video = (n: string): VideoInfo => ({ pageUrl: `http://127.0.0.1:9/invented-${n}`, pageTitle: `Invented clip ${n}`, src: '', width: 640, height: 360, duration: 5 });
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 } as const;
export const mark = (id: string, x: number, t = 1): Mark =>
  ({ id, kind: 'object-span', t, points: [{ x, y: 100 }, { x: x + 30, y: 101 }], edgeSigmaPx: 0.5, dimension: 'wingspan', mapping, createdAt: 1 }) as Mark;
