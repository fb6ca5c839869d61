import { describe, expect, it } from 'vitest';
import { analyseCase } from '../../../src/case/analysis';
import { defaultAssumptions, engineAssumptions } from '../../../src/case/assumptions';
import { newCase, upsertMark, withAssumptions } from '../../../src/case/marks';
import type { Mark } from '../../../src/case/schema';
import { LIVE_DRAWS, liveBasis, liveFigures } from '../../../extension/overlay/live-figures';

/*
 * The overlay's live readout and the popup compute a frame with the same function (src/case
 * frame-figures.ts): with the same draws and seed the figures are the same, including those the
 * readout once left out (the landmark's own size, the observer's speed and so the implied speed).
 * An invented scene: a 1280 x 720 picture, an object span with a landmark pinned under it.
 */
const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 1280, height: 720 }, scale: 1, devicePixelRatio: 1 };
const obj: Mark = { id: 'o', kind: 'object-span', t: 1, points: [{ x: 580, y: 300 }, { x: 700, y: 302 }], edgeSigmaPx: 0.6, dimension: 'wingspan', mapping, createdAt: 1 };
const lm: Mark = { id: 'l', kind: 'landmark-span', t: 1, points: [{ x: 640, y: 560 }, { x: 641, y: 500 }], edgeSigmaPx: 0.6, landmarkId: 'mast', landmarkDimension: 'height', mapping, createdAt: 1 };

function invented() {
  let c = newCase('t', { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: 1280, height: 720, duration: 4 }, '0.1.0', 1);
  c = upsertMark(upsertMark(c, obj, 2), lm, 2);
  return withAssumptions(c, { ...defaultAssumptions(), observerSpeedMs: { lo: 20, hi: 25 }, landmarkSizes: [{ id: 'mast', sizeM: { lo: 30, hi: 35 } }] }, 3);
}

describe('liveFigures', () => {
  it("gives the popup's figures for the frame (same draws, same seed), implied speed included", () => {
    const c = invented();
    const r = analyseCase(c, { draws: LIVE_DRAWS, seed: 1 });
    const live = liveFigures(obj, c.marks, 1, { a: r.assumptions, frame: r.frame, hfov: r.field.hfov });
    expect(live).not.toBeNull();
    expect(live!.result).toEqual(r.timestamps[0]!.result);
    expect(live!.result.impliedSpeed).toBeDefined();
  });

  it("takes the observer's speed measured from lane dashes, as the popup does, not the one given", () => {
    // four invented passes of a US broken line's leading edge, 0.5 s apart: 3 cycles of 12.192 m
    // (MUTCD 2009, section 3A.06) in 1.5 s, 24.4 m/s against the 20-25 m/s given
    let c = invented();
    [0.2, 0.7, 1.2, 1.7].forEach((t, i) => {
      c = upsertMark(c, { id: `d${i}`, kind: 'lane-dash', t, points: [{ x: 300, y: 640 }], edgeSigmaPx: 0.5, mapping, createdAt: 1 }, 4 + i);
    });
    c = withAssumptions(c, { ...c.assumptions!, laneCycleId: 'us-broken' }, 9);
    const r = analyseCase(c, { draws: LIVE_DRAWS, seed: 1 });
    expect(r.laneSpeed).not.toBeNull();
    // what the overlay's readout starts from: the case's given assumptions and its marks
    const basis = liveBasis(engineAssumptions(c.assumptions, c.marks), c, 1280, 720);
    expect(basis.a.observerSpeed).toEqual(r.assumptions.observerSpeed);
    expect(liveFigures(obj, c.marks.filter((m) => m.t === 1), 1, basis)!.result).toEqual(r.timestamps[0]!.result);
  });

  it('is null while a dragged span is shorter than half a pixel, the engine shortest span', () => {
    const c = invented();
    const r = analyseCase(c, { draws: 300, seed: 1 });
    const short = { points: [{ x: 600, y: 300 }, { x: 600.3, y: 300.2 }], edgeSigmaPx: 0.6 };
    expect(liveFigures(short, [], 1, { a: r.assumptions, frame: r.frame, hfov: r.field.hfov })).toBeNull();
  });

  it('is null when an end leaves the camera frame (the readout then says so)', () => {
    const c = invented();
    const r = analyseCase(c, { draws: 300, seed: 1 });
    const out = { points: [{ x: 1200, y: 300 }, { x: 1400, y: 300 }], edgeSigmaPx: 0.6 };
    expect(liveFigures(out, [], 1, { a: r.assumptions, frame: r.frame, hfov: r.field.hfov })).toBeNull();
  });

  it("a portrait picture from a landscape camera class: the readout turns the class's field as the popup does, and gives its figures", () => {
    // the invented scene stood on end: a 720 x 1280 picture, the object across it, no landmark
    const pm = { ...mapping, picture: { x: 0, y: 0, width: 720, height: 1280 } };
    const o: Mark = { ...obj, points: [{ x: 300, y: 500 }, { x: 420, y: 502 }], mapping: pm };
    let c = newCase('p', { pageUrl: 'http://127.0.0.1/x', pageTitle: 'invented', src: '', width: 720, height: 1280, duration: 4 }, '0.1.0', 1);
    c = withAssumptions(upsertMark(c, o, 2), { ...defaultAssumptions(), observerSpeedMs: { lo: 20, hi: 25 } }, 3);
    const r = analyseCase(c, { draws: LIVE_DRAWS, seed: 1 });
    expect(r.field.portrait).toBe(true);
    const basis = liveBasis(r.assumptions, c, 720, 1280);
    expect(basis.hfov).toEqual(r.field.hfov);
    expect(basis.hfov.hi).toBeLessThan(r.assumptions.hfov.lo);
    expect(liveFigures(o, c.marks, 1, basis)!.result).toEqual(r.timestamps[0]!.result);
  });
});
