import { describe, expect, it } from 'vitest';
import { mappingFromLayout } from '../../src/engine/display';
import { Rng } from '../../src/engine/rng';
import {
  handSigmaPx,
  intrinsicPerCssAlong,
  markSigmaPx,
  MAX_MOVE_PX,
  MAX_SPAN_CHANGE,
  SNAP_FLOOR_PX,
  snapSpanEnds,
  type EndInput,
  type EndResult,
} from '../../src/engine/span-ends';
import { expectInputError } from './expect-error';
import { aircraftSide, renderPolygons, type AircraftSpec, type EndShape, type SceneOptions } from './silhouette';

/*
 * The ends of a span on small invented side-view silhouettes (test/engine/silhouette.ts): each
 * picture holds the exact area of every pixel the polygon covers, so the true ends (the nose tip and
 * the tail end, on the axis) are known exactly.
 */

const W = 60;
const H = 40;
/** A hand-placed end at one intrinsic px per CSS px, without the lens: sqrt(0.5^2 + 1/12). */
const HAND = Math.hypot(0.5, 1 / Math.sqrt(12));

function scene(spec: AircraftSpec, o: Partial<SceneOptions> = {}) {
  const { polygon, ends } = aircraftSide(spec);
  return { img: renderPolygons([polygon], { width: W, height: H, ...o }), ends };
}

const at = (x: number, y: number, sigmaPx = HAND): EndInput => ({ x, y, sigmaPx });
/** Error of an end along the span, positive outward (the span too long). */
const errOf = (r: EndResult, k: number, ends: [number, number]) => (k === 0 ? ends[0] - r.x : r.x - ends[1]);

describe('the hand floor', () => {
  it('a hand-placed end: half a CSS px at the zoom of the moment (common practice) and the pixel rounding 1/sqrt(12), in quadrature', () => {
    expect(handSigmaPx(1, false)).toBeCloseTo(Math.sqrt(0.25 + 1 / 12), 12);
    // a video three times wider than it is drawn: each CSS px covers 3 video px
    expect(handSigmaPx(3, false)).toBeCloseTo(Math.sqrt(2.25 + 1 / 12), 12);
    // with the lens the eye sees the pixels; the pointer still moves by whole CSS px
    expect(handSigmaPx(3, true)).toBeCloseTo(Math.sqrt(9 / 12 + 1 / 12), 12);
    // drawn much larger than it is, the picture's own pixels are the limit
    expect(handSigmaPx(0.01, false)).toBeCloseTo(1 / Math.sqrt(12), 3);
    expectInputError(() => handSigmaPx(0, false), 'intrinsic px per CSS px');
  });

  it('rounding to the nearest pixel has sigma 1/sqrt(12): 100 000 seeded uniform offsets agree within 1 %', () => {
    const rng = new Rng(12);
    let ss = 0;
    const n = 100_000;
    for (let i = 0; i < n; i++) {
      const x = rng.between(0, 50);
      ss += (Math.round(x) - x) ** 2;
    }
    expect(Math.sqrt(ss / n) / (1 / Math.sqrt(12))).toBeCloseTo(1, 2);
  });

  it('the zoom along a span comes from the mapping: a 1920 x 1080 video drawn 640 x 360 gives 3, an unevenly filled box gives each axis its own', () => {
    const layout = (w: number, h: number, fit: string) =>
      mappingFromLayout({
        rect: { left: 10, top: 20, width: w, height: h },
        offsetWidth: w,
        offsetHeight: h,
        border: { left: 0, top: 0, right: 0, bottom: 0 },
        padding: { left: 0, top: 0, right: 0, bottom: 0 },
        videoWidth: 1920,
        videoHeight: 1080,
        objectFit: fit,
        objectPosition: '50% 50%',
      });
    expect(intrinsicPerCssAlong(layout(640, 360, 'contain'), 1, 0)).toBeCloseTo(3, 12);
    expect(intrinsicPerCssAlong(layout(640, 360, 'contain'), 3, -4)).toBeCloseTo(3, 12);
    // object-fit: fill into 640 x 540: 3 video px per CSS px across, 2 down; along the diagonal the
    // CSS length of one video px is sqrt((1/3)^2 + (1/2)^2) / sqrt(2)
    const fill = layout(640, 540, 'fill');
    expect(intrinsicPerCssAlong(fill, 0, 1)).toBeCloseTo(2, 12);
    expect(intrinsicPerCssAlong(fill, 1, 1)).toBeCloseTo(Math.SQRT2 / Math.hypot(1 / 3, 1 / 2), 12);
    expectInputError(() => intrinsicPerCssAlong(fill, 0, 0), 'direction');
  });

  it("the mark's one sigma is the ends' root mean square: sqrt(2) x it is the sigma of the span, as two independent ends give it (100 000 seeded draws)", () => {
    for (const [sa, sb] of [
      [0.3, 0.3],
      [0.25, 1.5],
      [0.58, 0.1],
    ] as const) {
      const m = markSigmaPx(sa, sb);
      expect(Math.SQRT2 * m).toBeCloseTo(Math.hypot(sa, sb), 12);
      const rng = new Rng(99);
      let ss = 0;
      const n = 100_000;
      for (let i = 0; i < n; i++) ss += (sb * rng.normal() - sa * rng.normal()) ** 2;
      expect(Math.sqrt(ss / n) / (Math.SQRT2 * m)).toBeCloseTo(1, 1);
    }
    expect(markSigmaPx(0.4, 0.4)).toBeCloseTo(0.4, 12);
    expectInputError(() => markSigmaPx(-1, 0.2), 'end sigma');
  });
});

describe('snapSpanEnds: a snap refines an end, never jumps to other structure (issue 12)', () => {
  it('on a 17 px silhouette, keeps the span within 5 % where the old snap jumped 5 px onto the nacelle (span -39 %)', () => {
    // the span drawn 0.8 px below the axis, through the lower half of a 1.5 px fuselage: the nose
    // tip is faint there and the nacelle's intake face, 5.1 px behind it, is a strong edge; the
    // overlay's old snap (the strongest edge within a third of the span) moved the ends by -5.05
    // and -1.58 px
    const s = scene({ x0: 20.3, y: 20.4, length: 17, nose: 'pointed', tail: 'pointed', body: 0.09 }, { blur: 0.5 });
    const y = 21.2;
    const [a, b] = snapSpanEnds(s.img, [at(s.ends[0], y), at(s.ends[1], y)], 'both');
    for (const [k, e] of [a, b].entries()) {
      expect(Math.abs(e.movePx)).toBeLessThanOrEqual(MAX_MOVE_PX);
      expect(Math.abs(errOf(e, k, s.ends))).toBeLessThanOrEqual(2 * e.sigmaPx);
    }
    expect(Math.abs((b.x - a.x) / 17 - 1)).toBeLessThanOrEqual(MAX_SPAN_CHANGE);
  });

  it('keeps a point 3 px inside the nose and says why: the nearest edge is the nacelle, 2 px further in', () => {
    const s = scene({ x0: 20.3, y: 20.4, length: 17, nose: 'pointed', tail: 'pointed', body: 0.09 }, { blur: 0.5 });
    const a = at(s.ends[0] + 3, 21.2);
    for (const which of ['both', 0] as const) {
      const [r] = snapSpanEnds(s.img, [a, at(s.ends[1], 21.2)], which);
      expect(r.outcome).toBe('too-far');
      expect([r.x, r.y, r.sigmaPx]).toEqual([a.x, a.y, a.sigmaPx]);
      // the intake face lies 0.3 x 17 = 5.1 px behind the nose, 2.1 px inward of the point
      expect(r.movePx).toBeLessThan(-1.5);
      expect(r.movePx).toBeGreaterThan(-2.6);
    }
  });

  it('keeps a point 2 px outside a blunt nose (too far to move), snaps one 0.5 px outside', () => {
    const s = scene({ x0: 20.3, y: 20.4, length: 20, nose: 'blunt', tail: 'blunt', body: 0.12 });
    const far = snapSpanEnds(s.img, [at(s.ends[0] - 2, 20.4), at(s.ends[1], 20.4)], 0)[0];
    expect(far.outcome).toBe('too-far');
    expect(far.x).toBe(s.ends[0] - 2);
    expect(far.movePx).toBeCloseTo(-2, 0);
    const near = snapSpanEnds(s.img, [at(s.ends[0] - 0.5, 20.4), at(s.ends[1], 20.4)], 0);
    expect(near[0].outcome).toBe('snapped');
    expect(Math.abs(near[0].x - s.ends[0])).toBeLessThan(2 * near[0].sigmaPx);
    // the other end was not asked to move
    expect(near[1]).toMatchObject({ outcome: 'unchanged', x: s.ends[1], sigmaPx: HAND });
  });

  it('does not let both ends together change the span by more than 5 %: the one that moved more stays', () => {
    // each end 0.8 px outside a 20 px blunt silhouette: each move is allowed (1 px is 5 %), both are not
    const s = scene({ x0: 20.3, y: 20.4, length: 20, nose: 'blunt', tail: 'blunt', body: 0.12 });
    const [a, b] = snapSpanEnds(s.img, [at(s.ends[0] - 0.8, 20.4), at(s.ends[1] + 0.75, 20.4)], 'both');
    expect([a.outcome, b.outcome].sort()).toEqual(['snapped', 'span-change']);
    const kept = a.outcome === 'span-change' ? a : b;
    const moved = a.outcome === 'span-change' ? b : a;
    expect(Math.abs(kept.movePx)).toBeGreaterThanOrEqual(Math.abs(moved.movePx));
    expect(Math.abs((b.x - a.x) / (s.ends[1] + 0.75 - (s.ends[0] - 0.8)) - 1)).toBeLessThanOrEqual(MAX_SPAN_CHANGE);
  });

  it('keeps a point placed more surely than the snap could place it (not-better)', () => {
    const s = scene({ x0: 20.3, y: 20.4, length: 20, nose: 'pointed', tail: 'blunt', body: 0.12 });
    // at 4x zoom with the lens the hand is good to about 0.3 px, less than a pointed nose's snap claims
    const fine = handSigmaPx(0.25, true);
    const [r] = snapSpanEnds(s.img, [at(s.ends[0], 20.4, fine), at(s.ends[1], 20.4)], 0);
    expect(r.outcome).toBe('not-better');
    expect(r.sigmaPx).toBe(fine);
  });

  it('says no-edge on a flat picture, and for an end off the picture or a span under 2 px', () => {
    const flat = renderPolygons([], { width: W, height: H });
    const r = snapSpanEnds(flat, [at(20, 20), at(37, 20)], 'both');
    expect(r.map((e) => e.outcome)).toEqual(['no-edge', 'no-edge']);
    expect(r[0]).toMatchObject({ x: 20, y: 20, sigmaPx: HAND });
    const s = scene({ x0: 20.3, y: 20.4, length: 17, nose: 'blunt', tail: 'blunt' });
    expect(snapSpanEnds(s.img, [at(-5, 20.4), at(s.ends[1], 20.4)], 'both')[0].outcome).toBe('no-edge');
    expect(snapSpanEnds(s.img, [at(20, 20.4), at(21.5, 20.4)], 'both').map((e) => e.outcome)).toEqual(['no-edge', 'no-edge']);
  });

  it('rejects bad ends and a bad choice of end, naming the field', () => {
    const flat = renderPolygons([], { width: W, height: H });
    expectInputError(() => snapSpanEnds(flat, [at(Number.NaN, 1), at(5, 5)], 'both'), 'end 1 x');
    expectInputError(() => snapSpanEnds(flat, [at(1, 1), at(5, 5, -1)], 'both'), 'end 2 sigma');
    expectInputError(() => snapSpanEnds(flat, [at(1, 1), at(5, 5)], 2 as 0), 'ends to snap');
  });
});

describe('snapSpanEnds: pointed ends (issue 12)', () => {
  it('corrects the inward bias of a pointed nose and tail outward: tips of 0.1 to 0.22 of the length, blur 0 to 1 px', () => {
    // the raw gradient snap lands where the taper fills the profile, about half the taper's rise
    // inside the exact tip; the correction must take most of that back
    let before = 0;
    let after = 0;
    let n = 0;
    for (const taper of [0.1, 0.16, 0.22]) {
      for (const blur of [0, 0.5, 1]) {
        for (const f of [0, 0.35, 0.7]) {
          const s = scene({ x0: 20 + f, y: 20.4, length: 18, nose: 'pointed', tail: 'pointed', noseTaper: taper, tailTaper: taper, body: 0.12 }, { blur });
          // one end at a time, as the snap key does: together the two corrections may pass 5 %
          const ends: [EndInput, EndInput] = [at(s.ends[0], 20.4, 9), at(s.ends[1], 20.4, 9)];
          const r = [snapSpanEnds(s.img, ends, 0)[0], snapSpanEnds(s.img, ends, 1)[1]];
          for (const [k, e] of r.entries()) {
            expect(e.outcome).toBe('snapped');
            expect(e.taperPx).toBeGreaterThan(0);
            const err = errOf(e, k, s.ends);
            before += Math.abs(err - e.taperPx);
            after += Math.abs(err);
            n++;
            expect(Math.abs(err)).toBeLessThanOrEqual(2 * e.sigmaPx);
          }
        }
      }
    }
    // measured: 1.00 px inside on average before, 0.31 after (at most 1.4 sigma)
    expect(before / n).toBeGreaterThan(0.8);
    expect(after / n).toBeLessThan(0.4 * (before / n));
  });

  it("the floor SNAP_FLOOR_PX covers the snapper's own bias on blunt ends (before any taper correction) at 2 sigma", () => {
    let nose = 0;
    let tail = 0;
    for (const blur of [0, 0.5, 1]) {
      for (const f of [0, 0.25, 0.5, 0.75]) {
        for (const dy of [-0.5, 0, 0.5]) {
          const s = scene({ x0: 20 + f, y: 20.4, length: 18, nose: 'blunt', tail: 'blunt', body: 0.12 }, { blur });
          const ends: [EndInput, EndInput] = [at(s.ends[0], 20.4 + dy, 9), at(s.ends[1], 20.4 + dy, 9)];
          const a = snapSpanEnds(s.img, ends, 0)[0];
          const b = snapSpanEnds(s.img, ends, 1)[1];
          expect([a.outcome, b.outcome]).toEqual(['snapped', 'snapped']);
          nose = Math.max(nose, Math.abs(errOf(a, 0, s.ends) - a.taperPx));
          tail = Math.max(tail, Math.abs(errOf(b, 1, s.ends) - b.taperPx));
        }
      }
    }
    // measured: 0.07 px at the flat nose; 0.44 px at the tail, where the fin's trailing edge stands
    // 1.8 px inside the end and a line 0.5 px toward the fin catches it
    expect(nose).toBeLessThanOrEqual(SNAP_FLOOR_PX / 2);
    expect(tail).toBeLessThanOrEqual(2 * SNAP_FLOOR_PX);
  });
});

describe('snapSpanEnds: honest sigmas on 15-20 px silhouettes, seeded', () => {
  it('never moves an end more than 1.5 px or the span more than 5 %; snapped ends lie within 2 sigma of the truth in at least 95 % of all and 90 % of each kind', () => {
    const rng = new Rng(7);
    const shapes: [EndShape, 'blunt' | 'pointed'][] = [
      ['blunt', 'blunt'],
      ['blunt', 'pointed'],
      ['pointed', 'blunt'],
      ['pointed', 'pointed'],
      ['rounded', 'blunt'],
      ['rounded', 'pointed'],
    ];
    let snapped = 0;
    let covered = 0;
    let worstMove = 0;
    let worstSpan = 0;
    let keptWithReason = 0;
    for (const [nose, tail] of shapes) {
      for (const blur of [0, 0.5, 1]) {
        for (const noise of [0, 6]) {
          let n = 0;
          let c = 0;
          for (let t = 0; t < 30; t++) {
            const length = rng.between(15, 20);
            const body = rng.between(0.1, 0.14);
            const y = 20 + rng.uniform();
            const s = scene({ x0: 20 + rng.uniform(), y, length, nose, tail, body }, { blur, noise, rng, round: noise > 0 });
            // the user's points within 0.8 px of the ends, on a line within half the body of the axis
            const dy = (rng.between(-0.5, 0.5) * body * length) / 2;
            const a = at(s.ends[0] + rng.between(-0.8, 0.8), y + dy);
            const b = at(s.ends[1] + rng.between(-0.8, 0.8), y + dy);
            const r = snapSpanEnds(s.img, [a, b], 'both');
            const drawn = b.x - a.x;
            worstSpan = Math.max(worstSpan, Math.abs((r[1].x - r[0].x) / drawn - 1));
            for (const [k, e] of r.entries()) {
              const from = k === 0 ? a : b;
              const moved = Math.hypot(e.x - from.x, e.y - from.y);
              worstMove = Math.max(worstMove, moved);
              expect(moved).toBeLessThanOrEqual(Math.min(MAX_MOVE_PX, MAX_SPAN_CHANGE * drawn) + 1e-9);
              if (e.outcome !== 'snapped') {
                // kept: the user's point and sigma stand, and the outcome says why
                expect([e.x, e.y, e.sigmaPx]).toEqual([from.x, from.y, from.sigmaPx]);
                expect(['no-edge', 'too-far', 'span-change', 'not-better']).toContain(e.outcome);
                keptWithReason++;
                continue;
              }
              expect(e.sigmaPx).toBeGreaterThanOrEqual(SNAP_FLOOR_PX);
              expect(e.sigmaPx).toBeLessThanOrEqual(from.sigmaPx);
              n++;
              if (Math.abs(errOf(e, k, s.ends)) <= 2 * e.sigmaPx) c++;
            }
          }
          expect(n, `${nose}/${tail} blur ${blur} noise ${noise}`).toBeGreaterThan(20);
          expect(c / n, `${nose}/${tail} blur ${blur} noise ${noise}`).toBeGreaterThanOrEqual(0.9);
          snapped += n;
          covered += c;
        }
      }
    }
    // measured with seed 7: 1632 of 2160 ends snapped, 99.9 % within 2 sigma (the least covered
    // kind, blunt ends under blur 0.5 px and noise, 97 %; seeds 11 and 23: 99.7 %, least 95 %);
    // moves up to 0.94 px, the span changed up to 5.0 %
    expect(covered / snapped).toBeGreaterThanOrEqual(0.95);
    expect(snapped).toBeGreaterThan(0.6 * 2160);
    expect(keptWithReason).toBeGreaterThan(0);
    expect(worstMove).toBeLessThanOrEqual(MAX_MOVE_PX);
    expect(worstSpan).toBeLessThanOrEqual(MAX_SPAN_CHANGE + 1e-9);
  });
});
