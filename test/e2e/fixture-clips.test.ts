import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { chromium, type Browser, type Page } from 'playwright-core';
import { existsSync, readFileSync, readdirSync, statSync } from 'node:fs';
import { join, resolve } from 'node:path';
import { CHROMIUM_ARGS, chromiumPath } from './harness';
import { startServer, type TestServer } from '../../extension/tools/static-server';

/*
 * The committed fixture clips (invented scenes, test/fixtures/) against their truth files. Node-side
 * checks read the WebM container and recompute the geometry independently of the generator; the
 * browser checks decode each clip in Chromium, seek to every marked frame and find the object's ends
 * in the pixels. No ffmpeg here: CI has none.
 */

const CLIPS = resolve('test/fixtures/clips');
const MAX_TOTAL_BYTES = 3 * 1024 * 1024;

interface Ends {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}
interface Point3 {
  x: number;
  y: number;
  z: number;
}
interface LandmarkTruth extends Ends {
  id: string;
  range: number;
  horizontalRange: number;
  angularSizeRad: number;
}
interface FrameTruth {
  t: number;
  index: number;
  object: Ends;
  objectCentre: { x: number; y: number };
  objectRange: number;
  objectHorizontalRange: number;
  angularSizeRad: number;
  landmarks: LandmarkTruth[];
  fixedPoint: { distanceFromRoadM: number; fraction: number };
  observerSpeed: number;
  objectSpeed: number;
  observer: Point3;
  objectPosition: Point3;
  camera: { yawRad: number; pitchRad: number };
}
interface Truth {
  invented: boolean;
  note: string;
  name: string;
  video: { width: number; height: number; fps: number; frames: number; duration: number };
  cameraFrame: { left: number; right: number; top: number; bottom: number };
  bars: 'none' | 'black' | 'blur';
  camera: { hfovDeg: number; mode: 'tracked' | 'fixed'; speed: number; height: number; pitchDeg?: number };
  object: { sizeM: number; dimension: string; trackDistanceM: number; altitudeM: number; speed: number };
  landmarks: {
    id: string;
    sizeM: number;
    dimension: 'height' | 'width';
    groundX: number;
    groundY: number;
    atFixedPoint: boolean;
    wallHeightM?: number;
  }[];
  fixedPoint: { distanceFromRoadM: number; fraction: number; groundX: number; groundY: number };
  laneCycleM: number;
  frameCode: { x: number; y: number; cellPx: number; bits: number };
  frames: FrameTruth[];
}

const names = readdirSync(CLIPS)
  .filter((f) => f.endsWith('.truth.json'))
  .map((f) => f.slice(0, -'.truth.json'.length))
  .sort();
const truths = new Map<string, Truth>(names.map((n) => [n, JSON.parse(readFileSync(join(CLIPS, `${n}.truth.json`), 'utf8')) as Truth]));

function truthOf(name: string): Truth {
  const t = truths.get(name);
  if (!t) throw new Error(`no truth for ${name}`);
  return t;
}

// ---- WebM container (EBML), read in Node --------------------------------------------------------

interface Container {
  width: number;
  height: number;
  durationS: number;
  blocks: number;
}

const MASTERS = new Set([0x18538067, 0x1549a966, 0x1654ae6b, 0xae, 0xe0, 0x1f43b675, 0xa0]);

function vint(b: Uint8Array, p: number, keepMarker: boolean): { value: number; length: number; unknown: boolean } {
  const first = b[p] ?? 0;
  let length = 1;
  let mask = 0x80;
  while (length <= 8 && (first & mask) === 0) {
    mask >>= 1;
    length++;
  }
  if (length > 8) throw new Error(`bad EBML length at ${p}`);
  let value = keepMarker ? first : first & (mask - 1);
  let allOnes = value === mask - 1;
  for (let i = 1; i < length; i++) {
    const byte = b[p + i] ?? 0;
    value = value * 256 + byte;
    if (byte !== 0xff) allOnes = false;
  }
  return { value, length, unknown: !keepMarker && allOnes };
}

function readUint(b: Uint8Array, p: number, n: number): number {
  let v = 0;
  for (let i = 0; i < n; i++) v = v * 256 + (b[p + i] ?? 0);
  return v;
}

function readContainer(file: string): Container {
  const b = new Uint8Array(readFileSync(file));
  const view = new DataView(b.buffer, b.byteOffset, b.byteLength);
  const out: Container = { width: 0, height: 0, durationS: 0, blocks: 0 };
  let timecodeScale = 1_000_000;
  let durationTicks = 0;
  const walk = (start: number, end: number): void => {
    let p = start;
    while (p < end) {
      const id = vint(b, p, true);
      const size = vint(b, p + id.length, false);
      const data = p + id.length + size.length;
      const stop = size.unknown ? end : Math.min(end, data + size.value);
      if (MASTERS.has(id.value)) walk(data, stop);
      else if (id.value === 0xa3 || id.value === 0xa1) out.blocks++;
      else if (id.value === 0x2ad7b1) timecodeScale = readUint(b, data, size.value);
      else if (id.value === 0x4489) durationTicks = size.value === 4 ? view.getFloat32(data) : view.getFloat64(data);
      else if (id.value === 0xb0) out.width = readUint(b, data, size.value);
      else if (id.value === 0xba) out.height = readUint(b, data, size.value);
      p = stop;
    }
  };
  walk(0, b.length);
  out.durationS = (durationTicks * timecodeScale) / 1e9;
  return out;
}

// ---- independent geometry from the truth file alone ---------------------------------------------

function focalPx(tr: Truth): number {
  const w = tr.cameraFrame.right - tr.cameraFrame.left;
  return w / 2 / Math.tan((tr.camera.hfovDeg * Math.PI) / 180 / 2);
}

/** Angle between the rays through two video pixels, from both coordinates (not the column-only shortcut). */
function rayAngle(tr: Truth, ax: number, ay: number, bx: number, by: number): number {
  const f = focalPx(tr);
  const cx = (tr.cameraFrame.left + tr.cameraFrame.right) / 2;
  const cy = (tr.cameraFrame.top + tr.cameraFrame.bottom) / 2;
  const a = [ax - cx, ay - cy, f] as const;
  const c = [bx - cx, by - cy, f] as const;
  const dotp = a[0] * c[0] + a[1] * c[1] + a[2] * c[2];
  const cross = Math.hypot(a[1] * c[2] - a[2] * c[1], a[2] * c[0] - a[0] * c[2], a[0] * c[1] - a[1] * c[0]);
  return Math.atan2(cross, dotp);
}

/** Projects a ground point through the pose the truth file states (yaw from +x toward +y, pitch up, no roll). */
function projectWith(tr: Truth, fr: FrameTruth, p: Point3): { x: number; y: number } {
  const { yawRad: yaw, pitchRad: pitch } = fr.camera;
  const d = [p.x - fr.observer.x, p.y - fr.observer.y, p.z - fr.observer.z] as const;
  const fwd = [Math.cos(pitch) * Math.cos(yaw), Math.cos(pitch) * Math.sin(yaw), Math.sin(pitch)] as const;
  const right = [Math.sin(yaw), -Math.cos(yaw), 0] as const;
  const up = [-Math.sin(pitch) * Math.cos(yaw), -Math.sin(pitch) * Math.sin(yaw), Math.cos(pitch)] as const;
  const dotp = (u: readonly number[], v: readonly number[]) => (u[0] ?? 0) * (v[0] ?? 0) + (u[1] ?? 0) * (v[1] ?? 0) + (u[2] ?? 0) * (v[2] ?? 0);
  const Z = dotp(d, fwd);
  const f = focalPx(tr);
  return {
    x: (tr.cameraFrame.left + tr.cameraFrame.right) / 2 + (f * dotp(d, right)) / Z,
    y: (tr.cameraFrame.top + tr.cameraFrame.bottom) / 2 - (f * dotp(d, up)) / Z,
  };
}

/** Where two ground sight lines (observer to object at two times) cross: brute intersection of two lines. */
function sightLineCrossing(a: FrameTruth, b: FrameTruth): { x: number; y: number } {
  const p = a.observer;
  const r = { x: a.objectPosition.x - p.x, y: a.objectPosition.y - p.y };
  const q = b.observer;
  const s = { x: b.objectPosition.x - q.x, y: b.objectPosition.y - q.y };
  const den = r.x * s.y - r.y * s.x;
  const k = ((q.x - p.x) * s.y - (q.y - p.y) * s.x) / den;
  return { x: p.x + k * r.x, y: p.y + k * r.y };
}

describe('fixture clips: files and truth (no browser)', () => {
  it('there are clips, each with its truth, and all together stay under 3 MB', () => {
    expect(names.length).toBeGreaterThanOrEqual(4);
    let total = 0;
    for (const n of names) {
      expect(existsSync(join(CLIPS, `${n}.webm`)), n).toBe(true);
      total += statSync(join(CLIPS, `${n}.webm`)).size + statSync(join(CLIPS, `${n}.truth.json`)).size;
    }
    expect(total).toBeLessThan(MAX_TOTAL_BYTES);
  });

  it('covers the presentations: plain, pillarboxed, letterboxed and a fixed camera', () => {
    const all = names.map(truthOf);
    const w = (t: Truth) => t.cameraFrame.right - t.cameraFrame.left;
    const h = (t: Truth) => t.cameraFrame.bottom - t.cameraFrame.top;
    expect(all.some((t) => w(t) === t.video.width && h(t) === t.video.height && t.camera.mode === 'tracked')).toBe(true);
    expect(all.some((t) => w(t) < t.video.width && h(t) === t.video.height)).toBe(true);
    expect(all.some((t) => h(t) < t.video.height && w(t) === t.video.width)).toBe(true);
    expect(all.some((t) => t.camera.mode === 'fixed')).toBe(true);
  });

  for (const name of names) {
    describe(name, () => {
      const tr = truthOf(name);

      it('is marked as an invented scene', () => {
        expect(tr.invented).toBe(true);
        expect(tr.note).toBe('invented scene, not real');
      });

      it('container size, duration and frame count match the truth file', () => {
        const c = readContainer(join(CLIPS, `${name}.webm`));
        expect(c.width).toBe(tr.video.width);
        expect(c.height).toBe(tr.video.height);
        expect(c.blocks).toBe(tr.video.frames);
        expect(c.durationS).toBeCloseTo(tr.video.duration, 3);
        expect(tr.video.duration).toBeCloseTo(tr.video.frames / tr.video.fps, 9);
      });

      it('marked frames sit mid-frame, inside the camera frame', () => {
        expect(tr.frames.length).toBeGreaterThanOrEqual(4);
        const f = tr.cameraFrame;
        for (const fr of tr.frames) {
          expect(fr.t).toBeCloseTo((fr.index + 0.5) / tr.video.fps, 9);
          const pts: Ends[] = [fr.object, ...fr.landmarks];
          for (const e of pts) {
            for (const [x, y] of [
              [e.x1, e.y1],
              [e.x2, e.y2],
            ] as const) {
              expect(x).toBeGreaterThan(f.left);
              expect(x).toBeLessThan(f.right);
              expect(y).toBeGreaterThan(f.top);
              expect(y).toBeLessThan(f.bottom);
            }
          }
        }
      });

      it('range from the projected span and the wingspan equals the slant range (R = L / (2 tan(theta/2)), aspect 90 deg)', () => {
        for (const fr of tr.frames) {
          const o = fr.object;
          const theta = rayAngle(tr, o.x1, o.y1, o.x2, o.y2);
          expect(theta).toBeCloseTo(fr.angularSizeRad, 9);
          const R = tr.object.sizeM / (2 * Math.tan(theta / 2));
          expect(Math.abs(R / fr.objectRange - 1)).toBeLessThan(1e-3);
          const d = fr.objectPosition;
          const slant = Math.hypot(d.x - fr.observer.x, d.y - fr.observer.y, d.z - fr.observer.z);
          expect(fr.objectRange).toBeCloseTo(slant, 6);
        }
      });

      it('the stated camera pose projects the object centre and both ends where the truth says', () => {
        for (const fr of tr.frames) {
          const c = projectWith(tr, fr, fr.objectPosition);
          expect(Math.abs(c.x - fr.objectCentre.x)).toBeLessThan(1e-6);
          expect(Math.abs(c.y - fr.objectCentre.y)).toBeLessThan(1e-6);
          // the ends straddle the centre, square to the horizontal sight line
          const b = Math.atan2(fr.objectPosition.y - fr.observer.y, fr.objectPosition.x - fr.observer.x);
          const h = tr.object.sizeM / 2;
          const left = projectWith(tr, fr, { ...fr.objectPosition, x: fr.objectPosition.x - h * Math.sin(b), y: fr.objectPosition.y + h * Math.cos(b) });
          const right = projectWith(tr, fr, { ...fr.objectPosition, x: fr.objectPosition.x + h * Math.sin(b), y: fr.objectPosition.y - h * Math.cos(b) });
          expect(Math.abs(left.x - fr.object.x1)).toBeLessThan(1e-6);
          expect(Math.abs(right.x - fr.object.x2)).toBeLessThan(1e-6);
          expect(Math.abs(left.y - fr.object.y1)).toBeLessThan(1e-6);
          if (tr.camera.mode === 'tracked') {
            expect(fr.objectCentre.x).toBeCloseTo((tr.cameraFrame.left + tr.cameraFrame.right) / 2, 6);
            expect(fr.objectCentre.y).toBeCloseTo((tr.cameraFrame.top + tr.cameraFrame.bottom) / 2, 6);
          }
        }
      });

      it('sight lines cross at the fixed point D u / (u - w) from the road (intercept theorem, Euclid VI.2)', () => {
        const u = tr.camera.speed;
        const w = tr.object.speed;
        const D = tr.object.trackDistanceM;
        expect(tr.fixedPoint.distanceFromRoadM).toBeCloseTo((D * u) / (u - w), 6);
        const first = tr.frames[0];
        const last = tr.frames[tr.frames.length - 1];
        if (!first || !last) throw new Error('no frames');
        const x = sightLineCrossing(first, last);
        expect(Math.abs(x.y - tr.fixedPoint.distanceFromRoadM)).toBeLessThan(1e-6 * D);
        expect(Math.abs(x.x - tr.fixedPoint.groundX)).toBeLessThan(1e-6 * D);
        for (const fr of tr.frames) {
          expect(fr.fixedPoint.fraction).toBeCloseTo(u / (u - w), 9);
          expect(fr.observerSpeed).toBe(u);
          expect(fr.objectSpeed).toBe(w);
        }
      });

      it('the landmark at the fixed point stands on the object centre column, below the object', () => {
        const atFp = tr.landmarks.filter((l) => l.atFixedPoint);
        expect(atFp.length).toBeGreaterThanOrEqual(1);
        const level = tr.camera.mode === 'tracked' || tr.camera.pitchDeg === 0;
        expect(level).toBe(true);
        for (const lm of atFp) {
          expect(lm.groundX).toBeCloseTo(tr.fixedPoint.groundX, 6);
          expect(lm.groundY).toBeCloseTo(tr.fixedPoint.groundY, 6);
          for (const fr of tr.frames) {
            const m = fr.landmarks.find((q) => q.id === lm.id);
            if (!m) throw new Error(`frame ${fr.index} lacks ${lm.id}`);
            expect(Math.abs(m.x1 - fr.objectCentre.x)).toBeLessThan(0.5);
            expect(Math.abs(m.x2 - fr.objectCentre.x)).toBeLessThan(0.5);
            expect(Math.min(m.y1, m.y2)).toBeGreaterThan(fr.objectCentre.y);
          }
        }
      });

      it('landmark ranges and angular sizes agree with their ground positions', () => {
        for (const fr of tr.frames) {
          for (const m of fr.landmarks) {
            const lm = tr.landmarks.find((l) => l.id === m.id);
            if (!lm) throw new Error(`unknown landmark ${m.id}`);
            const midZ = lm.dimension === 'height' ? lm.sizeM / 2 : (lm.wallHeightM ?? 0) / 2;
            const horiz = Math.hypot(lm.groundX - fr.observer.x, lm.groundY - fr.observer.y);
            expect(m.horizontalRange).toBeCloseTo(horiz, 6);
            expect(m.range).toBeCloseTo(Math.hypot(horiz, midZ - fr.observer.z), 6);
            expect(rayAngle(tr, m.x1, m.y1, m.x2, m.y2)).toBeCloseTo(m.angularSizeRad, 9);
          }
        }
      });
    });
  }
});

// ---- in Chromium ----------------------------------------------------------------------------------

interface Measured {
  width: number;
  height: number;
  duration: number;
  lastCode: number | null;
  frames: { index: number; code: number | null; left: number; right: number; row: number; barOutside: number; barInside: number }[];
}

interface PageArgs {
  url: string;
  fps: number;
  frames: number;
  code: { x: number; y: number; cellPx: number; bits: number };
  barRow: { outside: number; inside: number } | null;
  marks: { t: number; index: number; x1: number; y1: number; x2: number; y2: number }[];
}

/* Runs in the page: seeks, draws each frame at intrinsic size, and reads it back. */
async function measureInPage(a: PageArgs): Promise<Measured> {
  const v = document.createElement('video');
  v.muted = true;
  v.preload = 'auto';
  v.src = a.url;
  document.body.append(v);
  await new Promise<void>((ok, no) => {
    v.addEventListener('loadeddata', () => ok(), { once: true });
    v.addEventListener('error', () => no(new Error(`video error: ${v.error?.message ?? 'unknown'}`)), { once: true });
  });
  const w = v.videoWidth;
  const h = v.videoHeight;
  const canvas = document.createElement('canvas');
  canvas.width = w;
  canvas.height = h;
  const ctx = canvas.getContext('2d', { willReadFrequently: true });
  if (!ctx) throw new Error('no 2d context');
  const draw = (): Uint8ClampedArray => {
    ctx.drawImage(v, 0, 0, w, h);
    return ctx.getImageData(0, 0, w, h).data;
  };
  // BT.709 luma: the clips are encoded with that matrix, so chroma blur does not move it
  const lumaOf = (px: Uint8ClampedArray, x: number, y: number): number => {
    const k = 4 * (Math.floor(y) * w + Math.floor(x));
    return 0.2126 * (px[k] ?? 0) + 0.7152 * (px[k + 1] ?? 0) + 0.0722 * (px[k + 2] ?? 0);
  };
  const readCode = (px: Uint8ClampedArray): number | null => {
    let index = 0;
    let ones = 0;
    for (let b = 0; b < a.code.bits; b++) {
      const bit = lumaOf(px, a.code.x + b * a.code.cellPx + a.code.cellPx / 2, a.code.y + a.code.cellPx / 2) > 128 ? 1 : 0;
      if (b < 8) index |= bit << b;
      ones += bit;
    }
    return ones % 2 === 0 ? index : null;
  };
  const med = (xs: number[]): number => {
    const s = [...xs].sort((p, q) => p - q);
    return s[Math.floor(s.length / 2)] ?? Number.NaN;
  };
  const rowMean = (px: Uint8ClampedArray, y: number): number => {
    let sum = 0;
    for (let x = 0; x < w; x++) sum += lumaOf(px, x, y);
    return sum / w;
  };
  // Chromium may fire `seeked` before the new frame reaches drawImage (seen headless: the previous
  // frame comes back now and then), so redraw until the frame code shows the wanted frame, for a while
  const grab = async (t: number, want: number): Promise<Uint8ClampedArray> => {
    await new Promise<void>((ok) => {
      v.addEventListener('seeked', () => ok(), { once: true });
      v.currentTime = t;
    });
    let px = draw();
    for (let tries = 0; tries < 100 && readCode(px) !== want; tries++) {
      await new Promise((ok) => setTimeout(ok, 20));
      px = draw();
    }
    return px;
  };
  const out: Measured = { width: w, height: h, duration: v.duration, lastCode: null, frames: [] };
  for (const m of a.marks) {
    const px = await grab(m.t, m.index);
    const row = Math.floor((m.y1 + m.y2) / 2);
    const at = (x: number): number => lumaOf(px, x, row);
    const inner: number[] = [];
    for (let x = Math.ceil(m.x1) + 1; x <= Math.floor(m.x2) - 2; x++) inner.push(at(x));
    const dark = med(inner);
    const skyL = med([2, 3, 4, 5, 6].map((k) => at(Math.floor(m.x1) - k)));
    const skyR = med([1, 2, 3, 4, 5].map((k) => at(Math.ceil(m.x2) + k)));
    const tl = (skyL + dark) / 2;
    const tr = (skyR + dark) / 2;
    // walk out from the middle of the span to the first pixel brighter than halfway, then
    // interpolate linearly between the two pixel centres either side of the crossing
    const mid = Math.floor((m.x1 + m.x2) / 2);
    let i = mid;
    while (at(i - 1) < tl && i > 0) i--;
    const left = i - 0.5 + (at(i - 1) - tl) / (at(i - 1) - at(i));
    let j = mid;
    while (at(j + 1) < tr && j < w - 2) j++;
    const right = j + 0.5 + (tr - at(j)) / (at(j + 1) - at(j));
    out.frames.push({
      index: m.index,
      code: readCode(px),
      left,
      right,
      row,
      barOutside: a.barRow ? rowMean(px, a.barRow.outside) : Number.NaN,
      barInside: a.barRow ? rowMean(px, a.barRow.inside) : Number.NaN,
    });
  }
  out.lastCode = readCode(await grab((a.frames - 0.5) / a.fps, a.frames - 1));
  v.remove();
  return out;
}

describe('fixture clips decode in Chromium and agree with their truth', () => {
  let server: TestServer;
  let browser: Browser;
  let page: Page;

  beforeAll(async () => {
    server = await startServer();
    browser = await chromium.launch({ executablePath: chromiumPath(), headless: true, args: [...CHROMIUM_ARGS, '--autoplay-policy=no-user-gesture-required'] });
    page = await browser.newPage();
    // an empty page of the same origin as the clips, so the canvas stays readable
    await page.goto(server.url('/novideo.html'));
  });

  afterAll(async () => {
    await browser?.close();
    await server?.close();
  });

  for (const name of names) {
    it(`${name}: size, duration, frame count and the object's ends (within 1 px) match the truth`, async () => {
      const tr = truthOf(name);
      const f = tr.cameraFrame;
      const args: PageArgs = {
        url: server.url(`/clips/${name}.webm`),
        fps: tr.video.fps,
        frames: tr.video.frames,
        code: tr.frameCode,
        barRow: tr.bars === 'black' && f.top > 0 ? { outside: f.top - 1, inside: f.top } : null,
        marks: tr.frames.map((fr) => ({ t: fr.t, index: fr.index, ...fr.object })),
      };
      const got = await page.evaluate(measureInPage, args);
      expect(got.width).toBe(tr.video.width);
      expect(got.height).toBe(tr.video.height);
      expect(got.duration).toBeCloseTo(tr.video.duration, 3);
      // the last frame is where the truth says, so the clip holds exactly `frames` frames
      expect(got.lastCode).toBe(tr.video.frames - 1);
      const errors: number[] = [];
      for (const fr of tr.frames) {
        const m = got.frames.find((q) => q.index === fr.index);
        if (!m) throw new Error(`frame ${fr.index} not measured`);
        expect(m.code, `frame shown after seeking to ${fr.t}`).toBe(fr.index);
        expect(Math.abs(m.left - fr.object.x1), `left end, frame ${fr.index}`).toBeLessThanOrEqual(1);
        expect(Math.abs(m.right - fr.object.x2), `right end, frame ${fr.index}`).toBeLessThanOrEqual(1);
        errors.push(m.left - fr.object.x1, m.right - fr.object.x2);
        if (args.barRow) {
          expect(m.barOutside).toBeLessThan(24);
          expect(m.barInside).toBeGreaterThan(60);
        }
      }
      // a half-pixel convention slip would shift every end the same way
      const mean = errors.reduce((s, e) => s + e, 0) / errors.length;
      expect(Math.abs(mean)).toBeLessThan(0.25);
    });
  }
});
