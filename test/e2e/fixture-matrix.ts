/*
 * The truth-matrix fixture clips (truth version 2, test/fixtures/README.md): their truth file's shape,
 * geometry recomputed from the truth file alone (independent of the generator's code), and the
 * in-page measurement of a span along its own, possibly tilted, line.
 */

export interface Xy {
  x: number;
  y: number;
}
export interface Xyz extends Xy {
  z: number;
}
export interface SpanV2 {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  angularSizeRad: number;
  nose?: 1 | 2;
}
export interface LandmarkFrameV2 {
  id: string;
  x1: number;
  y1: number;
  x2: number;
  y2: number;
  range: number;
  horizontalRange: number;
  baseHorizontalRange: number;
  angularSizeRad: number;
  onSightLine: boolean;
  decoy?: boolean;
}
export interface FrameV2 {
  t: number;
  index: number;
  spans: { length: SpanV2 | null; wingspan: SpanV2 | null };
  object: { x1: number; y1: number; x2: number; y2: number };
  objectCentre: Xy;
  objectRange: number;
  objectHorizontalRange: number;
  objectElevationRad: number;
  objectAzimuthRad: number;
  lengthAspectRad: number;
  wingAspectRad: number;
  landmarks: LandmarkFrameV2[];
  horizon: { x1: number; y1: number; x2: number; y2: number } | null;
  roadVanishingPoint: Xy | null;
  fixedPoint: { fraction: number; horizontalDistanceM: number; distanceFromRoadM: number; groundX: number; groundY: number; regime: string };
  observerSpeed: number;
  objectVelocity: Xy;
  observer: Xyz;
  objectPosition: Xyz;
  camera: { yawRad: number; pitchRad: number; rollRad: number };
  endBiasPx?: { end1: number; end2: number };
}
export interface TruthV2 {
  truthVersion: 2;
  invented: boolean;
  note: string;
  name: string;
  summary: string;
  video: { width: number; height: number; fps: number; frames: number; duration: number };
  cameraFrame: { left: number; right: number; top: number; bottom: number };
  bars: 'none' | 'black' | 'blur';
  camera: {
    mode: 'tracked' | 'fixed';
    hfovDeg: number;
    vfovDeg: number;
    focalPx: number;
    speed: number;
    height: number;
    landscapeHfovDeg?: number;
    yawDeg?: number;
    pitchDeg?: number;
    rollDeg?: number;
    aimOffset?: { yawDeg: number; pitchDeg: number };
    shake?: { yawDeg: number; pitchDeg: number; rollDeg: number };
  };
  object: {
    model: 'aircraft';
    lengthM: number;
    wingspanM: number;
    speed: number;
    headingDeg: number;
    trackAngleDeg: number;
    trackDistanceM: number;
    altitudeM: number;
    referenceTime: number;
    primaryDimension: 'length' | 'wingspan';
    pointedEnds: boolean;
  };
  direction: 'opposite' | 'same-slower' | 'same-faster';
  pass: { relativeSpeedMs: number; closestApproachSlantM: number; closestApproachHorizontalM: number; tClosest: number; elevationAtClosestDeg: number };
  groundTrack: { speedMs: number; headingDeg: number };
  fixedPoint: { regime: string; wanders?: boolean; distanceFromRoadM?: number; fraction?: number; groundX?: number; groundY?: number };
  decoyFrame?: number;
  landmarks: {
    id: string;
    sizeM: number;
    dimension: 'height' | 'width';
    groundX: number;
    groundY: number;
    atFixedPoint: boolean;
    atFixedPointOfFrame?: number;
    decoy?: boolean;
    wallHeightM?: number;
  }[];
  frameCode: { x: number; y: number; cellPx: number; bits: number };
  frames: FrameV2[];
}

const dot = (a: Xyz, b: Xyz): number => a.x * b.x + a.y * b.y + a.z * b.z;
const len = (a: Xyz): number => Math.sqrt(dot(a, a));
export const cross = (a: Xyz, b: Xyz): Xyz => ({ x: a.y * b.z - a.z * b.y, y: a.z * b.x - a.x * b.z, z: a.x * b.y - a.y * b.x });
export const sub = (a: Xyz, b: Xyz): Xyz => ({ x: a.x - b.x, y: a.y - b.y, z: a.z - b.z });
export const norm = len;

export function focalOf(tr: TruthV2): number {
  return (tr.cameraFrame.right - tr.cameraFrame.left) / 2 / Math.tan((tr.camera.hfovDeg * Math.PI) / 180 / 2);
}

export function principalPoint(tr: TruthV2): Xy {
  return { x: (tr.cameraFrame.left + tr.cameraFrame.right) / 2, y: (tr.cameraFrame.top + tr.cameraFrame.bottom) / 2 };
}

/** Camera axes from the stated yaw, pitch and roll, as the truth file's camera.angles spells them out. */
export function axesOfCamera(fr: FrameV2): { fwd: Xyz; right: Xyz; up: Xyz } {
  const { yawRad: y, pitchRad: p, rollRad: r } = fr.camera;
  const fwd = { x: Math.cos(p) * Math.cos(y), y: Math.cos(p) * Math.sin(y), z: Math.sin(p) };
  const r0 = { x: Math.sin(y), y: -Math.cos(y), z: 0 };
  const u0 = { x: -Math.sin(p) * Math.cos(y), y: -Math.sin(p) * Math.sin(y), z: Math.cos(p) };
  const c = Math.cos(r);
  const s = Math.sin(r);
  return {
    fwd,
    right: { x: c * r0.x + s * u0.x, y: c * r0.y + s * u0.y, z: c * r0.z + s * u0.z },
    up: { x: c * u0.x - s * r0.x, y: c * u0.y - s * r0.y, z: c * u0.z - s * r0.z },
  };
}

export function projectV2(tr: TruthV2, fr: FrameV2, p: Xyz): Xy {
  const { fwd, right, up } = axesOfCamera(fr);
  const d = sub(p, fr.observer);
  const f = focalOf(tr);
  const c = principalPoint(tr);
  const Z = dot(d, fwd);
  return { x: c.x + (f * dot(d, right)) / Z, y: c.y - (f * dot(d, up)) / Z };
}

/** World direction of the ray through a video pixel. */
export function rayThrough(tr: TruthV2, fr: FrameV2, x: number, y: number): Xyz {
  const { fwd, right, up } = axesOfCamera(fr);
  const f = focalOf(tr);
  const c = principalPoint(tr);
  const a = x - c.x;
  const b = y - c.y;
  return { x: fwd.x * f + right.x * a - up.x * b, y: fwd.y * f + right.y * a - up.y * b, z: fwd.z * f + right.z * a - up.z * b };
}

/** Angle between the rays through two video pixels (needs no pose: the camera's own frame). */
export function rayAngleV2(tr: TruthV2, ax: number, ay: number, bx: number, by: number): number {
  const f = focalOf(tr);
  const c = principalPoint(tr);
  const a = { x: ax - c.x, y: ay - c.y, z: f };
  const b = { x: bx - c.x, y: by - c.y, z: f };
  return Math.atan2(len(cross(a, b)), dot(a, b));
}

/** Unit heading e and unit left n of the object. */
export function objectAxes(tr: TruthV2): { e: Xyz; n: Xyz } {
  const h = (tr.object.headingDeg * Math.PI) / 180;
  return { e: { x: Math.cos(h), y: Math.sin(h), z: 0 }, n: { x: -Math.sin(h), y: Math.cos(h), z: 0 } };
}

/** Sight-line fixed point s = -(n . u) / (n . (w - u)) from one frame's positions and velocities. */
export function fixedPointFraction(fr: FrameV2): number {
  const n = { x: -(fr.objectPosition.y - fr.observer.y), y: fr.objectPosition.x - fr.observer.x };
  const u = fr.observerSpeed;
  const w = fr.objectVelocity;
  return -(n.x * u) / (n.x * (w.x - u) + n.y * w.y);
}

/** Where two frames' ground sight lines cross. */
export function sightCrossing(a: FrameV2, b: FrameV2): Xy {
  const p = a.observer;
  const r = { x: a.objectPosition.x - p.x, y: a.objectPosition.y - p.y };
  const q = b.observer;
  const s = { x: b.objectPosition.x - q.x, y: b.objectPosition.y - q.y };
  const den = r.x * s.y - r.y * s.x;
  const k = ((q.x - p.x) * s.y - (q.y - p.y) * s.x) / den;
  return { x: p.x + k * r.x, y: p.y + k * r.y };
}

// ---- in the page ---------------------------------------------------------------------------------

export interface LineMark {
  dim: 'length' | 'wingspan';
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}
export interface LinePageArgs {
  url: string;
  fps: number;
  frames: number;
  code: { x: number; y: number; cellPx: number; bits: number };
  marks: { t: number; index: number; lines: LineMark[] }[];
}
export interface LineMeasured {
  width: number;
  height: number;
  duration: number;
  lastCode: number | null;
  frames: { index: number; code: number | null; lines: { dim: string; out1: number; out2: number }[] }[];
}

/*
 * Runs in the page, so it must stand alone. The same method as the generator's measureAlongLine
 * (test/fixtures/lib/measure.mjs): sample the line bilinearly; the object's level is the median over
 * the middle half, each sky level the median 2 to 6 px beyond that end; walk out from the middle in
 * 1/8 px steps to the first sample brighter than halfway and interpolate. out1 and out2 say how far
 * each measured end lies outside the marked one, along the line.
 */
export async function measureLinesInPage(a: LinePageArgs): Promise<LineMeasured> {
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
  const pixel = (px: Uint8ClampedArray, i: number, j: number): number => {
    const k = 4 * (Math.min(h - 1, Math.max(0, j)) * w + Math.min(w - 1, Math.max(0, i)));
    return 0.2126 * (px[k] ?? 0) + 0.7152 * (px[k + 1] ?? 0) + 0.0722 * (px[k + 2] ?? 0);
  };
  const bilinear = (px: Uint8ClampedArray, x: number, y: number): number => {
    const fx = x - 0.5;
    const fy = y - 0.5;
    const i = Math.floor(fx);
    const j = Math.floor(fy);
    const p = fx - i;
    const q = fy - j;
    return (pixel(px, i, j) * (1 - p) + pixel(px, i + 1, j) * p) * (1 - q) + (pixel(px, i, j + 1) * (1 - p) + pixel(px, i + 1, j + 1) * p) * q;
  };
  const readCode = (px: Uint8ClampedArray): number | null => {
    let index = 0;
    let ones = 0;
    for (let b = 0; b < a.code.bits; b++) {
      const bit = pixel(px, Math.floor(a.code.x + b * a.code.cellPx + a.code.cellPx / 2), Math.floor(a.code.y + a.code.cellPx / 2)) > 128 ? 1 : 0;
      if (b < 8) index |= bit << b;
      ones += bit;
    }
    return ones % 2 === 0 ? index : null;
  };
  const med = (xs: number[]): number => {
    const s = [...xs].sort((p, q) => p - q);
    return s[Math.floor(s.length / 2)] ?? Number.NaN;
  };
  // Chromium may fire `seeked` before the new frame reaches drawImage (seen headless), so redraw
  // until the frame code shows the wanted frame, for a while
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
  const measure = (px: Uint8ClampedArray, m: LineMark): { dim: string; out1: number; out2: number } => {
    const L = Math.hypot(m.x2 - m.x1, m.y2 - m.y1);
    const dx = (m.x2 - m.x1) / L;
    const dy = (m.y2 - m.y1) / L;
    const at = (s: number): number => bilinear(px, m.x1 + dx * s, m.y1 + dy * s);
    const inner: number[] = [];
    for (let s = 0.25 * L; s <= 0.75 * L; s += 0.5) inner.push(at(s));
    const dark = med(inner);
    const t1 = (med([2, 3, 4, 5, 6].map((k) => at(-k))) + dark) / 2;
    const t2 = (med([2, 3, 4, 5, 6].map((k) => at(L + k))) + dark) / 2;
    const step = 1 / 8;
    let s = L / 2;
    while (at(s - step) < t1 && s > -L) s -= step;
    const s1 = s - (step * (t1 - at(s))) / (at(s - step) - at(s));
    s = L / 2;
    while (at(s + step) < t2 && s < 2 * L) s += step;
    const s2 = s + (step * (t2 - at(s))) / (at(s + step) - at(s));
    return { dim: m.dim, out1: -s1, out2: s2 - L };
  };
  const out: LineMeasured = { width: w, height: h, duration: v.duration, lastCode: null, frames: [] };
  for (const m of a.marks) {
    const px = await grab(m.t, m.index);
    out.frames.push({ index: m.index, code: readCode(px), lines: m.lines.map((l) => measure(px, l)) });
  }
  out.lastCode = readCode(await grab((a.frames - 0.5) / a.fps, a.frames - 1));
  v.remove();
  return out;
}
