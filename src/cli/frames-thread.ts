import { Worker } from 'node:worker_threads';
import type { CaseRecord, PortableFrames } from '../case';

/*
 * The frames of a case solved on a worker thread running this same bundle (solve.ts answers as the
 * worker when it is not the main thread). Rejects if the thread fails to start or dies, and the
 * caller then solves the frames itself.
 */
export function framesOnThread(c: CaseRecord): Promise<PortableFrames> {
  return new Promise((resolve, reject) => {
    const w = new Worker(new URL(import.meta.url), { workerData: { c } });
    w.once('message', (p: PortableFrames) => resolve(p));
    w.once('error', reject);
    w.once('exit', (code) => reject(new Error(`the frames' thread ended (${code})`)));
  });
}
