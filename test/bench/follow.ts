import { follow, framesOf } from '../../src/engine/follow';
import type { Gray } from '../../src/engine/gray';
import { cutTemplate, matchTemplate } from '../../src/engine/match';
import { renderPicture, sceneNamed, truthEnds } from '../engine/follow-scenes';

/*
 * Following the object (issue 15 point 1) on 1280 x 720 frames: the invented fixture scene
 * fixed-large (a fixed camera; the aircraft drifts across the picture and turns) rendered at twice
 * its clip's size by the fixture library, as RGBA bytes the way a canvas hands them over. Median of
 * RUNS follows after a warm-up, per frame, and projected to the issue's clip: 10 s at 30 fps in at
 * most 10 s on this two-core machine (the frame decoding is not counted: the browser does it). Also
 * the template match alone (both ends' patches are matched once per frame). Prints, asserts nothing.
 */
const FRAMES = 20;
const FIRST = 40;
const RUNS = 7;
const CLIP_FRAMES = 300;
const TARGET_S = 10;

function rgba(scene: ReturnType<typeof sceneNamed>, index: number): Gray {
  const pic = renderPicture(scene, index);
  const data = new Uint8ClampedArray(pic.width * pic.height * 4);
  for (let k = 0, n = pic.width * pic.height; k < n; k++) {
    data[4 * k] = pic.rgb[3 * k]!;
    data[4 * k + 1] = pic.rgb[3 * k + 1]!;
    data[4 * k + 2] = pic.rgb[3 * k + 2]!;
    data[4 * k + 3] = 255;
  }
  return { data, width: pic.width, height: pic.height, channels: 4 };
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1]!;
}

export function followBench(): void {
  const scene = sceneNamed('fixed-large', { width: 1280, height: 720 });
  const frames = Array.from({ length: FRAMES }, (_, k) => rgba(scene, FIRST + k));
  const mid = FRAMES >> 1;
  const t = truthEnds(scene, FIRST + mid);
  const seed = { frame: mid, ends: [{ x: t.x1, y: t.y1, sigmaPx: 0.5 }, { x: t.x2, y: t.y2, sigmaPx: 0.5 }] } as const;
  const src = framesOf(frames);
  let followed = 0;
  const once = () => {
    const t0 = performance.now();
    const run = follow(src, seed);
    const ms = performance.now() - t0;
    followed = run.frames.filter((f) => f.status === 'followed').length;
    return ms / FRAMES;
  };
  once();
  const perFrame = median(Array.from({ length: RUNS }, once));
  const clipS = (perFrame * CLIP_FRAMES) / 1000;
  console.log(
    `follow, 1280 x 720 RGBA, ${FRAMES} frames (${followed} followed, span ${Math.hypot(t.x2 - t.x1, t.y2 - t.y1).toFixed(0)} px): median ${perFrame.toFixed(2)} ms per frame of ${RUNS} runs; ` +
      `10 s at 30 fps would take ${clipS.toFixed(2)} s (target <= ${TARGET_S} s: ${clipS <= TARGET_S ? 'within' : 'OVER'})`,
  );
  // the match alone: a 33 x 33 patch (the largest the follow cuts) searched within 12 px
  const tpl = cutTemplate(frames[0]!, Math.round(t.x1) - 16, Math.round(t.y1) - 16, 33, 33);
  if (!tpl) return;
  const img = frames[1]!;
  const reps = 200;
  const times = Array.from({ length: RUNS }, () => {
    const t0 = performance.now();
    for (let i = 0; i < reps; i++) matchTemplate(img, tpl, 0.3, -0.2, 12);
    return (performance.now() - t0) / reps;
  });
  console.log(`NCC template match, 33 x 33 patch, radius 12 px, coarse to fine: median ${(median(times) * 1000).toFixed(0)} us per match of ${RUNS} runs of ${reps}`);
}
