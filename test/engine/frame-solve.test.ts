import { describe, expect, it } from 'vitest';
import fc from 'fast-check';
import { solveFrame, type FrameScene } from '../../src/engine/frame-solve';
import { Rng } from '../../src/engine/rng';
import { InputError } from '../../src/engine/errors';
import { DEG } from '../../src/engine/constants';
import { pinhole } from './pinhole';

const W = 1920;
const H = 1080;
const exact = (v: number) => ({ lo: v, hi: v });

/** Independent pinhole computation: angle between the rays through two pixels on one row. */
function rayAngle(x1: number, x2: number, y: number, hfov: number): number {
  const f = W / 2 / Math.tan(hfov / 2);
  const a = [x1 - W / 2, y - H / 2, f];
  const b = [x2 - W / 2, y - H / 2, f];
  const dot = a[0]! * b[0]! + a[1]! * b[1]! + a[2]! * b[2]!;
  return Math.acos(dot / (Math.hypot(...a) * Math.hypot(...b)));
}

function scene(x1: number, x2: number, over: Partial<FrameScene> = {}): FrameScene {
  return {
    frame: { widthPx: W, heightPx: H },
    hfov: exact(60 * DEG),
    object: { span: { x1, y1: 540, x2, y2: 540, edgeSigmaPx: 0 }, size: exact(30), aspect: exact(90 * DEG) },
    ...over,
  };
}

describe('solveFrame', () => {
  it('with exact inputs every draw equals the direct pinhole computation (invented example)', () => {
    // Invented: a 30 m wingspan broadside, 120 px wide in a 1920 px frame of 60 deg field of view.
    const r = solveFrame(scene(900, 1020), { draws: 500 });
    const theta = rayAngle(900, 1020, 540, 60 * DEG);
    const R = 30 / (2 * Math.tan(theta / 2));
    for (const q of [r.range.p05, r.range.median, r.range.p95]) expect(q).toBeCloseTo(R, 6);
    expect(r.angularSize.median).toBeCloseTo(theta, 12);
    // by hand: f = 960 / tan 30 deg = 1662.77 px, so R ~ 30 x 1662.77 / 120 = 415.7 m
    expect(R).toBeGreaterThan(415);
    expect(R).toBeLessThan(416.5);
  });

  it('is deterministic for a seed and varies with it', () => {
    const s = scene(900, 1020, {
      hfov: { lo: 55 * DEG, hi: 70 * DEG },
      object: { span: { x1: 900, y1: 540, x2: 1020, y2: 540, edgeSigmaPx: 0.7 }, size: { lo: 24, hi: 36 }, aspect: exact(90 * DEG) },
    });
    expect(solveFrame(s, { seed: 9, draws: 2000 })).toEqual(solveFrame(s, { seed: 9, draws: 2000 }));
    expect(solveFrame(s, { seed: 10, draws: 2000 }).range.median).not.toBe(solveFrame(s, { seed: 9, draws: 2000 }).range.median);
  });

  it('a landmark the object seems pinned over gives the implied speed w = u (1 - R/d) (DESIGN.md; invented case)', () => {
    // Invented: object 120 px (30 m), landmark a 10 m wide front spanning 100 px on the same sight
    // line; nothing gives the elevation, so both ranges are slant ranges.
    const s = scene(900, 1020, {
      landmark: { span: { x1: 910, y1: 700, x2: 1010, y2: 700, edgeSigmaPx: 0 }, size: exact(10), dimension: 'width' },
      observerSpeed: exact(25),
    });
    const r = solveFrame(s, { draws: 200 });
    const R = r.range.median;
    const d = r.landmarkRange!.median;
    expect(d).toBeLessThan(R);
    expect(r.impliedSpeed!.median).toBeCloseTo(25 * (1 - R / d), 6);
    expect(r.impliedSpeed!.median).toBeLessThan(0); // landmark in front: opposite direction
    expect(r.fixedPointFraction!.median).toBeCloseTo(d / R, 9);
    expect(r.regimeShares).toEqual({ between: 1, beyond: 0, behind: 0, none: 0 });
  });

  it('a mast’s foot gives the object’s elevation: the point is weighed on the ground, d / (R cos e), not d / R (issue 12, point 2; invented scene)', () => {
    // Invented: the camera 1.5 m up tracks an object 640 m away at 15 deg elevation; a 20 m mast
    // stands on the ground on the same sight line, 170 m away. Pinhole built the long way (pinhole.ts).
    const f = W / 2 / Math.tan((40 * DEG) / 2);
    const elev = 15 * DEG;
    const R = 640;
    const cam = pinhole(0.5, 8 * DEG, 0, f, W, H); // aimed below the object, so the foot is in view
    const obj = { x: R * Math.cos(elev) * Math.cos(0.5), y: R * Math.cos(elev) * Math.sin(0.5), z: R * Math.sin(elev) };
    const ends = [-15, 15].map((s) => cam.project({ x: obj.x - s * Math.sin(0.5), y: obj.y + s * Math.cos(0.5), z: obj.z }));
    const d = 170;
    const foot = cam.project({ x: d * Math.cos(0.5), y: d * Math.sin(0.5), z: -1.5 });
    const top = cam.project({ x: d * Math.cos(0.5), y: d * Math.sin(0.5), z: 18.5 });
    const r = solveFrame(
      {
        frame: { widthPx: W, heightPx: H },
        hfov: exact(40 * DEG),
        object: { span: { x1: ends[0]!.x, y1: ends[0]!.y, x2: ends[1]!.x, y2: ends[1]!.y, edgeSigmaPx: 0 }, size: exact(30), aspect: exact(90 * DEG) },
        landmark: { span: { x1: foot.x, y1: foot.y, x2: top.x, y2: top.y, edgeSigmaPx: 0 }, size: exact(20), dimension: 'height' },
        observerSpeed: exact(25),
        cameraHeight: exact(1.5),
      },
      { draws: 200 },
    );
    expect(r.elevationSource).toBe('landmark');
    expect(r.elevation!.median).toBeCloseTo(elev, 3);
    expect(r.horizontalRange!.median / (R * Math.cos(elev))).toBeCloseTo(1, 3);
    expect(r.landmarkHorizontalRange!.median / d).toBeCloseTo(1, 3);
    expect(r.fixedPointFraction!.median / (d / (R * Math.cos(elev)))).toBeCloseTo(1, 3);
    // the slant ratio would be off by 1 / cos(15 deg), 3.5 %
    expect(Math.abs(r.fixedPointFraction!.median / (d / R) - 1)).toBeGreaterThan(0.03);
  });

  it('an assumed object speed places the fixed point by D u / (u - w) (parallel tracks)', () => {
    const r = solveFrame(scene(900, 1020, { observerSpeed: exact(27.78), objectSpeed: exact(-69.44) }), { draws: 200 });
    expect(r.fixedPointFraction!.median).toBeCloseTo(27.78 / (27.78 + 69.44), 9);
    expect(r.regimeShares!.between).toBe(1);
  });

  it('the interval widens as the size band widens (property)', () => {
    fc.assert(
      fc.property(fc.double({ min: 0.5, max: 10, noNaN: true }), (extra) => {
        const narrow = solveFrame(scene(900, 1020, { object: { span: { x1: 900, y1: 540, x2: 1020, y2: 540, edgeSigmaPx: 0.5 }, size: { lo: 29, hi: 31 }, aspect: exact(90 * DEG) } }), { draws: 2000 });
        const wide = solveFrame(scene(900, 1020, { object: { span: { x1: 900, y1: 540, x2: 1020, y2: 540, edgeSigmaPx: 0.5 }, size: { lo: 29 - extra, hi: 31 + extra }, aspect: exact(90 * DEG) } }), { draws: 2000 });
        expect(wide.range.p95 - wide.range.p05).toBeGreaterThan(narrow.range.p95 - narrow.range.p05);
      }),
      { numRuns: 15 },
    );
  });

  it('rejects bad input with the field named and nothing NaN out', () => {
    expect(() => solveFrame(scene(900, 900))).toThrow(/object span length/);
    expect(() => solveFrame(scene(900, 5000))).toThrow(/object span: second end x/);
    expect(() => solveFrame(scene(900, 1020, { hfov: exact(180 * DEG) }))).toThrow(/horizontal field of view/);
    expect(() => solveFrame(scene(900, 1020), { draws: 10 })).toThrow(InputError);
    expect(() => solveFrame(scene(900, 1020, { observerSpeed: { lo: 30, hi: 20 } }))).toThrow(/observer speed/);
  });
});

describe('calibration of the 5-95 % interval (500 seeded synthetic frames)', () => {
  it('covers the true range in 88-95 % of cases', () => {
    // Synthetic truth drawn from the same stated spreads the solver is given: field of view
    // uniform over a profile band, wingspan uniform over code letter C (ICAO Annex 14 Table 1-1,
    // 24 to < 36 m), aspect 75-90 deg, and each marked end off by N(0, 0.6 px) from the exact pixel.
    const gen = new Rng(2026);
    const hfovBand = { lo: 62 * DEG, hi: 72 * DEG };
    const sizeBand = { lo: 24, hi: 36 };
    const aspectBand = { lo: 75 * DEG, hi: 90 * DEG };
    const sigma = 0.6;
    const cases = 500;
    let covered = 0;
    for (let c = 0; c < cases; c++) {
      const hfov = gen.between(hfovBand.lo, hfovBand.hi);
      const size = gen.between(sizeBand.lo, sizeBand.hi);
      const aspect = gen.between(aspectBand.lo, aspectBand.hi);
      const span = gen.between(8, 160);
      const x1 = gen.between(50, W - 50 - span);
      const y = gen.between(100, H - 100);
      const trueRange = (size * Math.sin(aspect)) / (2 * Math.tan(rayAngle(x1, x1 + span, y, hfov) / 2));
      const r = solveFrame(
        {
          frame: { widthPx: W, heightPx: H },
          hfov: hfovBand,
          object: {
            span: { x1: x1 + sigma * gen.normal(), y1: y + sigma * gen.normal(), x2: x1 + span + sigma * gen.normal(), y2: y + sigma * gen.normal(), edgeSigmaPx: sigma },
            size: sizeBand,
            aspect: aspectBand,
          },
        },
        { draws: 2000, seed: c + 1 },
      );
      if (trueRange >= r.range.p05 && trueRange <= r.range.p95) covered++;
    }
    const share = covered / cases;
    console.log(`calibration: the 5-95 % range interval covered the truth in ${(100 * share).toFixed(1)} % of ${cases} cases`);
    expect(share).toBeGreaterThanOrEqual(0.88);
    expect(share).toBeLessThanOrEqual(0.95);
  });
});
