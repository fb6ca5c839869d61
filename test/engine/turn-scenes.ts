import type { Gray } from '../../src/engine/gray';
import type { LandscapeCamera } from '../../src/engine/ground-motion';

/*
 * The fixture generator's own scenes rendered in memory (test/fixtures/lib, the same Picture
 * rasteriser and world as `npm run fixtures`), with the exact truth from its geometry: the camera pose
 * per frame (poseAt), the fixed point on the ground (fixedPointGround) and its projection. Every scene
 * is invented. The libraries are plain ESM without types, so they are loaded through a typed import.
 */

export interface Vec3 {
  x: number;
  y: number;
  z: number;
}

export interface Pose {
  t: number;
  pos: Vec3;
  yaw: number;
  pitch: number;
  roll: number;
  f: number;
  cx: number;
  cy: number;
}

export interface Scene {
  name: string;
  video: { width: number; height: number; fps: number; frames: number };
  cameraFrame: { left: number; top: number; width: number; height: number };
  camera: { height: number; speed: number; mode: string };
  landmarks: { id: string; groundX: number; groundY: number; atFixedPoint?: boolean }[];
}

interface Geometry {
  poseAt(scene: Scene, t: number): Pose;
  project(pose: Pose, p: Vec3): { x: number; y: number; depth: number } | null;
  fixedPointGround(scene: Scene): { x: number; y: number; fraction: number };
  objectAt(scene: Scene, t: number): Vec3;
}

interface PictureT {
  width: number;
  height: number;
  rgb: Float32Array;
  shade(fn: (x: number, y: number) => number[]): void;
  fill(pts: number[] | null, color: number[]): void;
  fillUnion(polys: (number[] | null)[], color: number[]): void;
}

interface Lib {
  geo: Geometry;
  scenes: () => Scene[];
  Picture: new (w: number, h: number) => PictureT;
  framePolygons: (scene: Scene, pose: Pose) => { pts?: number[] | null; union?: (number[] | null)[]; color: number[] }[];
  skyAt: (pose: Pose, x: number, y: number) => number[];
}

const LIB = new URL('../fixtures/lib/', import.meta.url).href;

async function load<T>(name: string): Promise<T> {
  const spec: string = LIB + name;
  return (await import(/* @vite-ignore */ spec)) as T;
}

let cached: Lib | null = null;

export async function fixtureLib(): Promise<Lib> {
  if (cached) return cached;
  const geo = await load<Geometry>('geometry.mjs');
  const sc = await load<{ scenes: () => Scene[] }>('scenes.mjs');
  const raster = await load<{ Picture: Lib['Picture'] }>('raster.mjs');
  const world = await load<{ framePolygons: Lib['framePolygons']; skyAt: Lib['skyAt'] }>('world.mjs');
  cached = { geo, scenes: sc.scenes, Picture: raster.Picture, framePolygons: world.framePolygons, skyAt: world.skyAt };
  return cached;
}

export function sceneNamed(lib: Lib, name: string): Scene {
  const s = lib.scenes().find((x) => x.name === name);
  if (!s) throw new Error(`no fixture scene ${name}`);
  return s;
}

/** frame i shows the scene at (i + 0.5) / fps, as in the generator (truth.mjs frameTime) */
export function frameTime(scene: Scene, i: number): number {
  return (i + 0.5) / scene.video.fps;
}

/** The pose in camera-frame pixels (the scenes used here have no bars, so video = camera frame). */
export function poseOf(lib: Lib, scene: Scene, i: number): Pose {
  const pose = lib.geo.poseAt(scene, frameTime(scene, i));
  const fr = scene.cameraFrame;
  return { ...pose, cx: pose.cx - fr.left, cy: pose.cy - fr.top };
}

export interface Car {
  /** left edge at frame 0, px, and its motion in px per frame */
  x0: number;
  vx: number;
  top: number;
  width: number;
  height: number;
}

/**
 * Frame i as 8-bit RGBA (what a canvas gives), rendered as generate.mjs renders it, optionally with a
 * "car": a two-tone box painted over the ground that moves on its own, not with the landscape.
 */
export function renderFrame(lib: Lib, scene: Scene, i: number, car?: Car): Gray {
  const fr = scene.cameraFrame;
  const pose = poseOf(lib, scene, i);
  const pic = new lib.Picture(fr.width, fr.height);
  pic.shade((x, y) => lib.skyAt(pose, x, y));
  for (const p of lib.framePolygons(scene, pose)) {
    if (p.union) pic.fillUnion(p.union, p.color);
    else pic.fill(p.pts ?? null, p.color);
  }
  if (car) {
    const left = car.x0 + car.vx * i;
    const body = [left, car.top, left + car.width, car.top, left + car.width, car.top + car.height, left, car.top + car.height];
    pic.fill(body, [200, 40, 40]);
    const w3 = car.width / 3;
    const glass = [left + w3, car.top, left + 2 * w3, car.top, left + 2 * w3, car.top + car.height / 2, left + w3, car.top + car.height / 2];
    pic.fill(glass, [30, 40, 60]);
  }
  const data = new Uint8ClampedArray(fr.width * fr.height * 4);
  for (let m = 0; m < fr.width * fr.height; m++) {
    data[4 * m] = pic.rgb[3 * m]!;
    data[4 * m + 1] = pic.rgb[3 * m + 1]!;
    data[4 * m + 2] = pic.rgb[3 * m + 2]!;
    data[4 * m + 3] = 255;
  }
  return { data, width: fr.width, height: fr.height, channels: 4 };
}

/** The landscape camera of frame i from the scene's exact pose (focal length, centre, pitch, roll). */
export function cameraOf(lib: Lib, scene: Scene, i: number): LandscapeCamera {
  const p = poseOf(lib, scene, i);
  return { focalPx: p.f, cx: p.cx, cy: p.cy, pitchRad: p.pitch, rollRad: p.roll };
}

/** Exact yaw step between frames i and i + 1 (poseAt), rad, positive to the left. */
export function yawStep(lib: Lib, scene: Scene, i: number): number {
  return poseOf(lib, scene, i + 1).yaw - poseOf(lib, scene, i).yaw;
}

/**
 * The exact motion between frames i and i + 1 in the fit's terms (ground-motion.ts): yaw, pitch and
 * roll steps from poseAt, and the camera's displacement in frame i's heading in camera heights.
 */
export function truthTheta(lib: Lib, scene: Scene, i: number): Float64Array {
  const p0 = poseOf(lib, scene, i);
  const p1 = poseOf(lib, scene, i + 1);
  const dx = p1.pos.x - p0.pos.x;
  const dy = p1.pos.y - p0.pos.y;
  const h = scene.camera.height;
  return Float64Array.from([
    p1.yaw - p0.yaw,
    p1.pitch - p0.pitch,
    p1.roll - p0.roll,
    (dx * Math.cos(p0.yaw) + dy * Math.sin(p0.yaw)) / h,
    (-dx * Math.sin(p0.yaw) + dy * Math.cos(p0.yaw)) / h,
    0,
  ]);
}

/** The object's centre in frame i and its image displacement to frame i + 1 (exact projections). */
export function objectMotion(lib: Lib, scene: Scene, i: number): { x: number; y: number; dx: number; dy: number } {
  const p0 = poseOf(lib, scene, i);
  const p1 = poseOf(lib, scene, i + 1);
  const a = lib.geo.project(p0, lib.geo.objectAt(scene, p0.t))!;
  const b = lib.geo.project(p1, lib.geo.objectAt(scene, p1.t))!;
  return { x: a.x, y: a.y, dx: b.x - a.x, dy: b.y - a.y };
}

/** A ground point's image in frame i (exact projection), or null behind the camera. */
export function groundPixel(lib: Lib, scene: Scene, i: number, gx: number, gy: number): { x: number; y: number } | null {
  return lib.geo.project(poseOf(lib, scene, i), { x: gx, y: gy, z: 0 });
}
