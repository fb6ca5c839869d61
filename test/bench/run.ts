import { engineBench, type BenchRow } from './engine';
import { overlayBench } from './overlay';
import { caseBench } from './case';
import { importBench } from './import';
import { logBench } from './log';
import { largeCaseBench } from './large-case';
import { popupLargeBench } from './popup-large';
import { validateBench } from './validate';
import { followBench } from './follow';
import { turnBench } from './turn';
import { followPageBench } from './follow-page';

// `npm run bench`: prints figures, asserts nothing. Targets are stated beside the figures.
const TARGET_FRAME_SHARE = 0.25;

function print(rows: BenchRow[]): void {
  for (const r of rows) {
    const ok = r.frameShare < TARGET_FRAME_SHARE ? 'within' : 'OVER';
    console.log(
      `${r.name}: median ${r.medianMs.toFixed(2)} ms = ${r.frameShare.toFixed(3)} of a 16.7 ms frame ` +
        `(target < ${TARGET_FRAME_SHARE}: ${ok}); heap growth ${Math.round(r.heapBytesPerSolve)} B per solve, ` +
        `${r.heapBytesPerDraw.toFixed(2)} B more per extra draw`,
    );
  }
}

console.log(`engine benchmark on ${process.version}, ${(await import('node:os')).cpus().length} cores`);
print(engineBench());
caseBench();
largeCaseBench();
validateBench();
turnBench();
await importBench();
followBench();

await overlayBench();
await logBench();
await popupLargeBench();
await followPageBench();
