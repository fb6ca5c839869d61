import { defaultAssumptions } from '../../src/case/assumptions';
import type { CaseRecord, Mark, Point } from '../../src/case/schema';
import { MAX_MARKS_PER_CASE } from '../../src/case/validate';
import { Rng } from '../../src/engine/rng';
import { dirOf, pinhole, type V3 } from '../engine/pinhole';

/*
 * An invented case as large as a case may be: a long, slow pass (the camera's vehicle slowly
 * overtaking a light aircraft flying beside the road) marked on every frame of a long stretch of
 * clip, as a tracker or a very patient user would: on each frame the object's length and the
 * horizon, and on every few frames the mast the object seems pinned over (placed on the sight line
 * at the motionless point, so its reading is the object's true speed), with the picture's side edges
 * marked once. Every point is projected by a pinhole (pinhole.ts) and moved by the spread its mark
 * claims, from a seeded generator, so the same options give the same case. Built in one pass, not
 * mark by mark through upsertMark (which copies the case on each of ten thousand marks).
 *
 * Invented: no real clip, camera or aircraft behind it. Used by tests and by `npm run bench`.
 */

export interface BigCaseOptions {
  /** marked frames (each gets the object and the horizon) */
  timestamps: number;
  /** how long the marked stretch lasts, s (the frames spread evenly over it) */
  duration?: number;
  /** a mast mark every this many frames (0: none) */
  landmarkEvery?: number;
  /** the spread each mark claims, px (every point is moved by it) */
  sigmaPx?: number;
  seed?: number;
}

const W = 1280;
const H = 720;
/** pillarboxed: the camera's picture is narrower than the video */
const LEFT = 40;
const RIGHT = 1240;
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: W, height: H }, scale: 1, devicePixelRatio: 1 };

/** The invented scene's truth: ground frame of DESIGN.md, the object level on a track parallel to the road. */
export const BIG_CASE_TRUTH = {
  /** observer's and object's speeds along the road, m/s (the same way, the observer faster) */
  u: 27,
  w: 22,
  /** the track's distance from the road and height above the camera, m */
  D: 600,
  h: 80,
  lengthM: 9,
  mastHeightM: 20,
  hfovDeg: 50,
  cameraHeightM: 1.5,
} as const;

/** The marks a case of `timestamps` frames holds with a mast every `landmarkEvery` frames. */
export function bigCaseMarkCount(timestamps: number, landmarkEvery: number): number {
  return 2 * timestamps + (landmarkEvery > 0 ? Math.ceil(timestamps / landmarkEvery) : 0) + 1;
}

/** The case at the documented limit: as many frames as fit in MAX_MARKS_PER_CASE with a mast every 4th. */
export function limitCaseOptions(): BigCaseOptions {
  let n = Math.floor(MAX_MARKS_PER_CASE / 2);
  while (bigCaseMarkCount(n, 4) > MAX_MARKS_PER_CASE) n--;
  return { timestamps: n, duration: n / 30, landmarkEvery: 4 };
}

export function bigCase(o: BigCaseOptions): CaseRecord {
  const T = BIG_CASE_TRUTH;
  const n = o.timestamps;
  const duration = o.duration ?? 148;
  const every = o.landmarkEvery ?? 4;
  const sigma = o.sigmaPx ?? 0.5;
  const rng = new Rng(o.seed ?? 7);
  const wPic = RIGHT - LEFT;
  const f = wPic / 2 / Math.tan((T.hfovDeg * Math.PI) / 360);
  const t0 = 2;
  const dt = n > 1 ? duration / (n - 1) : 0;
  const tAbeam = t0 + duration / 2;
  const jitter = (p: { x: number; y: number }): Point => ({ x: p.x + LEFT + rng.gauss(0, sigma), y: p.y + rng.gauss(0, sigma) });
  const marks: Mark[] = [];
  const mark = (id: string, kind: Mark['kind'], t: number, pts: Point[], extra: Partial<Mark> = {}): Mark => ({ id, kind, t, points: pts, edgeSigmaPx: sigma, mapping, createdAt: 1, ...extra });
  // where the sight line's motionless point lies for parallel tracks: s = u / (u - w) of the way to the object
  const s = T.u / (T.u - T.w);
  for (let i = 0; i < n; i++) {
    const t = Math.round((t0 + i * dt) * 1e6) / 1e6;
    const d: V3 = { x: (T.w - T.u) * (t - tAbeam), y: T.D, z: T.h };
    const yaw = Math.atan2(d.y, d.x);
    // the hand-held camera follows the object, aimed a little below it so the horizon is in the picture
    const cam = pinhole(yaw, Math.atan2(d.z, Math.hypot(d.x, d.y)) - 0.1, 0, f, wPic, H);
    const a = cam.project({ x: d.x + T.lengthM / 2, y: d.y, z: d.z });
    const b = cam.project({ x: d.x - T.lengthM / 2, y: d.y, z: d.z });
    marks.push(mark(`o${i}`, 'object-span', t, [jitter(a), jitter(b)], { dimension: 'length' }));
    marks.push(mark(`h${i}`, 'horizon', t, [jitter(cam.project(dirOf(yaw + 0.1, 0))), jitter(cam.project(dirOf(yaw - 0.1, 0)))]));
    if (every > 0 && i % every === 0) {
      // the mast stands on the ground where the sight line's motionless point is, 1.5 m below the camera
      const foot = { x: s * d.x, y: s * d.y, z: -T.cameraHeightM };
      const top = { ...foot, z: foot.z + T.mastHeightM };
      marks.push(mark(`l${i}`, 'landmark-span', t, [jitter(cam.project(top)), jitter(cam.project(foot))], { landmarkId: 'mast', landmarkDimension: 'height' }));
    }
  }
  marks.push(mark('fe', 'frame-edges', t0, [{ x: LEFT, y: H / 2 }, { x: RIGHT, y: H / 2 }]));
  const exact = (v: number) => ({ lo: v, hi: v });
  return {
    schema: 3,
    id: `invented-big-${n}`,
    video: { pageUrl: 'http://127.0.0.1/invented-big', pageTitle: `invented long pass, ${n} frames (invented)`, src: '', width: W, height: H, duration: duration + 2 * t0 },
    marks,
    notes: '',
    status: 'open',
    tags: [],
    history: [],
    assumptions: {
      ...defaultAssumptions(),
      cameraLabel: 'given',
      hfovDeg: { lo: T.hfovDeg - 2, hi: T.hfovDeg + 2 },
      sizeLabel: 'light aircraft length, 8-10 m (invented)',
      objectSizeM: { lo: 8, hi: 10 },
      sizeDimension: 'length',
      objectKind: 'fixed-wing-light',
      landmarkSizes: [{ id: 'mast', sizeM: { lo: 18, hi: 22 } }],
      observerSpeedMs: { lo: T.u - 1, hi: T.u + 1 },
      cameraHeightM: exact(T.cameraHeightM),
    },
    createdAt: 1,
    updatedAt: 1,
    toolVersion: '0.1.0',
  };
}
