import { describe, it, expect } from 'vitest';
import fc from 'fast-check';
import {
  cssToIntrinsic,
  devicePixelsPerIntrinsic,
  intrinsicToCss,
  isOnPicture,
  mappingFromLayout,
  parseObjectFit,
  parseObjectPosition,
  pictureRect,
  type LayoutInput,
  type Mapping,
  type ObjectFit,
  type ObjectPosition,
} from '../../src/engine/display';
import { MAX_FRAME_PX } from '../../src/engine/constants';
import { expectInputError } from './expect-error';

const pos = (xp: number, xpx: number, yp: number, ypx: number): ObjectPosition => ({
  x: { percent: xp, px: xpx },
  y: { percent: yp, px: ypx },
});
const CENTRE = pos(50, 0, 50, 0);
const FITS: ObjectFit[] = ['contain', 'cover', 'fill', 'none', 'scale-down'];

function closeRect(r: { x: number; y: number; width: number; height: number }, e: [number, number, number, number], digits = 9): void {
  expect(r.x).toBeCloseTo(e[0], digits);
  expect(r.y).toBeCloseTo(e[1], digits);
  expect(r.width).toBeCloseTo(e[2], digits);
  expect(r.height).toBeCloseTo(e[3], digits);
}

describe('parseObjectFit', () => {
  it('reads the five keywords of CSS Images 3, 5.5, in any case and with spaces', () => {
    for (const f of FITS) expect(parseObjectFit(f)).toBe(f);
    expect(parseObjectFit(' Cover ')).toBe('cover');
  });
  it('rejects anything else, naming object-fit', () => {
    for (const bad of ['', 'stretch', 'contain cover', 'inherit']) expectInputError(() => parseObjectFit(bad), 'object-fit', { exactField: true });
  });
});

describe('parseObjectPosition', () => {
  it('reads the values Chromium computes (observed in headless Chromium 156 for the specified values in the comments)', () => {
    const cases: [string, ObjectPosition][] = [
      ['50% 50%', pos(50, 0, 50, 0)], // initial value, CSS Images 3 5.6
      ['0% 100%', pos(0, 0, 100, 0)], // "left bottom"
      ['10px 20px', pos(0, 10, 0, 20)], // "left 10px top 20px"
      ['calc(100% - 10px) calc(100% - 20px)', pos(100, -10, 100, -20)], // "right 10px bottom 20px"
      ['calc(100% - 10px) 80%', pos(100, -10, 80, 0)], // "right 10px bottom 20%"
      ['calc(100% - 10px) 0px', pos(100, -10, 0, 0)], // "top 0 right 10px"
      ['calc(50% + 10px) calc(-10% + 20px)', pos(50, 10, -10, 20)],
      ['37.7953px 75.5906px', pos(0, 37.7953, 0, 75.5906)], // "1cm 2cm"
      ['-10.5px 1000px', pos(0, -10.5, 0, 1000)], // "-10.5px 1e3px"
      ['0px 0px', pos(0, 0, 0, 0)],
    ];
    for (const [s, e] of cases) {
      const p = parseObjectPosition(s);
      expect(p.x.percent).toBeCloseTo(e.x.percent, 12);
      expect(p.x.px).toBeCloseTo(e.x.px, 12);
      expect(p.y.percent).toBeCloseTo(e.y.percent, 12);
      expect(p.y.px).toBeCloseTo(e.y.px, 12);
    }
  });

  it('reads keyword positions as CSS 2.1 section 14.2.1 tabulates them (e.g. "top" = "50% 0%", "right top" = "100% 0%")', () => {
    const table: [string[], number, number][] = [
      [['top left', 'left top'], 0, 0],
      [['top', 'top center', 'center top'], 50, 0],
      [['right top', 'top right'], 100, 0],
      [['left', 'left center', 'center left'], 0, 50],
      [['center', 'center center'], 50, 50],
      [['right', 'right center', 'center right'], 100, 50],
      [['bottom left', 'left bottom'], 0, 100],
      [['bottom', 'bottom center', 'center bottom'], 50, 100],
      [['bottom right', 'right bottom'], 100, 100],
    ];
    for (const [forms, x, y] of table) {
      for (const f of forms) expect(parseObjectPosition(f), f).toEqual(pos(x, 0, y, 0));
    }
  });

  it('reads the examples of CSS Backgrounds 3 for <position> (from memory): "left 10px top 15px" = 10px 15px, "left 15px" = 0px 15px, "10px top" = 10px 0px', () => {
    expect(parseObjectPosition('left 10px top 15px')).toEqual(pos(0, 10, 0, 15));
    expect(parseObjectPosition('left top')).toEqual(pos(0, 0, 0, 0));
    expect(parseObjectPosition('10px 15px')).toEqual(pos(0, 10, 0, 15));
    expect(parseObjectPosition('left 15px')).toEqual(pos(0, 0, 0, 15));
    expect(parseObjectPosition('10px top')).toEqual(pos(0, 10, 0, 0));
  });

  it('reads edge offsets in either order, from the far edges as 100 % minus the offset', () => {
    expect(parseObjectPosition('right 10px bottom 20px')).toEqual(pos(100, -10, 100, -20));
    expect(parseObjectPosition('bottom 10px right 20px')).toEqual(pos(100, -20, 100, -10));
    expect(parseObjectPosition('right 10px bottom 20%')).toEqual(pos(100, -10, 80, -0));
    expect(parseObjectPosition('top 0 right 10px')).toEqual(pos(100, -10, 0, 0));
    expect(parseObjectPosition('RIGHT 25% TOP 5PX')).toEqual(pos(75, -0, 0, 5));
  });

  it('converts absolute units by CSS Values 4 (1in = 96px = 2.54cm = 72pt = 6pc; 1q = 0.25mm)', () => {
    const p = parseObjectPosition('1in 2.54cm');
    expect(p.x.px).toBeCloseTo(96, 12);
    expect(p.y.px).toBeCloseTo(96, 12);
    const q = parseObjectPosition('72pt 6pc');
    expect(q.x.px).toBeCloseTo(96, 12);
    expect(q.y.px).toBeCloseTo(96, 12);
    const r = parseObjectPosition('25.4mm 101.6q');
    expect(r.x.px).toBeCloseTo(96, 12);
    expect(r.y.px).toBeCloseTo(96, 12);
  });

  it('evaluates calc() sums, products, groups and nesting', () => {
    expect(parseObjectPosition('calc((100% - 20px) / 2) 0')).toEqual(pos(50, -10, 0, 0));
    expect(parseObjectPosition('calc(2 * 10px + 5%) calc(10px*3)')).toEqual(pos(5, 20, 0, 30));
    expect(parseObjectPosition('calc(calc(10px) + 1%) calc(-1 * (50% - 4px))')).toEqual(pos(1, 10, -50, 4));
    expect(parseObjectPosition('calc(1.5e1px) 1e-1%')).toEqual(pos(0, 15, 0.1, 0));
  });

  it('property: any percent + px serialised as Chromium does round-trips, and equals its edge-offset form', () => {
    const comp = fc.record({
      percent: fc.double({ min: -500, max: 500, noNaN: true }),
      px: fc.double({ min: -5000, max: 5000, noNaN: true }),
    });
    const ser = (c: { percent: number; px: number }) =>
      c.px < 0 ? `calc(${c.percent}% - ${-c.px}px)` : `calc(${c.percent}% + ${c.px}px)`;
    fc.assert(
      fc.property(comp, comp, (a, b) => {
        const p = parseObjectPosition(`${ser(a)} ${ser(b)}`);
        expect(p.x.percent).toBeCloseTo(a.percent, 9);
        expect(p.x.px).toBeCloseTo(a.px, 9);
        expect(p.y.percent).toBeCloseTo(b.percent, 9);
        expect(p.y.px).toBeCloseTo(b.px, 9);
      }),
    );
    fc.assert(
      fc.property(fc.double({ min: 0, max: 1000, noNaN: true }), fc.double({ min: 0, max: 1000, noNaN: true }), (ox, oy) => {
        const a = parseObjectPosition(`right ${ox}px bottom ${oy}px`);
        const b = parseObjectPosition(`calc(100% - ${ox}px) calc(100% - ${oy}px)`);
        expect(a.x.percent).toBe(b.x.percent);
        expect(a.x.px).toBeCloseTo(b.x.px, 12);
        expect(a.y.px).toBeCloseTo(b.y.px, 12);
      }),
    );
  });

  it('rejects what is not a <position> of absolute lengths, naming object-position', () => {
    const bad = [
      '',
      '   ',
      'inherit',
      '1em 2em', // relative units: computed values never have them
      '10vw 0',
      '10 20', // a bare number is a length only when 0
      'left right',
      'top bottom',
      'top 10px',
      '10px left',
      'left 10px center', // no 3-value form in css-values-4 <position>
      'center left 10px',
      'left 10px top',
      '50% 50% 50%',
      'left 10px right 20px',
      'center 10px top 5px',
      '1% 2% 3% 4% 5%',
      'calc(10px * 2px) 0',
      'calc(10px / 0) 0',
      'calc(10px + 2) 0',
      'calc(10px 0',
      '10px) 0',
      'min(10px, 5%) 0',
      '1constructor 0',
      '10px, 20px',
    ];
    for (const s of bad) expectInputError(() => parseObjectPosition(s), 'object-position', { exactField: true });
    expectInputError(() => parseObjectPosition(undefined as unknown as string), 'object-position');
  });
});

describe('pictureRect: a 1920 x 1080 video in a 400 x 400 box (hand-computed)', () => {
  const R = (fit: ObjectFit, p: ObjectPosition) => pictureRect(400, 400, 1920, 1080, fit, p);
  const CW = (1920 * 400) / 1080; // cover width, 711.11

  it('contain: 400 x 225, letterboxed by 87.5 px at the centre', () => {
    closeRect(R('contain', CENTRE), [0, 87.5, 400, 225]);
    closeRect(R('contain', pos(0, 0, 0, 0)), [0, 0, 400, 225]);
    closeRect(R('contain', pos(100, 0, 100, 0)), [0, 175, 400, 225]);
    closeRect(R('contain', parseObjectPosition('10px 20px')), [10, 20, 400, 225]);
    closeRect(R('contain', parseObjectPosition('right 10px bottom 20px')), [-10, 155, 400, 225]);
  });

  it('cover: 711.1 x 400, cropped by 155.6 px either side at the centre', () => {
    closeRect(R('cover', CENTRE), [(400 - CW) / 2, 0, CW, 400]);
    expect(R('cover', CENTRE).x).toBeCloseTo(-155.556, 3);
    expect(R('cover', CENTRE).width).toBeCloseTo(711.111, 3);
    closeRect(R('cover', pos(0, 0, 0, 0)), [0, 0, CW, 400]);
    closeRect(R('cover', pos(100, 0, 100, 0)), [400 - CW, 0, CW, 400]);
    closeRect(R('cover', parseObjectPosition('10px 20px')), [10, 20, CW, 400]);
    closeRect(R('cover', parseObjectPosition('right 10px bottom 20px')), [400 - CW - 10, -20, CW, 400]);
  });

  it('fill: the box itself, whatever the percentages; lengths still shift it', () => {
    closeRect(R('fill', CENTRE), [0, 0, 400, 400]);
    closeRect(R('fill', pos(100, 0, 0, 0)), [0, 0, 400, 400]);
    closeRect(R('fill', parseObjectPosition('10px 20px')), [10, 20, 400, 400]);
    closeRect(R('fill', parseObjectPosition('right 10px bottom 20px')), [-10, -20, 400, 400]);
  });

  it('none: natural size, centred (-760, -340), or pinned to a corner', () => {
    closeRect(R('none', CENTRE), [-760, -340, 1920, 1080]);
    closeRect(R('none', pos(0, 0, 0, 0)), [0, 0, 1920, 1080]);
    closeRect(R('none', pos(100, 0, 100, 0)), [-1520, -680, 1920, 1080]);
    closeRect(R('none', parseObjectPosition('right 10px bottom 20px')), [-1530, -700, 1920, 1080]);
  });

  it('scale-down: like contain for a large video, like none for a small one (320 x 180 stays 320 x 180)', () => {
    closeRect(R('scale-down', CENTRE), [0, 87.5, 400, 225]);
    closeRect(pictureRect(400, 400, 320, 180, 'scale-down', CENTRE), [40, 110, 320, 180]);
    closeRect(pictureRect(400, 400, 320, 180, 'contain', CENTRE), [0, 87.5, 400, 225]);
    closeRect(pictureRect(400, 400, 320, 180, 'none', CENTRE), [40, 110, 320, 180]);
  });

  it('pillarboxes a portrait 1080 x 1920 video in a 16:9 box', () => {
    const w = (1080 * 360) / 1920;
    closeRect(pictureRect(640, 360, 1080, 1920, 'contain', CENTRE), [(640 - w) / 2, 0, w, 360]);
  });
});

describe('pictureRect: invariants (property tests)', () => {
  const size = fc.double({ min: 1, max: 4000, noNaN: true });
  const vid = fc.integer({ min: 1, max: 8000 });
  const pct = fc.double({ min: -100, max: 200, noNaN: true });

  it('contain fits inside and touches two sides; cover covers and touches two sides; both keep the aspect', () => {
    fc.assert(
      fc.property(size, size, vid, vid, (bw, bh, vw, vh) => {
        const c = pictureRect(bw, bh, vw, vh, 'contain', CENTRE);
        const k = pictureRect(bw, bh, vw, vh, 'cover', CENTRE);
        const tol = 1e-9 * Math.max(bw, bh, c.width, k.width);
        expect(c.width).toBeLessThanOrEqual(bw + tol);
        expect(c.height).toBeLessThanOrEqual(bh + tol);
        expect(Math.min(Math.abs(c.width - bw), Math.abs(c.height - bh))).toBeLessThanOrEqual(tol);
        expect(k.width).toBeGreaterThanOrEqual(bw - tol);
        expect(k.height).toBeGreaterThanOrEqual(bh - tol);
        expect(Math.min(Math.abs(k.width - bw), Math.abs(k.height - bh))).toBeLessThanOrEqual(tol);
        expect(c.width / c.height).toBeCloseTo(vw / vh, 6);
        expect(k.width / k.height).toBeCloseTo(vw / vh, 6);
      }),
    );
  });

  it('scale-down is whichever of none and contain is smaller (CSS Images 3, 5.5)', () => {
    fc.assert(
      fc.property(size, size, vid, vid, (bw, bh, vw, vh) => {
        const none = pictureRect(bw, bh, vw, vh, 'none', CENTRE);
        const contain = pictureRect(bw, bh, vw, vh, 'contain', CENTRE);
        const smaller = none.width <= contain.width ? none : contain;
        const sd = pictureRect(bw, bh, vw, vh, 'scale-down', CENTRE);
        expect(sd.width).toBeCloseTo(smaller.width, 9);
        expect(sd.height).toBeCloseTo(smaller.height, 9);
      }),
    );
  });

  it('a percentage p aligns the point p % across the picture with the point p % across the box (CSS 2.1, 14.2.1)', () => {
    fc.assert(
      fc.property(size, size, vid, vid, pct, pct, fc.constantFrom(...FITS), (bw, bh, vw, vh, px, py, fit) => {
        const r = pictureRect(bw, bh, vw, vh, fit, pos(px, 0, py, 0));
        const scale = Math.max(bw, bh, r.width, r.height);
        expect(Math.abs(r.x + (px / 100) * r.width - (px / 100) * bw)).toBeLessThan(1e-9 * scale * 3);
        expect(Math.abs(r.y + (py / 100) * r.height - (py / 100) * bh)).toBeLessThan(1e-9 * scale * 3);
      }),
    );
  });

  it('rejects bad sizes, fits and positions, naming the field', () => {
    expectInputError(() => pictureRect(0, 400, 1920, 1080, 'contain', CENTRE), 'content box width');
    expectInputError(() => pictureRect(400, NaN, 1920, 1080, 'contain', CENTRE), 'content box height');
    const e = expectInputError(() => pictureRect(400, 400, 0, 0, 'contain', CENTRE), 'video width');
    expect(e.message).toContain('metadata');
    expectInputError(() => pictureRect(400, 400, 1920, -1, 'contain', CENTRE), 'video height');
    expectInputError(() => pictureRect(400, 400, MAX_FRAME_PX + 1, 1080, 'contain', CENTRE), 'video width');
    expectInputError(() => pictureRect(400, 400, 1920, 1080, 'stretch' as ObjectFit, CENTRE), 'object-fit');
    expectInputError(() => pictureRect(400, 400, 1920, 1080, 'contain', pos(NaN, 0, 50, 0)), 'object-position x percent');
    expectInputError(() => pictureRect(400, 400, 1920, 1080, 'contain', pos(50, 0, 50, Infinity)), 'object-position y offset');
    expectInputError(() => pictureRect(400, 400, 1920, 1080, 'contain', null as unknown as ObjectPosition), 'object-position');
  });
});

/** A mapping built by hand, independent of mappingFromLayout. */
function handMapping(fit: ObjectFit, position: ObjectPosition, s = 1): Mapping {
  return {
    picture: pictureRect(400, 400, 1920, 1080, fit, position),
    videoWidth: 1920,
    videoHeight: 1080,
    scaleX: s,
    scaleY: s,
    originX: 100,
    originY: 50,
    boxWidth: 400,
    boxHeight: 400,
  };
}

describe('cssToIntrinsic and intrinsicToCss', () => {
  it('maps the centre of a letterboxed picture to the centre of the video, and the bars outside [0, H]', () => {
    const m = handMapping('contain', CENTRE);
    const c = cssToIntrinsic(100 + 200, 50 + 200, m);
    expect(c.x).toBeCloseTo(960, 9);
    expect(c.y).toBeCloseTo(540, 9);
    // top-left corner of the picture: x 0, y 87.5 in the box
    const tl = cssToIntrinsic(100, 50 + 87.5, m);
    expect(tl.x).toBeCloseTo(0, 9);
    expect(tl.y).toBeCloseTo(0, 9);
    // 10 px into the top bar: (10 - 87.5) * 1080 / 225 = -372
    expect(cssToIntrinsic(300, 60, m).y).toBeCloseTo(-372, 9);
    expect(cssToIntrinsic(300, 60, m).x).toBeCloseTo(960, 9);
  });

  it('maps a cropped (cover) picture: the box edge is 155.6 css px into the picture', () => {
    const m = handMapping('cover', CENTRE);
    const k = 1080 / 400; // intrinsic px per css px
    expect(cssToIntrinsic(100, 50, m).x).toBeCloseTo((155.5555555555 * k), 6);
    expect(cssToIntrinsic(100, 50, m).y).toBeCloseTo(0, 9);
    const back = intrinsicToCss(0, 1080, m);
    expect(back.x).toBeCloseTo(100 - 155.5555555555, 6);
    expect(back.y).toBeCloseTo(450, 9);
  });

  it('property: cssToIntrinsic(intrinsicToCss(p)) = p and back, for any fit, position, scale and point', () => {
    const arb = fc.record({
      bw: fc.double({ min: 10, max: 2000, noNaN: true }),
      bh: fc.double({ min: 10, max: 2000, noNaN: true }),
      vw: fc.integer({ min: 180, max: 7680 }),
      vh: fc.integer({ min: 180, max: 4320 }),
      fit: fc.constantFrom(...FITS),
      xp: fc.double({ min: -50, max: 150, noNaN: true }),
      xo: fc.double({ min: -500, max: 500, noNaN: true }),
      yp: fc.double({ min: -50, max: 150, noNaN: true }),
      yo: fc.double({ min: -500, max: 500, noNaN: true }),
      sx: fc.double({ min: 0.1, max: 4, noNaN: true }),
      sy: fc.double({ min: 0.1, max: 4, noNaN: true }),
      ox: fc.double({ min: -5000, max: 5000, noNaN: true }),
      oy: fc.double({ min: -5000, max: 5000, noNaN: true }),
      u: fc.double({ min: -0.25, max: 1.25, noNaN: true }),
      v: fc.double({ min: -0.25, max: 1.25, noNaN: true }),
    });
    fc.assert(
      fc.property(arb, (a) => {
        const m: Mapping = {
          picture: pictureRect(a.bw, a.bh, a.vw, a.vh, a.fit, pos(a.xp, a.xo, a.yp, a.yo)),
          videoWidth: a.vw,
          videoHeight: a.vh,
          scaleX: a.sx,
          scaleY: a.sy,
          originX: a.ox,
          originY: a.oy,
          boxWidth: a.bw,
          boxHeight: a.bh,
        };
        const x = a.u * a.vw;
        const y = a.v * a.vh;
        const c = intrinsicToCss(x, y, m);
        const p = cssToIntrinsic(c.x, c.y, m);
        const tol = 1e-9 * (a.vw + a.vh) * 10;
        expect(Math.abs(p.x - x)).toBeLessThan(tol);
        expect(Math.abs(p.y - y)).toBeLessThan(tol);
        const q = intrinsicToCss(p.x, p.y, m);
        // relative: a cover picture of an extreme aspect can be a million css px across
        expect(Math.abs(q.x - c.x)).toBeLessThan(1e-9 * (1 + Math.abs(c.x)));
        expect(Math.abs(q.y - c.y)).toBeLessThan(1e-9 * (1 + Math.abs(c.y)));
      }),
    );
  });

  it('rejects a malformed mapping or point, naming the field', () => {
    const m = handMapping('contain', CENTRE);
    expectInputError(() => cssToIntrinsic(NaN, 0, m), 'pointer x');
    expectInputError(() => intrinsicToCss(0, Infinity, m), 'video y');
    expectInputError(() => cssToIntrinsic(0, 0, { ...m, scaleX: 0 }), 'display scale x');
    expectInputError(() => cssToIntrinsic(0, 0, { ...m, videoWidth: 0 }), 'video width');
    expectInputError(() => intrinsicToCss(0, 0, { ...m, picture: { ...m.picture, width: 0 } }), 'picture width');
    expectInputError(() => isOnPicture(0, 0, { ...m, boxHeight: -1 }), 'content box height');
    expectInputError(() => cssToIntrinsic(0, 0, null as unknown as Mapping), 'display mapping');
  });
});

describe('isOnPicture', () => {
  it('is false in the letterbox bars and true on the picture (contain)', () => {
    const m = handMapping('contain', CENTRE);
    expect(isOnPicture(300, 60, m)).toBe(false); // top bar
    expect(isOnPicture(300, 50 + 399, m)).toBe(false); // bottom bar
    expect(isOnPicture(300, 250, m)).toBe(true);
    expect(isOnPicture(100, 50 + 87.5, m)).toBe(true); // picture corner
    expect(isOnPicture(99.9, 250, m)).toBe(false); // left of the box
  });

  it('is false where a cover or none picture overflows the box, which clips it', () => {
    const m = handMapping('cover', CENTRE);
    expect(isOnPicture(100 - 50, 250, m)).toBe(false); // on the picture, outside the box
    expect(isOnPicture(100 + 1, 250, m)).toBe(true);
    expect(isOnPicture(100 + 450, 250, m)).toBe(false); // right of the box, the picture runs to 555
    expect(isOnPicture(100 + 399, 250, m)).toBe(true);
    expect(cssToIntrinsic(100 - 50, 250, m).x).toBeGreaterThan(0); // yet it maps inside the video
  });
});

function layout(over: Partial<LayoutInput> = {}): LayoutInput {
  return {
    rect: { left: 100, top: 50, width: 400, height: 400 },
    offsetWidth: 400,
    offsetHeight: 400,
    border: { left: 0, top: 0, right: 0, bottom: 0 },
    padding: { left: 0, top: 0, right: 0, bottom: 0 },
    videoWidth: 1920,
    videoHeight: 1080,
    objectFit: 'contain',
    objectPosition: '50% 50%',
    ...over,
  };
}

describe('mappingFromLayout', () => {
  it('without transforms equals the hand-built mapping', () => {
    const m = mappingFromLayout(layout());
    expect(m).toEqual(handMapping('contain', CENTRE));
  });

  it('takes border and padding off the box and moves the origin past them', () => {
    // content 400 x 300 with border 3 px and padding 5 px 7 px: offset size 420 x 316
    const m = mappingFromLayout(
      layout({
        rect: { left: 10, top: 20, width: 420, height: 316 },
        offsetWidth: 420,
        offsetHeight: 316,
        border: { left: 3, top: 3, right: 3, bottom: 3 },
        padding: { left: 7, top: 5, right: 7, bottom: 5 },
      }),
    );
    expect(m.originX).toBe(20);
    expect(m.originY).toBe(28);
    expect(m.boxWidth).toBe(400);
    expect(m.boxHeight).toBe(300);
    // 16:9 in 400 x 300: 400 x 225, 37.5 px bars
    closeRect(m.picture, [0, 37.5, 400, 225]);
    const p = cssToIntrinsic(20 + 400, 28 + 37.5 + 225, m);
    expect(p.x).toBeCloseTo(1920, 9);
    expect(p.y).toBeCloseTo(1080, 9);
  });

  for (const s of [1.5, 0.5]) {
    it(`follows a CSS scale of ${s}: every point lands where an independent computation puts it`, () => {
      const b = 2;
      const pad = 4;
      const ow = 400 + 2 * b + 2 * pad;
      const oh = 300 + 2 * b + 2 * pad;
      const m = mappingFromLayout(
        layout({
          rect: { left: 30, top: 40, width: ow * s, height: oh * s },
          offsetWidth: ow,
          offsetHeight: oh,
          border: { left: b, top: b, right: b, bottom: b },
          padding: { left: pad, top: pad, right: pad, bottom: pad },
          objectFit: 'cover',
          objectPosition: 'calc(100% - 10px) 0%',
        }),
      );
      expect(m.scaleX).toBe(s);
      expect(m.scaleY).toBe(s);
      // independently: cover of 1920 x 1080 in 400 x 300 is 533.33 x 300, x = (400 - 533.33) - 10
      const pw = (1920 * 300) / 1080;
      const px = 400 - pw - 10;
      for (const [u, v] of [
        [0, 0],
        [960, 540],
        [1920, 1080],
        [123.4, 1000.1],
      ] as const) {
        const c = intrinsicToCss(u, v, m);
        expect(c.x).toBeCloseTo(30 + s * (b + pad + px + (u * pw) / 1920), 9);
        expect(c.y).toBeCloseTo(40 + s * (b + pad + (v * 300) / 1080), 9);
        const back = cssToIntrinsic(c.x, c.y, m);
        expect(back.x).toBeCloseTo(u, 9);
        expect(back.y).toBeCloseTo(v, 9);
      }
    });
  }

  it('treats a fractional layout width (offsetWidth rounded, rect exact) as no transform (observed in Chromium: 420.59 vs 421)', () => {
    const m = mappingFromLayout(
      layout({
        rect: { left: 0, top: 0, width: 420.59375, height: 316 },
        offsetWidth: 421,
        offsetHeight: 316,
        border: { left: 3, top: 3, right: 3, bottom: 3 },
        padding: { left: 7, top: 5, right: 7, bottom: 5 },
      }),
    );
    expect(m.scaleX).toBe(1);
    expect(m.boxWidth).toBeCloseTo(400.59375, 12);
  });

  it('follows CSS zoom 1.5 within a tenth of a px (values observed in Chromium: rect 629 x 473, offset 419 x 315, border 2.667 px)', () => {
    const m = mappingFromLayout(
      layout({
        rect: { left: 0, top: 0, width: 629, height: 473 },
        offsetWidth: 419,
        offsetHeight: 315,
        border: { left: 8 / 3, top: 8 / 3, right: 8 / 3, bottom: 8 / 3 },
        padding: { left: 7, top: 5, right: 7, bottom: 5 },
        objectFit: 'fill',
      }),
    );
    // the 400 x 300 content box is drawn 600 x 450 on screen, 4 + 10.5 px from the left
    expect(Math.abs(m.originX - 14.5)).toBeLessThan(0.1);
    expect(Math.abs(m.boxWidth * m.scaleX - 600)).toBeLessThan(0.1);
    expect(Math.abs(m.boxHeight * m.scaleY - 450)).toBeLessThan(0.5);
  });

  it('parses fit and position from computed strings', () => {
    const m = mappingFromLayout(layout({ objectFit: 'none', objectPosition: 'calc(100% - 10px) calc(100% - 20px)' }));
    closeRect(m.picture, [-1530, -700, 1920, 1080]);
  });

  it('rejects bad layouts, naming the field', () => {
    const e = expectInputError(() => mappingFromLayout(layout({ videoWidth: 0, videoHeight: 0 })), 'video width');
    expect(e.message).toContain('no intrinsic size');
    expectInputError(() => mappingFromLayout(layout({ rect: { left: 0, top: 0, width: 0, height: 400 } })), 'element width on screen');
    expectInputError(() => mappingFromLayout(layout({ offsetHeight: NaN })), 'element offset height');
    expectInputError(() => mappingFromLayout(layout({ border: { left: -1, top: 0, right: 0, bottom: 0 } })), 'border left');
    expectInputError(() => mappingFromLayout(layout({ padding: { left: 0, top: 0, right: 0, bottom: 400 } })), 'content box height');
    expectInputError(() => mappingFromLayout(layout({ objectFit: 'squash' })), 'object-fit');
    expectInputError(() => mappingFromLayout(layout({ objectPosition: 'left 1em top 0' })), 'object-position');
    expectInputError(() => mappingFromLayout(null as unknown as LayoutInput), 'layout');
  });
});

describe('devicePixelsPerIntrinsic', () => {
  it('is dpr x scale x picture size / video size: a 1920 px video contained in 400 css px at dpr 2 gets 0.4167', () => {
    const d = devicePixelsPerIntrinsic(handMapping('contain', CENTRE), 2);
    expect(d.x).toBeCloseTo((2 * 400) / 1920, 12);
    expect(d.y).toBeCloseTo((2 * 225) / 1080, 12);
    const z = devicePixelsPerIntrinsic(handMapping('none', CENTRE, 1.5), 1);
    expect(z.x).toBeCloseTo(1.5, 12);
  });

  it('rejects a bad ratio', () => {
    expectInputError(() => devicePixelsPerIntrinsic(handMapping('contain', CENTRE), 0), 'device pixel ratio');
    expectInputError(() => devicePixelsPerIntrinsic(handMapping('contain', CENTRE), NaN), 'device pixel ratio');
  });
});
