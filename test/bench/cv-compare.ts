import { createRequire } from 'node:module';
import { resolve } from 'node:path';
import type { Gray } from '../../src/engine/gray';
import { cutBlock, cutTemplate, matchTemplate } from '../../src/engine/match';
import { renderGray, sceneNamed, truthEnds } from '../engine/follow-scenes';

/*
 * Side-by-side: the follow's hand-written NCC match (src/engine/match.ts) against OpenCV's
 * matchTemplate (TM_CCOEFF_NORMED, the same normalised cross-correlation) from the npm package
 * @techstark/opencv-js, on the same 1280 x 720 frames of the invented scene fixed-large and the
 * same search (a 33 x 33 patch around the object's end, 12 px either way). Not part of
 * `npm run bench`: the package is not a dependency (DEVELOPERS.md, "Computer vision"). To run it,
 * install the package in a scratch folder and point OPENCV_JS at its dist/opencv.js:
 *
 *   (cd /tmp/cvtry && npm i @techstark/opencv-js)
 *   OPENCV_JS=/tmp/cvtry/node_modules/@techstark/opencv-js/dist/opencv.js \
 *     node_modules/.bin/esbuild test/bench/cv-compare.ts --bundle --platform=node --format=esm \
 *     --outfile=node_modules/.cache/cv-compare.mjs && node node_modules/.cache/cv-compare.mjs
 */

interface Mat {
  delete(): void;
  data32F: Float32Array;
  cols: number;
  rows: number;
}
interface Cv {
  CV_32F: number;
  TM_CCOEFF_NORMED: number;
  Mat: new () => Mat;
  matFromArray(rows: number, cols: number, type: number, data: ArrayLike<number>): Mat;
  matchTemplate(img: Mat, tpl: Mat, out: Mat, method: number): void;
  minMaxLoc(m: Mat): { maxVal: number; maxLoc: { x: number; y: number } };
  onRuntimeInitialized?: () => void;
}

async function loadCv(path: string): Promise<{ cv: Cv; ms: number }> {
  const t0 = performance.now();
  const req = createRequire(import.meta.url);
  const mod = req(resolve(path)) as Cv;
  // the module is a thenable that resolves to itself: never hand it to a promise's resolve, which
  // would follow its then for ever; wait for the runtime instead, wrapped
  const { cv } = await new Promise<{ cv: Cv }>((done) => {
    if ((mod as { Mat?: unknown }).Mat) done({ cv: mod });
    else mod.onRuntimeInitialized = () => done({ cv: mod });
  });
  return { cv, ms: performance.now() - t0 };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1]!;
}

function time(reps: number, runs: number, fn: () => void): number {
  fn();
  return median(
    Array.from({ length: runs }, () => {
      const t0 = performance.now();
      for (let i = 0; i < reps; i++) fn();
      return ((performance.now() - t0) / reps) * 1000;
    }),
  );
}

const path = process.env.OPENCV_JS;
if (!path) throw new Error('OPENCV_JS: the path of opencv.js (see the comment at the top)');
const { cv, ms: loadMs } = await loadCv(path);
const scene = sceneNamed('fixed-large', { width: 1280, height: 720 });
const a: Gray = renderGray(scene, 50);
const b: Gray = renderGray(scene, 51);
const ta = truthEnds(scene, 50);
const tb = truthEnds(scene, 51);
const SIDE = 33;
const R = 12;
const left = Math.round(ta.x1) - (SIDE >> 1);
const top = Math.round(ta.y1) - (SIDE >> 1);
const tpl = cutTemplate(a, left, top, SIDE, SIDE);
if (!tpl) throw new Error('flat patch');
const truth = { dx: tb.x1 - ta.x1, dy: tb.y1 - ta.y1 };

const hand = matchTemplate(b, tpl, 0, 0, R);
const handUs = time(200, 7, () => matchTemplate(b, tpl, 0, 0, R));

// OpenCV: the same region (shifts -R-1..R+1, one more for the sub-pixel parabola), the same parabola
const tplMat = cv.matFromArray(SIDE, SIDE, cv.CV_32F, cutBlock(a, left, top, SIDE, SIDE));
const m = R + 1;
const cvMatch = () => {
  const reg = cv.matFromArray(SIDE + 2 * m, SIDE + 2 * m, cv.CV_32F, cutBlock(b, left - m, top - m, SIDE + 2 * m, SIDE + 2 * m));
  const res = new cv.Mat();
  cv.matchTemplate(reg, tplMat, res, cv.TM_CCOEFF_NORMED);
  const { maxVal, maxLoc } = cv.minMaxLoc(res);
  const at = (x: number, y: number) => res.data32F[y * res.cols + x]!;
  const sub = (l: number, c: number, r: number) => (l - 2 * c + r < 0 ? (0.5 * (l - r)) / (l - 2 * c + r) : 0);
  const x = maxLoc.x;
  const y = maxLoc.y;
  const ux = x > 0 && x < res.cols - 1 ? sub(at(x - 1, y), maxVal, at(x + 1, y)) : 0;
  const uy = y > 0 && y < res.rows - 1 ? sub(at(x, y - 1), maxVal, at(x, y + 1)) : 0;
  reg.delete();
  res.delete();
  return { dx: x - m + ux, dy: y - m + uy, score: maxVal };
};
const ocv = cvMatch();
const cvUs = time(200, 7, cvMatch);
tplMat.delete();

console.log(`opencv.js loaded and initialised in ${loadMs.toFixed(0)} ms`);
console.log(`true shift of the end (frame 50 -> 51): ${truth.dx.toFixed(3)}, ${truth.dy.toFixed(3)} px`);
console.log(`hand-written NCC, coarse to fine: ${hand.dx.toFixed(3)}, ${hand.dy.toFixed(3)} px, peak ${hand.score.toFixed(4)}; median ${handUs.toFixed(0)} us per match`);
console.log(`opencv matchTemplate TM_CCOEFF_NORMED, exhaustive: ${ocv.dx.toFixed(3)}, ${ocv.dy.toFixed(3)} px, peak ${ocv.score.toFixed(4)}; median ${cvUs.toFixed(0)} us per match`);
