import { readFileSync } from 'node:fs';
import { CAMERA_PROFILES } from '../../src/engine/profiles';
import type { Rng } from '../../src/engine/rng';
import type { CaseAssumptions, CaseRecord, Mark, Point } from '../../src/case/schema';

/*
 * Cases built from the truth matrix (test/fixtures, truth version 2: invented scenes rendered with
 * exact truth by the project's own generator), marked as a careful user would: the object's length
 * ends on every marked frame, the landmark it seems pinned over (or the decoy) where it stands on
 * the frame, the horizon, the picture's edges when the picture does not fill the video, and for the
 * fixed camera the point where the road ahead vanishes. Optionally every point is jittered, as a
 * user's hand would place it, by the same spread its mark claims.
 */

export interface Ends {
  x1: number;
  y1: number;
  x2: number;
  y2: number;
}
export interface FrameTruth2 {
  t: number;
  index: number;
  spans: { length: Ends & { angularSizeRad: number }; wingspan: (Ends & { angularSizeRad: number }) | null };
  objectRange: number;
  objectHorizontalRange: number;
  objectElevationRad: number;
  lengthAspectRad: number;
  landmarks: (Ends & { id: string; range: number; horizontalRange: number; baseHorizontalRange: number; onSightLine: boolean; decoy?: boolean })[];
  horizon: Ends | null;
  roadVanishingPoint: { x: number; y: number } | null;
  fixedPoint: { fraction: number; horizontalDistanceM: number; distanceFromRoadM: number; regime: string };
  objectVelocity: { x: number; y: number };
  observerSpeed: number;
}
export interface Truth2 {
  name: string;
  truthVersion: 2;
  direction: 'opposite' | 'same-slower' | 'same-faster';
  video: { width: number; height: number; duration: number };
  cameraFrame: { left: number; right: number; top: number; bottom: number };
  camera: { mode: 'tracked' | 'fixed'; hfovDeg: number; landscapeHfovDeg?: number; speed: number; height: number; yawDeg?: number; pitchDeg?: number };
  object: { lengthM: number; wingspanM: number; speed: number; trackAngleDeg: number };
  pass: { relativeSpeedMs: number; closestApproachSlantM: number; closestApproachHorizontalM: number; tClosest: number };
  groundTrack: { speedMs: number; headingDeg: number };
  fixedPoint: { regime: string; distanceFromRoadM?: number; fraction?: number };
  landmarks: { id: string; sizeM: number; dimension: 'height' | 'width'; atFixedPoint?: boolean; decoy?: boolean; atFixedPointOfFrame?: number }[];
  decoyFrame?: number;
  frames: FrameTruth2[];
}

export const MATRIX = ['opp-length', 'same-slower', 'same-faster-decoy', 'fixed-large', 'oblique-shake', 'portrait-pillarbox', 'letterbox-wide', 'small-object', 'high-pass'] as const;
export type MatrixScene = (typeof MATRIX)[number];

export const loadTruth = (name: string) => JSON.parse(readFileSync(`test/fixtures/clips/${name}.truth.json`, 'utf8')) as Truth2;

/** The landmark a user would mark as the one the object seems pinned over, on the frames where it is: the one at the point, or the decoy. */
export function pinnedLandmark(t: Truth2): { id: string; frames: number[] } | null {
  const lm = t.landmarks.find((l) => l.atFixedPoint || l.decoy || l.atFixedPointOfFrame !== undefined);
  if (!lm) return null;
  const only = lm.atFixedPointOfFrame;
  const frames = t.frames.filter((f) => f.landmarks.some((x) => x.id === lm.id) && (only === undefined || f.index === only)).map((f) => f.index);
  return { id: lm.id, frames };
}

export interface MarkOptions {
  /** the spread each mark claims, px */
  sigmaPx: number;
  /** move every point by a normal of the claimed spread (along and across), from this generator */
  jitter?: Rng;
  /** mark the landmark the object seems pinned over (default true) */
  landmark?: boolean;
  /** take the field of view from the camera class (the portrait scene's landscape class), not the exact one */
  cameraClass?: string;
}

const mapping = (w: number, h: number) => ({ objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: w, height: h }, scale: 1, devicePixelRatio: 1 });

export function truthCase(t: Truth2, o: MarkOptions): CaseRecord {
  const marks: Mark[] = [];
  const g = () => (o.jitter ? o.jitter.gauss(0, o.sigmaPx) : 0);
  const moved = (p: Point): Point => ({ x: p.x + g(), y: p.y + g() });
  const add = (id: string, kind: Mark['kind'], time: number, points: Point[], extra: Partial<Mark> = {}) =>
    marks.push({ id, kind, t: time, points: points.map(moved), edgeSigmaPx: o.sigmaPx, mapping: mapping(t.video.width, t.video.height), createdAt: 1, ...extra });
  const pinned = o.landmark === false ? null : pinnedLandmark(t);
  const ends = (e: Ends): Point[] => [
    { x: e.x1, y: e.y1 },
    { x: e.x2, y: e.y2 },
  ];
  for (const f of t.frames) {
    add(`o${f.index}`, 'object-span', f.t, ends(f.spans.length), { dimension: 'length' });
    const lm = pinned?.frames.includes(f.index) ? f.landmarks.find((x) => x.id === pinned.id) : undefined;
    if (lm) {
      const def = t.landmarks.find((x) => x.id === lm.id)!;
      add(`l${f.index}`, 'landmark-span', f.t, ends(lm), { landmarkId: lm.id, landmarkDimension: def.dimension });
    }
    if (f.horizon && t.camera.mode === 'tracked') add(`h${f.index}`, 'horizon', f.t, ends(f.horizon));
  }
  const first = t.frames[0]!;
  if (t.camera.mode === 'fixed') {
    if (first.horizon) add('h', 'horizon', first.t, ends(first.horizon));
    const vp = t.frames.find((f) => f.roadVanishingPoint)?.roadVanishingPoint;
    if (vp) add('r', 'road-ahead', first.t, [vp]);
  }
  const fr = t.cameraFrame;
  if (fr.left > 0 || fr.right < t.video.width) add('fe', 'frame-edges', first.t, [{ x: fr.left, y: t.video.height / 2 }, { x: fr.right, y: t.video.height / 2 }]);
  if (fr.top > 0 || fr.bottom < t.video.height) add('ftb', 'frame-top-bottom', first.t, [{ x: t.video.width / 2, y: fr.top }, { x: t.video.width / 2, y: fr.bottom }]);
  const exact = (v: number) => ({ lo: v, hi: v });
  const profile = o.cameraClass ? CAMERA_PROFILES.find((p) => p.id === o.cameraClass)! : null;
  const assumptions: CaseAssumptions = {
    cameraLabel: profile ? profile.label : 'known camera',
    hfovDeg: profile ? { lo: profile.hfovDeg.central, hi: profile.hfovDeg.central } : exact(t.camera.hfovDeg),
    sizeLabel: 'known length',
    objectSizeM: exact(t.object.lengthM),
    sizeDimension: 'length',
    aspectDeg: { lo: 90, hi: 90 },
    landmarkSizeM: { lo: 8, hi: 30 },
    landmarkSizes: t.landmarks.map((l) => ({ id: l.id, sizeM: exact(l.sizeM) })),
    observerSpeedMs: exact(t.camera.speed),
    objectKind: 'fixed-wing-transport',
    direction: t.direction,
    trackAngleDeg: exact(t.object.trackAngleDeg),
    cameraHeightM: exact(t.camera.height),
    ...(t.camera.mode === 'fixed' ? { fixedCamera: { mount: 'vehicle' as const, axisHeadingDeg: { lo: -90, hi: 90 } } } : {}),
  };
  return {
    schema: 3,
    id: `truth-${t.name}`,
    video: { pageUrl: `http://127.0.0.1/${t.name}`, pageTitle: `${t.name} (invented)`, src: '', width: t.video.width, height: t.video.height, duration: t.video.duration },
    marks,
    notes: '',
    status: 'open',
    tags: [],
    history: [],
    assumptions,
    createdAt: 1,
    updatedAt: 1,
    toolVersion: '0.1.0',
  };
}
