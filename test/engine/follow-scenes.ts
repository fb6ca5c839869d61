import { resolve } from 'node:path';
import { pathToFileURL } from 'node:url';
import type { Gray } from '../../src/engine/gray';

/*
 * Frames of the fixture scenes rendered in memory, for the follower's tests and bench: the same
 * pixels test/fixtures/generate.mjs pipes to the encoder (its renderFrame, written out again here
 * because the generator is a script), read as BT.709 luma before any rounding or encoding, and the
 * exact truth of each frame from the fixture library (frameTruth, frameTruth2). Every scene is
 * invented (test/fixtures/README.md).
 *
 * The library is plain JavaScript without declarations; it is loaded by path from the project root
 * (vitest and `npm run bench` both run there) and given the few types used here.
 */

export interface Pt {
  x: number;
  y: number;
}
export interface Ends {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}
interface Box {
  left: number;
  top: number;
  width: number;
  height: number;
}
export interface Scene {
  name: string;
  truthVersion?: number;
  video: { width: number; height: number; fps: number; frames: number };
  cameraFrame: Box;
  bars: string;
  markedFrames: number[];
}
interface Picture {
  width: number;
  height: number;
  rgb: Float32Array;
  shade(fn: (x: number, y: number) => number[]): void;
  fill(pts: number[], color: number[]): void;
  fillUnion(union: number[][], color: number[]): void;
  paste(src: Picture, left: number, top: number): void;
  block(x: number, y: number, w: number, h: number, color: number[]): void;
  luma(i: number, j: number): number;
}
interface Pose {
  cx: number;
  cy: number;
}
interface Polygon {
  pts: number[];
  union?: number[][];
  color: number[];
}
interface Lib {
  Picture: new (w: number, h: number) => Picture;
  blurFill(src: Picture, w: number, h: number, radius: number, dim: number): Picture;
  poseAt(scene: Scene, t: number): Pose;
  frameTime(scene: Scene, i: number): number;
  skyAt(pose: Pose, x: number, y: number): number[];
  framePolygons(scene: Scene, pose: Pose): Polygon[];
  frameCodeOrigin(video: Scene['video']): Pt;
  frameCodeBits(i: number): number[];
  FRAME_CODE: { bits: number; cellPx: number };
  scenes(): Scene[];
  matrixScenes(): Scene[];
  frameTruth(scene: Scene, i: number): { object: Ends };
  frameTruth2(scene: Scene, i: number): { object: Ends };
}

async function load(): Promise<Lib> {
  const at = (f: string) => import(pathToFileURL(resolve('test/fixtures/lib', f)).href) as Promise<Record<string, unknown>>;
  const parts = await Promise.all(['raster.mjs', 'geometry.mjs', 'truth.mjs', 'world.mjs', 'measure.mjs', 'scenes.mjs', 'matrix.mjs', 'truth2.mjs'].map(at));
  return Object.assign({}, ...parts) as Lib;
}

const lib: Lib = await load();

/** A fixture scene by name (either set), optionally re-sized to a whole-picture video of w x h. */
export function sceneNamed(name: string, size?: { width: number; height: number }): Scene {
  const s = [...lib.scenes(), ...lib.matrixScenes()].find((x) => x.name === name);
  if (!s) throw new Error(`no fixture scene ${name}`);
  if (!size) return s;
  // the focal length follows the camera frame's width, so the same scene is drawn at a finer scale
  return { ...s, video: { ...s.video, ...size }, cameraFrame: { left: 0, top: 0, ...size }, bars: 'none' };
}

/** The generator's renderFrame: sky, ground and standing things, bars, and the burnt-in frame code. */
export function renderPicture(scene: Scene, index: number): Picture {
  const fr = scene.cameraFrame;
  const pose = lib.poseAt(scene, lib.frameTime(scene, index));
  const local = { ...pose, cx: pose.cx - fr.left, cy: pose.cy - fr.top };
  const cam = new lib.Picture(fr.width, fr.height);
  cam.shade((x, y) => lib.skyAt(local, x, y));
  for (const p of lib.framePolygons(scene, local)) {
    if (p.union) cam.fillUnion(p.union, p.color);
    else cam.fill(p.pts, p.color);
  }
  const video = scene.bars === 'blur' ? lib.blurFill(cam, scene.video.width, scene.video.height, 14, 0.6) : new lib.Picture(scene.video.width, scene.video.height);
  video.paste(cam, fr.left, fr.top);
  const o = lib.frameCodeOrigin(scene.video);
  const c = lib.FRAME_CODE.cellPx;
  video.block(o.x - 2, o.y - 2, lib.FRAME_CODE.bits * c + 4, c + 4, [0, 0, 0]);
  // the code has 8 bits: a longer clip (the follow page's bench) wraps it, as nothing reads it there
  lib.frameCodeBits(index % 256).forEach((b, k) => video.block(o.x + k * c, o.y, c, c, b ? [255, 255, 255] : [0, 0, 0]));
  return video;
}

/** A rendered frame as one-channel luma (the Gray the engine reads), unrounded. */
export function renderGray(scene: Scene, index: number): Gray {
  const pic = renderPicture(scene, index);
  const data = new Float32Array(pic.width * pic.height);
  for (let j = 0; j < pic.height; j++) for (let i = 0; i < pic.width; i++) data[j * pic.width + i] = pic.luma(i, j);
  return { data, width: pic.width, height: pic.height, channels: 1 };
}

/** The exact projected ends of the object's marked span in frame index (left end first). */
export function truthEnds(scene: Scene, index: number): Ends {
  return (scene.truthVersion === 2 ? lib.frameTruth2(scene, index) : lib.frameTruth(scene, index)).object;
}
