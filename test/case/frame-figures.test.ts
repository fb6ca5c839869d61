import { describe, expect, it } from 'vitest';
import { analyseCase } from '../../src/case/analysis';
import { defaultAssumptions, engineAssumptions } from '../../src/case/assumptions';
import { frameFigures, type FrameBasis } from '../../src/case/frame-figures';
import { marksAt } from '../../src/case/frames';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import type { CaseAssumptions, Mark } from '../../src/case/schema';

/*
 * One frame's figures (frame-figures.ts), held to the pinhole camera model (Hartley & Zisserman,
 * Multiple View Geometry, 2nd ed., ch. 6): with the focal length in pixels f = (W / 2) / tan(HFOV / 2),
 * a segment of true length L square to the line of sight and centred on the optical axis, imaged
 * s px long, lies at R = L f / s; seen at an aspect A it is foreshortened to L sin A. A point d px
 * above the principal point of a level camera is atan(d / f) above the horizon. Every band is one
 * value and every edge exact, so the Monte Carlo returns these to rounding. All scenes are invented.
 */
const W = 1280;
const H = 720;
const HFOV_DEG = 60;
const F = W / 2 / Math.tan((HFOV_DEG / 2) * (Math.PI / 180));
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: W, height: H }, scale: 1, devicePixelRatio: 1 };

function span(id: string, kind: Mark['kind'], s: number, extra: Partial<Mark> = {}, centre = { x: W / 2, y: H / 2 }): Mark {
  return { id, kind, t: 1, points: [{ x: centre.x - s / 2, y: centre.y }, { x: centre.x + s / 2, y: centre.y }], edgeSigmaPx: 0, mapping, createdAt: 1, ...extra };
}

const exact: CaseAssumptions = { ...defaultAssumptions(), cameraLabel: 'invented camera', hfovDeg: { lo: HFOV_DEG, hi: HFOV_DEG }, sizeLabel: 'invented 30 m', objectSizeM: { lo: 30, hi: 30 }, aspectDeg: { lo: 90, hi: 90 } };

function basis(a: CaseAssumptions, marks: Mark[] = []): FrameBasis {
  const e = engineAssumptions(a, marks);
  return { a: e, frame: { left: 0, right: W, top: 0, bottom: H }, hfov: e.hfov };
}

const OPTIONS = { draws: 500, seed: 1 };

describe('frameFigures against the pinhole model', () => {
  it('a 30 m span imaged 120 px wide lies at L f / s', () => {
    const m = span('o', 'object-span', 120, { dimension: 'wingspan' });
    const f = frameFigures(m, [m], 1, basis(exact, [m]), OPTIONS);
    expect(f.spanPx).toBeCloseTo(120, 12);
    expect(f.result.range.median).toBeCloseTo((30 * F) / 120, 6);
    expect(f.result.range.p05).toBeCloseTo(f.result.range.p95, 6);
    expect(f.landmark).toBeNull();
  });

  it('a span seen at 30 deg is foreshortened to L sin A, but one of no named dimension is taken square on', () => {
    const aspect30: CaseAssumptions = { ...exact, aspectDeg: { lo: 30, hi: 30 } };
    const named = span('o', 'object-span', 120, { dimension: 'wingspan' });
    const other = span('o', 'object-span', 120, { dimension: 'other' });
    const sin30 = Math.sin(Math.PI / 6);
    expect(frameFigures(named, [named], 1, basis(aspect30, [named]), OPTIONS).result.range.median).toBeCloseTo((30 * sin30 * F) / 120, 6);
    expect(frameFigures(other, [other], 1, basis(aspect30, [other]), OPTIONS).result.range.median).toBeCloseTo((30 * F) / 120, 6);
  });

  it('a level landmark on the same frame is solved with its own size, by its id', () => {
    const withSizes: CaseAssumptions = { ...exact, landmarkSizeM: { lo: 10, hi: 10 }, landmarkSizes: [{ id: 'barn', sizeM: { lo: 24, hi: 24 } }] };
    const obj = span('o', 'object-span', 120, { dimension: 'wingspan' });
    // a width: level, square on when no landmark aspect is given
    const lm = span('l', 'landmark-span', 48, { landmarkId: 'barn', landmarkDimension: 'width' }, { x: W / 2, y: H / 2 + 100 });
    const f = frameFigures(obj, [obj, lm], 1, basis(withSizes, [obj, lm]), OPTIONS);
    expect(f.landmark).toBe(lm);
    // centred across, 100 px below the axis: its distance along the axis is L f / s (the ray's slant adds 1 / cos of the row angle)
    const along = (24 * F) / 48;
    expect(f.result.landmarkRange!.median).toBeGreaterThan(along * 0.99);
    expect(f.result.landmarkRange!.median).toBeLessThan(along * Math.hypot(F, 100) / F * 1.01);
  });

  it('a level horizon through the principal point puts an object d px above it atan(d / f) up; a fixed camera takes its pitch instead', () => {
    const d = 90;
    const obj = span('o', 'object-span', 120, { dimension: 'wingspan' }, { x: W / 2, y: H / 2 - d });
    const horizon: Mark = { id: 'h', kind: 'horizon', t: 1, points: [{ x: 100, y: H / 2 }, { x: W - 100, y: H / 2 }], edgeSigmaPx: 0, mapping, createdAt: 1 };
    const f = frameFigures(obj, [obj, horizon], 1, basis(exact, [obj]), OPTIONS);
    expect(f.result.elevationSource).toBe('horizon');
    expect(f.result.elevation!.median).toBeCloseTo(Math.atan(d / F), 6);
    const fixed: CaseAssumptions = { ...exact, fixedCamera: { mount: 'tripod', axisHeadingDeg: { lo: 0, hi: 0 }, pitchDeg: { lo: 0, hi: 0 } } };
    expect(frameFigures(obj, [obj, horizon], 1, basis(fixed, [obj]), OPTIONS).result.elevationSource).not.toBe('horizon');
  });

  it('refuses an end outside the camera frame, naming the field', () => {
    const m = span('o', 'object-span', 120, { dimension: 'wingspan' }, { x: W + 200, y: H / 2 });
    expect(() => frameFigures(m, [m], 1, basis(exact, [m]), OPTIONS)).toThrow(/first end x/);
  });
});

describe('the popup and the overlay solve a frame alike', () => {
  it("the analysis's figures for each frame are frameFigures' with the same draws and seed", () => {
    let c = newCase('t', { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: W, height: H, duration: 4 }, '0.1.0', 1);
    const obj = span('o', 'object-span', 120, { dimension: 'wingspan', edgeSigmaPx: 0.6 });
    const lm = span('l', 'landmark-span', 48, { landmarkDimension: 'height', edgeSigmaPx: 0.6 }, { x: W / 2 + 40, y: H / 2 + 100 });
    c = upsertMark(upsertMark(c, obj, 2), lm, 2);
    c = withAssumptions(c, { ...defaultAssumptions(), observerSpeedMs: { lo: 20, hi: 25 } }, 3);
    const r = analyseCase(c, { draws: 2000, seed: 7 });
    const a = r.assumptions;
    const f = frameFigures(obj, marksAt(c.marks, obj.t), obj.t, { a, frame: r.frame, hfov: r.field.hfov }, { draws: 2000, seed: 7, tail: 0.05 });
    expect(r.timestamps[0]!.result).toEqual(f.result);
    expect(r.timestamps[0]!.landmarkMark).toBe(f.landmark);
  });
});
