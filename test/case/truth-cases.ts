import { readFileSync } from 'node:fs';
import { SHARED_EDGE_SHARE } from '../../src/engine/pass-inputs';
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
  /**
   * move every point as a hand or a snapper would, from this generator: the ends of the object's
   * spans by a part shared by the whole pass (half the claimed spread, outward along each span, as
   * pass-inputs.ts SHARED_EDGE_SHARE models it) and a part of their own; every other point by a
   * normal of the claimed spread
   */
  jitter?: Rng;
  /** mark the landmark the object seems pinned over (default true) */
  landmark?: boolean;
  /** take the field of view from the camera class (the portrait scene's landscape class), not the exact one */
  cameraClass?: string;
}

const mapping = (w: number, h: number) => ({ objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: w, height: h }, scale: 1, devicePixelRatio: 1 });

export function truthCase(t: Truth2, o: MarkOptions): CaseRecord {
  const marks: Mark[] = [];
  const g = (sd = o.sigmaPx) => (o.jitter ? o.jitter.gauss(0, sd) : 0);
  const moved = (p: Point): Point => ({ x: p.x + g(), y: p.y + g() });
  const add = (id: string, kind: Mark['kind'], time: number, points: Point[], extra: Partial<Mark> = {}) =>
    marks.push({ id, kind, t: time, points: points.map(moved), edgeSigmaPx: o.sigmaPx, mapping: mapping(t.video.width, t.video.height), createdAt: 1, ...extra });
  // per end, so that the span's length takes SHARED_EDGE_SHARE of its sqrt(2) sigma from the shared part
  const outward = g((SHARED_EDGE_SHARE * o.sigmaPx) / Math.SQRT2);
  const own = Math.sqrt(1 - SHARED_EDGE_SHARE * SHARED_EDGE_SHARE) * o.sigmaPx;
  /** The object's span: each end moved outward by the pass's shared part, then by its own. */
  const addSpan = (id: string, time: number, e: Ends) => {
    const len = Math.hypot(e.x2 - e.x1, e.y2 - e.y1);
    const ux = (e.x2 - e.x1) / len;
    const uy = (e.y2 - e.y1) / len;
    const pts = [
      { x: e.x1 - outward * ux + g(own), y: e.y1 - outward * uy + g(own) },
      { x: e.x2 + outward * ux + g(own), y: e.y2 + outward * uy + g(own) },
    ];
    marks.push({ id, kind: 'object-span', t: time, points: pts, edgeSigmaPx: o.sigmaPx, dimension: 'length', mapping: mapping(t.video.width, t.video.height), createdAt: 1 });
  };
  const pinned = o.landmark === false ? null : pinnedLandmark(t);
  const ends = (e: Ends): Point[] => [
    { x: e.x1, y: e.y1 },
    { x: e.x2, y: e.y2 },
  ];
  for (const f of t.frames) {
    addSpan(`o${f.index}`, f.t, f.spans.length);
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
