import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  angleBetweenColumns,
  angleBetweenPoints,
  bearingOfColumn,
  equivalentFrameWidthMm,
  focalLengthPx,
  fovAlong,
  hfovFromEquivalentFocal,
  hfovFromEquivalentFocalN,
  hfovFromVfov,
  openAngle,
  smallAngleSpan,
  vfovFromHfov,
} from '../../src/engine/camera';
import { DEG, FULL_FRAME_DIAGONAL_MM, MAX_FRAME_PX } from '../../src/engine/constants';
import { InputError, UndeterminedError } from '../../src/engine/errors';
import { expectInputError } from './expect-error';


/** Either a plausible value or any double at all (NaN, infinities, huge, tiny, negative). */
function mixed(valid: fc.Arbitrary<number>): fc.Arbitrary<number> {
  return fc.oneof(valid, fc.double(), fc.constantFrom(0, -0, Math.PI, -1, NaN, Infinity, -Infinity));
}

const validWidth = fc.double({ min: 1, max: MAX_FRAME_PX, noNaN: true });
const validHfov = fc.double({ min: 1e-6, max: Math.PI - 1e-6, noNaN: true });
const isHfov = (h: number) => Number.isFinite(h) && h > 0 && h < Math.PI;
const isWidth = (w: number) => Number.isFinite(w) && w >= 1 && w <= MAX_FRAME_PX;
const isCol = (u: number, w: number) => Number.isFinite(u) && u >= -w && u <= 2 * w;

/** Independent reference: the angle between two 3-D rays from their normalised dot product. */
function rayAngle(a: [number, number, number], b: [number, number, number]): number {
  const dot = a[0] * b[0] + a[1] * b[1] + a[2] * b[2];
  const c = dot / (Math.hypot(...a) * Math.hypot(...b));
  return Math.acos(Math.min(1, Math.max(-1, c)));
}

describe('fovAlong: full-frame 36 x 24 mm table, REFERENCES.md (2 atan(d / 2f), diagonal 43.27 mm)', () => {
  const table: [number, number, number, number][] = [
    [24, 73.74, 53.13, 84.06],
    [28, 65.47, 46.4, 75.38],
    [35, 54.43, 37.85, 63.44],
    [50, 39.6, 26.99, 46.79],
  ];
  for (const [f, h, v, d] of table) {
    it(`${f} mm: ${h} / ${v} / ${d} deg to 0.01 deg`, () => {
      expect(fovAlong(36, f) / DEG).toBeCloseTo(h, 2);
      expect(fovAlong(24, f) / DEG).toBeCloseTo(v, 2);
      expect(fovAlong(FULL_FRAME_DIAGONAL_MM, f) / DEG).toBeCloseTo(d, 2);
    });
  }

  it('50 mm matches the commonly published 39.6 / 27.0 / 46.8 deg (REFERENCES.md)', () => {
    expect(fovAlong(36, 50) / DEG).toBeCloseTo(39.6, 1);
    expect(fovAlong(24, 50) / DEG).toBeCloseTo(27.0, 1);
    expect(fovAlong(FULL_FRAME_DIAGONAL_MM, 50) / DEG).toBeCloseTo(46.8, 1);
  });

  it('rejects non-positive dimensions and focal lengths, naming the field', () => {
    expectInputError(() => fovAlong(0, 50), 'format dimension');
    expectInputError(() => fovAlong(36, 0), 'focal length');
    expectInputError(() => fovAlong(NaN, 50), 'format dimension');
    expectInputError(() => fovAlong(36, Infinity), 'focal length');
  });
});

describe('hfovFromEquivalentFocal (CIPA DCG-001: f_eq defined on the 43.27 mm diagonal)', () => {
  // Worked values for f_eq = 26 mm, REFERENCES.md
  it('quoted 3:2 (36 mm width): 69.39 deg', () => {
    expect(hfovFromEquivalentFocal({ focalEq: 26, quotedAspect: 3 / 2 }) / DEG).toBeCloseTo(69.39, 2);
    expect(hfovFromEquivalentFocal({ focalEq: 26, quotedAspect: 3 / 2, recordedAspect: 3 / 2 }) / DEG).toBeCloseTo(69.39, 2);
  });

  it('4:3 on the diagonal (34.61 mm wide): 67.30 deg, also for the default 16:9 recording', () => {
    expect(equivalentFrameWidthMm(4 / 3, 4 / 3, false)).toBeCloseTo(34.61, 2);
    expect(hfovFromEquivalentFocal({ focalEq: 26, quotedAspect: 4 / 3, recordedAspect: 4 / 3 }) / DEG).toBeCloseTo(67.3, 2);
    expect(hfovFromEquivalentFocal({ focalEq: 26 }) / DEG).toBeCloseTo(67.3, 2);
  });

  it('16:9 on the diagonal (37.71 mm wide), recorded 16:9: 71.90 deg', () => {
    expect(equivalentFrameWidthMm(16 / 9, 16 / 9, false)).toBeCloseTo(37.71, 2);
    expect(hfovFromEquivalentFocal({ focalEq: 26, quotedAspect: 16 / 9, recordedAspect: 16 / 9 }) / DEG).toBeCloseTo(71.9, 2);
  });

  it('3:2 on the diagonal is exactly the 36 x 24 mm frame', () => {
    expect(equivalentFrameWidthMm(3 / 2, 3 / 2, false)).toBeCloseTo(36, 10);
    expect(equivalentFrameWidthMm(3 / 2, 3 / 2, true)).toBeCloseTo(24, 10);
  });

  it('a narrower recording keeps the quoted short side (16:9 quoted, 4:3 recorded)', () => {
    const short = FULL_FRAME_DIAGONAL_MM / Math.hypot(16 / 9, 1);
    expect(equivalentFrameWidthMm(16 / 9, 4 / 3, false)).toBeCloseTo((short * 4) / 3, 10);
    expect(equivalentFrameWidthMm(16 / 9, 4 / 3, true)).toBeCloseTo(short, 10);
  });

  it('portrait makes the horizontal the short side of the recorded frame', () => {
    const long = (FULL_FRAME_DIAGONAL_MM * 4) / 5; // 4:3 on the diagonal is a 3-4-5 triangle
    const expected = 2 * Math.atan(long / (16 / 9) / (2 * 26));
    expect(hfovFromEquivalentFocal({ focalEq: 26, orientation: 'portrait' })).toBeCloseTo(expected, 12);
    // Its vertical field equals the landscape horizontal one.
    const portrait = hfovFromEquivalentFocal({ focalEq: 26, orientation: 'portrait' });
    expect(hfovFromVfov(hfovFromEquivalentFocal({ focalEq: 26 }), 9 / 16)).toBeCloseTo(portrait, 12);
  });

  it('digital zoom z divides tan(HFOV/2) by z, which is the same as a z-times focal length', () => {
    fc.assert(
      fc.property(fc.double({ min: 10, max: 200, noNaN: true }), fc.double({ min: 1, max: 100, noNaN: true }), (f, z) => {
        const zoomed = hfovFromEquivalentFocal({ focalEq: f, zoom: z });
        const base = hfovFromEquivalentFocal({ focalEq: f });
        expect(Math.tan(zoomed / 2) * z).toBeCloseTo(Math.tan(base / 2), 12);
        if (f * z <= 10000) expect(zoomed).toBeCloseTo(hfovFromEquivalentFocal({ focalEq: f * z }), 12);
      }),
    );
    expect(hfovFromEquivalentFocal({ focalEq: 26, zoom: 2 }) / DEG).toBeCloseTo(2 * Math.atan(34.6133 / 104) / DEG, 3);
  });

  it('stabilisation crop c divides tan(HFOV/2) by 1 + c and narrows the field', () => {
    const base = hfovFromEquivalentFocal({ focalEq: 26 });
    const cropped = hfovFromEquivalentFocal({ focalEq: 26, stabilisationCrop: 0.15 });
    expect(Math.tan(cropped / 2) * 1.15).toBeCloseTo(Math.tan(base / 2), 12);
    expect(cropped).toBeLessThan(base);
    expect(hfovFromEquivalentFocal({ focalEq: 26, stabilisationCrop: 0 })).toBe(base);
  });

  it('the plain-number kernel agrees with the options form', () => {
    expect(hfovFromEquivalentFocalN(26, 4 / 3, 16 / 9, true, 1.5, 0.1)).toBe(
      hfovFromEquivalentFocal({ focalEq: 26, orientation: 'portrait', zoom: 1.5, stabilisationCrop: 0.1 }),
    );
  });

  it('rejects bad settings, naming the field', () => {
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 0 }), '35 mm-equivalent focal length');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: NaN }), '35 mm-equivalent focal length');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 26, zoom: 0.5 }), 'digital zoom');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 26, zoom: 101 }), 'digital zoom');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 26, stabilisationCrop: -0.1 }), 'stabilisation crop');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 26, stabilisationCrop: 0.95 }), 'stabilisation crop');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 26, quotedAspect: 0.75 }), 'quoted aspect');
    expectInputError(() => hfovFromEquivalentFocal({ focalEq: 26, recordedAspect: 9 / 16 }), 'recorded aspect');
    expectInputError(
      () => hfovFromEquivalentFocal({ focalEq: 26, orientation: 'sideways' as unknown as 'portrait' }),
      'orientation',
    );
    expectInputError(() => hfovFromEquivalentFocal(null as unknown as { focalEq: number }), 'camera settings');
  });

  it('property: any settings either throw InputError or give a field in (0, 180) deg', () => {
    fc.assert(
      fc.property(
        mixed(fc.double({ min: 1, max: 10000, noNaN: true })),
        mixed(fc.double({ min: 1, max: 10, noNaN: true })),
        mixed(fc.double({ min: 1, max: 10, noNaN: true })),
        fc.boolean(),
        mixed(fc.double({ min: 1, max: 100, noNaN: true })),
        mixed(fc.double({ min: 0, max: 0.9, noNaN: true })),
        (f, qa, ra, portrait, z, c) => {
          const ok =
            f >= 1 && f <= 10000 && qa >= 1 && qa <= 10 && ra >= 1 && ra <= 10 && z >= 1 && z <= 100 && c >= 0 && c <= 0.9;
          if (!ok) {
            expect(() => hfovFromEquivalentFocalN(f, qa, ra, portrait, z, c)).toThrow(InputError);
            return;
          }
          const h = hfovFromEquivalentFocalN(f, qa, ra, portrait, z, c);
          expect(h > 0 && h < Math.PI).toBe(true);
        },
      ),
    );
  });
});

describe('focalLengthPx and bearingOfColumn', () => {
  it('f = (W/2) / tan(HFOV/2): a 90 deg field on 1920 px gives 960 px', () => {
    expect(focalLengthPx(1920, 90 * DEG)).toBeCloseTo(960, 9);
    expect(focalLengthPx(1000, 2 * Math.atan(0.25))).toBeCloseTo(2000, 9);
  });

  it('centre column has bearing 0, edges +/- HFOV/2, and u = W/2 + f sits at 45 deg', () => {
    const W = 1920;
    const h = 67.3 * DEG;
    const f = focalLengthPx(W, h);
    expect(bearingOfColumn(W / 2, W, h)).toBe(0);
    expect(bearingOfColumn(0, W, h)).toBeCloseTo(-h / 2, 12);
    expect(bearingOfColumn(W, W, h)).toBeCloseTo(h / 2, 12);
    expect(bearingOfColumn(W / 2 + f, W, h)).toBeCloseTo(Math.PI / 4, 12);
  });

  it('property: bearings are antisymmetric about the centre and increase with the column', () => {
    fc.assert(
      fc.property(validWidth, validHfov, fc.double({ min: 0, max: 1, noNaN: true }), (W, h, s) => {
        const u = s * W;
        expect(bearingOfColumn(u, W, h)).toBeCloseTo(-bearingOfColumn(W - u, W, h), 12);
        if (u + 0.5 <= 2 * W) expect(bearingOfColumn(u + 0.5, W, h)).toBeGreaterThanOrEqual(bearingOfColumn(u, W, h));
      }),
    );
  });

  it('accepts columns a little outside the frame, rejects far outside', () => {
    expect(bearingOfColumn(-0.4, 1920, 60 * DEG)).toBeLessThan(-30 * DEG);
    expectInputError(() => bearingOfColumn(-1921, 1920, 60 * DEG), 'column');
    expectInputError(() => bearingOfColumn(3841, 1920, 60 * DEG), 'column');
  });

  it('field-of-view errors name the field and show degrees', () => {
    let e: unknown;
    try {
      focalLengthPx(1920, Math.PI);
    } catch (x) {
      e = x;
    }
    expect(e).toBeInstanceOf(InputError);
    const msg = (e as InputError).message;
    expect(msg).toContain('horizontal field of view');
    expect(msg).toContain('got 180;');
    expect(msg).toContain('more than 0 and less than 180 deg');
    expectInputError(() => focalLengthPx(1920, 0), 'horizontal field of view');
    expectInputError(() => focalLengthPx(0.5, 1), 'frame width');
    expectInputError(() => focalLengthPx(MAX_FRAME_PX + 1, 1), 'frame width');
    expectInputError(() => openAngle('aspect angle', -1), 'aspect angle');
  });

  it('property: focalLengthPx and bearingOfColumn throw InputError on invalid input and never return NaN', () => {
    fc.assert(
      fc.property(mixed(fc.double({ min: -100, max: 4000, noNaN: true })), mixed(validWidth), mixed(validHfov), (u, W, h) => {
        if (!(isWidth(W) && isHfov(h))) {
          expect(() => focalLengthPx(W, h)).toThrow(InputError);
          expect(() => bearingOfColumn(u, W, h)).toThrow(InputError);
          return;
        }
        expect(Number.isNaN(focalLengthPx(W, h))).toBe(false);
        if (!isCol(u, W)) {
          expect(() => bearingOfColumn(u, W, h)).toThrow(InputError);
          return;
        }
        const b = bearingOfColumn(u, W, h);
        expect(Math.abs(b) < Math.PI / 2 || Math.abs(b) === Math.PI / 2).toBe(true);
      }),
    );
  });
});

describe('angleBetweenColumns: exact, also off centre', () => {
  it('the whole frame width subtends the horizontal field of view', () => {
    expect(angleBetweenColumns(0, 1920, 1920, 67.3 * DEG)).toBeCloseTo(67.3 * DEG, 12);
  });

  it('property: equals the angle between the 3-D rays (u - W/2, 0, f) (independent computation)', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 100, max: MAX_FRAME_PX, noNaN: true }),
        fc.double({ min: 1 * DEG, max: 170 * DEG, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        (W, h, s1, s2) => {
          const u1 = s1 * W;
          const u2 = s2 * W;
          fc.pre(Math.abs(u2 - u1) >= 1);
          const f = focalLengthPx(W, h);
          const ref = rayAngle([u1 - W / 2, 0, f], [u2 - W / 2, 0, f]);
          expect(angleBetweenColumns(u1, u2, W, h)).toBeCloseTo(ref, 7);
        },
      ),
    );
  });

  it('brute force: points placed at known bearings and projected through the pinhole come back exactly', () => {
    const W = 3840;
    const h = 80 * DEG;
    const f = focalLengthPx(W, h);
    for (const [b1, b2] of [
      [-39, -35],
      [-10, 12],
      [30, 39.9],
      [0.1, 0.2],
    ] as const) {
      // a point at horizontal bearing b and depth z = 1 lands on column W/2 + f tan(b)
      const u1 = W / 2 + f * Math.tan(b1 * DEG);
      const u2 = W / 2 + f * Math.tan(b2 * DEG);
      expect(angleBetweenColumns(u1, u2, W, h)).toBeCloseTo((b2 - b1) * DEG, 12);
    }
  });

  it('differs from smallAngleSpan by the expected factor: 2 tan(h/2)/h at the centre, sin(h)/h at the edge', () => {
    const W = 1920;
    const h = 67.3 * DEG;
    const d = 0.01; // a tiny span, so the local derivative rules
    const centre = angleBetweenColumns(W / 2 - d / 2, W / 2 + d / 2, W, h) / smallAngleSpan(d, W, h);
    const edge = angleBetweenColumns(W - d, W, W, h) / smallAngleSpan(d, W, h);
    expect(centre).toBeCloseTo((2 * Math.tan(h / 2)) / h, 6);
    expect(edge).toBeCloseTo(Math.sin(h) / h, 5);
    // about +13 % at the centre and -21 % at the edge for a 67.3 deg field
    expect(centre).toBeGreaterThan(1.13);
    expect(edge).toBeLessThan(0.79);
  });

  it('keeps full precision for a tiny span far off centre (no cancellation of two large bearings)', () => {
    const W = 1920;
    const h = 120 * DEG;
    const u = 1900;
    const d = u + 1e-9 - u; // the span actually representable next to 1900
    const t = ((u - W / 2) * 2 * Math.tan(h / 2)) / W;
    const derivative = (2 * Math.tan(h / 2)) / W / (1 + t * t);
    const naive = Math.abs(bearingOfColumn(u + d, W, h) - bearingOfColumn(u, W, h));
    const got = angleBetweenColumns(u, u + d, W, h);
    expect(Math.abs(got / (derivative * d) - 1)).toBeLessThan(1e-9);
    // the difference of two bearings loses most of its digits here, which is why the kernel avoids it
    expect(Math.abs(naive / (derivative * d) - 1)).toBeGreaterThan(1e-9);
    // the same holds for the point form off the centre row
    const gotP = angleBetweenPoints(u, 100, u + d, 100, W, 1080, h);
    const f = focalLengthPx(W, h);
    const a: [number, number, number] = [u - W / 2, 100 - 540, f];
    const n2 = a[0] * a[0] + a[1] * a[1] + a[2] * a[2];
    // |d/dx of the ray direction| for a step along x: sqrt(n2 - a_x^2) / n2 per pixel
    expect(Math.abs(gotP / ((Math.sqrt(n2 - a[0] * a[0]) / n2) * d) - 1)).toBeLessThan(1e-9);
  });

  it('is symmetric in its two columns', () => {
    expect(angleBetweenColumns(100, 700, 1920, 1)).toBe(angleBetweenColumns(700, 100, 1920, 1));
  });

  it('throws on zero span or a span wider than the frame', () => {
    expectInputError(() => angleBetweenColumns(500, 500, 1920, 1), 'span between the marked columns');
    expectInputError(() => angleBetweenColumns(-10, 1911, 1920, 1), 'span between the marked columns');
    expectInputError(() => angleBetweenColumns(NaN, 10, 1920, 1), 'first column');
    expectInputError(() => angleBetweenColumns(10, Infinity, 1920, 1), 'second column');
  });

  it('property: invalid inputs throw InputError; valid ones give an angle in (0, 180) deg or 0 for a vanishing field', () => {
    fc.assert(
      fc.property(
        mixed(fc.double({ min: -100, max: 4000, noNaN: true })),
        mixed(fc.double({ min: -100, max: 4000, noNaN: true })),
        mixed(validWidth),
        mixed(validHfov),
        (u1, u2, W, h) => {
          const ok = isWidth(W) && isHfov(h) && isCol(u1, W) && isCol(u2, W) && u1 !== u2 && Math.abs(u2 - u1) <= W;
          if (!ok) {
            expect(() => angleBetweenColumns(u1, u2, W, h)).toThrow(InputError);
            return;
          }
          const a = angleBetweenColumns(u1, u2, W, h);
          expect(a >= 0 && a < Math.PI).toBe(true);
        },
      ),
    );
  });
});

describe('angleBetweenPoints', () => {
  const W = 1920;
  const H = 1080;
  const h = 67.3 * DEG;

  it('property: a horizontal pair on the centre row equals angleBetweenColumns', () => {
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1, noNaN: true }), fc.double({ min: 0, max: 1, noNaN: true }), validHfov, (s1, s2, hf) => {
        fc.pre(Math.abs(s2 - s1) * W >= 0.01);
        const a = angleBetweenPoints(s1 * W, H / 2, s2 * W, H / 2, W, H, hf);
        expect(a).toBeCloseTo(angleBetweenColumns(s1 * W, s2 * W, W, hf), 12);
      }),
    );
  });

  it('property: a horizontal pair off the centre row subtends no more than on the centre row', () => {
    fc.assert(
      fc.property(
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: 1, noNaN: true }),
        fc.double({ min: 0, max: H, noNaN: true }),
        (s1, s2, y) => {
          fc.pre(Math.abs(s2 - s1) * W >= 0.5);
          const off = angleBetweenPoints(s1 * W, y, s2 * W, y, W, H, h);
          expect(off).toBeLessThanOrEqual(angleBetweenColumns(s1 * W, s2 * W, W, h) + 1e-12);
        },
      ),
    );
  });

  it('top to bottom through the centre gives the vertical field; corner to corner the diagonal field', () => {
    expect(angleBetweenPoints(W / 2, 0, W / 2, H, W, H, h)).toBeCloseTo(vfovFromHfov(h, W / H), 12);
    const diag = 2 * Math.atan((Math.tan(h / 2) * Math.hypot(W, H)) / W);
    expect(angleBetweenPoints(0, 0, W, H, W, H, h)).toBeCloseTo(diag, 12);
  });

  it('property: equals the angle between the 3-D rays (x - W/2, y - H/2, f) (independent computation)', () => {
    fc.assert(
      fc.property(
        fc.tuple(fc.double({ min: 0, max: W, noNaN: true }), fc.double({ min: 0, max: H, noNaN: true })),
        fc.tuple(fc.double({ min: 0, max: W, noNaN: true }), fc.double({ min: 0, max: H, noNaN: true })),
        fc.double({ min: 5 * DEG, max: 150 * DEG, noNaN: true }),
        ([x1, y1], [x2, y2], hf) => {
          fc.pre(Math.hypot(x2 - x1, y2 - y1) >= 1);
          const f = focalLengthPx(W, hf);
          const ref = rayAngle([x1 - W / 2, y1 - H / 2, f], [x2 - W / 2, y2 - H / 2, f]);
          expect(angleBetweenPoints(x1, y1, x2, y2, W, H, hf)).toBeCloseTo(ref, 7);
        },
      ),
    );
  });

  it('rejects coincident points, points far outside and bad sizes, naming the field', () => {
    expectInputError(() => angleBetweenPoints(5, 5, 5, 5, W, H, h), 'span between the marked points');
    expectInputError(() => angleBetweenPoints(5, -2000, 5, 5, W, H, h), 'first point y');
    expectInputError(() => angleBetweenPoints(5, 5, 9999, 5, W, H, h), 'second point x');
    expectInputError(() => angleBetweenPoints(5, 5, 6, 5, W, 0, h), 'frame height');
    expectInputError(() => angleBetweenPoints(5, 5, 6, 5, W, H, 181 * DEG), 'horizontal field of view');
  });

  it('property: any input either throws InputError or gives an angle in [0, 180) deg', () => {
    const coord = mixed(fc.double({ min: -100, max: 2500, noNaN: true }));
    fc.assert(
      fc.property(coord, coord, coord, coord, mixed(validWidth), mixed(validWidth), mixed(validHfov), (x1, y1, x2, y2, w, hh, hf) => {
        const span = Math.hypot(x2 - x1, y2 - y1);
        const ok =
          isWidth(w) &&
          isWidth(hh) &&
          isHfov(hf) &&
          isCol(x1, w) &&
          isCol(x2, w) &&
          isCol(y1, hh) &&
          isCol(y2, hh) &&
          span > 0 &&
          span <= Math.hypot(w, hh);
        if (!ok) {
          expect(() => angleBetweenPoints(x1, y1, x2, y2, w, hh, hf)).toThrow(InputError);
          return;
        }
        const a = angleBetweenPoints(x1, y1, x2, y2, w, hh, hf);
        expect(a >= 0 && a < Math.PI).toBe(true);
      }),
    );
  });
});

describe('smallAngleSpan (cross-check only)', () => {
  it('is span / W x HFOV', () => {
    expect(smallAngleSpan(480, 1920, 60 * DEG)).toBeCloseTo(15 * DEG, 12);
  });
  it('rejects a zero span or one wider than the frame', () => {
    expectInputError(() => smallAngleSpan(0, 1920, 1), 'span');
    expectInputError(() => smallAngleSpan(1921, 1920, 1), 'span');
  });
});

describe('vfovFromHfov and hfovFromVfov', () => {
  it('36 x 24 mm at 24 mm: 73.74 deg horizontal gives 53.13 deg vertical (REFERENCES.md table)', () => {
    expect(vfovFromHfov(fovAlong(36, 24), 36 / 24) / DEG).toBeCloseTo(53.13, 2);
    expect(hfovFromVfov(fovAlong(24, 24), 36 / 24) / DEG).toBeCloseTo(73.74, 2);
  });

  it('property: the two are inverses and a square frame changes nothing', () => {
    fc.assert(
      fc.property(fc.double({ min: 1 * DEG, max: 170 * DEG, noNaN: true }), fc.double({ min: 0.1, max: 10, noNaN: true }), (hf, a) => {
        const v = vfovFromHfov(hf, a);
        expect(hfovFromVfov(v, a)).toBeCloseTo(hf, 9);
        expect(vfovFromHfov(hf, 1)).toBeCloseTo(hf, 12);
      }),
    );
  });

  it('rejects bad inputs, naming the field', () => {
    expectInputError(() => vfovFromHfov(0, 1), 'horizontal field of view');
    expectInputError(() => hfovFromVfov(Math.PI, 1), 'vertical field of view');
    expectInputError(() => vfovFromHfov(1, 0), 'aspect');
    expectInputError(() => hfovFromVfov(1, 11), 'aspect');
  });

  it('a result that would round to 180 deg is undetermined, not returned', () => {
    expect(() => hfovFromVfov(Math.PI - 1e-15, 10)).toThrow(UndeterminedError);
  });
});

describe('span moved along its own line (the Monte Carlo kernel)', () => {
  it('spanHalfAngleTanUnchecked equals tan(theta/2) of angleBetweenPoints on the moved ends (property)', async () => {
    const { spanHalfAngleTanUnchecked, spanLineConstants, angleBetweenPoints: angle } = await import('../../src/engine/camera');
    const W = 1920;
    const H = 1080;
    fc.assert(
      fc.property(
        // ends 10 px inside the frame, so a 3 px lengthening stays within the frame diagonal
        fc.double({ min: 10, max: W - 10, noNaN: true }),
        fc.double({ min: 10, max: H - 10, noNaN: true }),
        fc.double({ min: 10, max: W - 10, noNaN: true }),
        fc.double({ min: 10, max: H - 10, noNaN: true }),
        fc.double({ min: -3, max: 3, noNaN: true }),
        fc.double({ min: 5, max: 120, noNaN: true }),
        (x1, y1, x2, y2, e, hfovDeg) => {
          const len = Math.hypot(x2 - x1, y2 - y1);
          fc.pre(len > 10);
          const hx = (x2 - x1) / len / 2;
          const hy = (y2 - y1) / len / 2;
          const hfov = (hfovDeg * Math.PI) / 180;
          const want = Math.tan(angle(x1 - hx * e, y1 - hy * e, x2 + hx * e, y2 + hy * e, W, H, hfov) / 2);
          const [l, c0, q0] = spanLineConstants(x1, y1, x2, y2, W, H);
          const got = spanHalfAngleTanUnchecked(l!, c0!, q0!, e, (2 * Math.tan(hfov / 2)) / W);
          expect(Math.abs(got - want)).toBeLessThanOrEqual(1e-9 * want);
        },
      ),
    );
  });
});
