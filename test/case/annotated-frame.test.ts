import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { analyseCase } from '../../src/case/analysis';
import { annotatedFrameName, caseFileStem, layoutPicture, MARK_COLOURS, wayAlongRoad, wrap, textWidth, type PictureWords } from '../../src/case/annotated-frame';
import { defaultAssumptions } from '../../src/case/assumptions';
import { newCase, upsertMark, withAssumptions } from '../../src/case/marks';
import { SUMMARY_CAUTIONS } from '../../src/case/summary';
import type { CaseAssumptions, CaseRecord, Mark } from '../../src/case/schema';
import { formatEstimate, type Quantity } from '../../src/engine/units';
import type { Estimate } from '../../src/engine/stats';

/*
 * The annotated frame's layout (issue 15 point 7), without a DOM: what is drawn where on the paused
 * frame of the invented pass-tracked clip, marked at its truth pixels (test/fixtures/clips, truth
 * from exact pinhole projection). The arrow's way is held against the clip's own truth: the tower
 * stands far beyond the motionless point (2.5 km against 263 m), so as the camera keeps the object
 * centred it drifts against the sight line's motion; in the truth file its column grows, frame after
 * frame, so the sight line moves to the left of the picture.
 */
interface Truth {
  video: { width: number; height: number };
  frames: { t: number; object: { x1: number; y1: number; x2: number; y2: number }; landmarks: { id: string; x1: number; y1: number; x2: number; y2: number }[] }[];
}
const truth = JSON.parse(readFileSync('test/fixtures/clips/pass-tracked.truth.json', 'utf8')) as Truth;
const W = truth.video.width;
const H = truth.video.height;

const mapping = { objectFit: 'contain', objectPosition: '50% 50%', picture: { x: 0, y: 0, width: 640, height: 360 }, scale: 1, devicePixelRatio: 1 };
function mark(id: string, kind: Mark['kind'], t: number, p: { x1: number; y1: number; x2: number; y2: number }): Mark {
  return { id, kind, t, points: [{ x: p.x1, y: p.y1 }, { x: p.x2, y: p.y2 }], edgeSigmaPx: 0.5, mapping, createdAt: 1, ...(kind === 'object-span' ? { dimension: 'other' as const } : { landmarkId: 'mast' }) };
}
function invented(a: CaseAssumptions, title = 'Invented pass: tracked / mast?'): CaseRecord {
  let c = newCase('0123456789abcdef', { pageUrl: 'http://127.0.0.1/plain.html', pageTitle: title, src: '', width: W, height: H, duration: 3.2 }, '0.1.0', Date.UTC(2026, 11, 5, 12));
  truth.frames.forEach((f, i) => {
    c = upsertMark(c, mark(`o${i}`, 'object-span', f.t, f.object), 2);
    c = upsertMark(c, mark(`l${i}`, 'landmark-span', f.t, f.landmarks.find((l) => l.id === 'mast')!), 2);
  });
  return withAssumptions(c, a, Date.UTC(2026, 11, 5, 12));
}
const A: CaseAssumptions = { ...defaultAssumptions(), cameraLabel: 'known camera', hfovDeg: { lo: 39, hi: 41 }, landmarkSizeM: { lo: 10, hi: 20 }, observerSpeedMs: { lo: 24, hi: 26 } };
const words: PictureWords = {
  title: (t, title) => `${title} at ${t} s`,
  range: (e) => `range (pass) ${e}`,
  rangeFrameAlone: (e) => `range ${e}`,
  speedSame: (e) => `speed same ${e}`,
  speedOpposite: (e) => `speed opposite ${e}`,
  speedOpen: (e) => `speed open ${e}`,
  pointLandmark: (e) => `point at the landmark ${e}`,
  pointColumn: (e) => `point on the column ${e}`,
  pointNone: 'no point',
  arrow: 'arrow: the sight line',
  arrowNoSide: (w) => `no arrow, ${w}`,
  waySame: 'with the travel',
  wayOpposite: 'against the travel',
  noFigures: 'no figures',
  source: (s) => `pixels from ${s}`,
};
const format = (e: Estimate, q: Quantity) => formatEstimate(e, q, 'metric');
const c = invented(A);
const r = analyseCase(c, { draws: 2000, seriesDraws: 200 });
const f = truth.frames[2]!;

describe('the annotated frame: layout', () => {
  it('is named as the case file is, with .png', () => {
    expect(caseFileStem(c)).toBe('clip-caliper-Invented-pass-tracked-mast-2026-12-05-01234567');
    expect(annotatedFrameName(c)).toBe('clip-caliper-Invented-pass-tracked-mast-2026-12-05-01234567.png');
    expect(annotatedFrameName(invented(A, ''))).toBe('clip-caliper-case-2026-12-05-01234567.png');
  });

  it("draws the frame's marks at their pixels in the overlay's colours, every label inside the picture and above the band only where it belongs", () => {
    const p = layoutPicture({ c, r, t: f.t, width: W, height: H, source: 'video', words, format });
    const dots = p.shapes.filter((s) => s.kind === 'dot');
    // this frame's two marks, two ends each: the other frames' marks are not drawn
    expect(dots).toHaveLength(4);
    expect(dots.filter((d) => d.colour === MARK_COLOURS['object-span']).map((d) => [d.x, d.y])).toEqual([[f.object.x1, f.object.y1], [f.object.x2, f.object.y2]]);
    for (const s of p.shapes) {
      if (s.kind === 'text') {
        expect(s.x).toBeGreaterThanOrEqual(0);
        expect(s.x + textWidth(s.text, s.fontPx)).toBeLessThanOrEqual(W);
        expect(s.y).toBeGreaterThanOrEqual(p.bandTop);
        expect(s.y + s.fontPx).toBeLessThanOrEqual(H);
      }
      if (s.kind === 'arrow') for (const [x, y] of [[s.x1, s.y1], [s.x2, s.y2]] as const) expect(x >= 0 && x <= W && y >= 0 && y <= p.bandTop).toBe(true);
    }
    expect(p.bandTop).toBeGreaterThan(H / 3); // the band leaves the object (at row 180) and the mast in view
  });

  it('carries the figures with their intervals, the motionless point at the landmark, the source and the cautions line', () => {
    const p = layoutPicture({ c, r, t: f.t, width: W, height: H, source: 'capture', words, format });
    const ts = r.timestamps.find((x) => Math.abs(x.t - f.t) < 1e-9)!;
    const text = p.lines.join(' ');
    expect(text).toContain(`range (pass) ${format(ts.fitted!.range, 'distance')}`);
    // truth: -70 m/s, the other way from the observer (the analysis test holds the interval to it)
    expect(text).toContain(`speed opposite ${format(ts.result.impliedSpeed!, 'speed')}`);
    expect(text).toMatch(/ to /); // formatEstimate's interval, not a bare median
    expect(text).toContain('point at the landmark');
    expect(text).toContain('pixels from capture');
    expect(text).toContain(SUMMARY_CAUTIONS.join(' '));
    // the motionless point ringed at the mast's middle
    const ring = p.shapes.find((s) => s.kind === 'ring')!;
    const m = f.landmarks.find((l) => l.id === 'mast')!;
    expect(ring).toMatchObject({ x: (m.x1 + m.x2) / 2, y: (m.y1 + m.y2) / 2 });
  });

  it("points the arrow the way the truth's far tower says the sight line moves, only when the camera's side is known", () => {
    // the tower beyond the motionless point drifts right in the truth frames: the sight line moves left
    const towerX = truth.frames.map((x) => x.landmarks.find((l) => l.id === 'tower')!.x1);
    expect(towerX.every((x, i) => i === 0 || x > towerX[i - 1]!)).toBe(true);
    expect(wayAlongRoad(r.timestamps.find((x) => Math.abs(x.t - f.t) < 1e-9)!, r)).toBe(-1);
    // handheld: no side known, so no arrow, and the band says which way along the road instead
    const free = layoutPicture({ c, r, t: f.t, width: W, height: H, source: 'video', words, format });
    expect(free.arrow).toBeNull();
    expect(free.shapes.some((s) => s.kind === 'arrow')).toBe(false);
    expect(free.lines.join(' ')).toContain('no arrow, against the travel');
    // the camera aimed to the left of the road (the truth's y is the object's side, z up: left), as the clip was filmed
    const left = { ...r, assumptions: { ...r.assumptions, fixedCamera: { mount: 'vehicle' as const, axisHeading: { lo: -100 * (Math.PI / 180), hi: -60 * (Math.PI / 180) }, pitch: null } } };
    const p = layoutPicture({ c, r: left, t: f.t, width: W, height: H, source: 'video', words, format });
    expect(p.arrow).toBe(-1);
    const a = p.shapes.find((s) => s.kind === 'arrow')!;
    expect(a.kind === 'arrow' && a.x2 < a.x1).toBe(true);
    // centred over the object's middle (truth: column 320)
    expect(a.kind === 'arrow' && Math.abs((a.x1 + a.x2) / 2 - (f.object.x1 + f.object.x2) / 2)).toBeLessThan(1e-9);
    // aimed to the right instead, the same figures put the arrow the other way
    const right = { ...left, assumptions: { ...left.assumptions, fixedCamera: { ...left.assumptions.fixedCamera, axisHeading: { lo: 60 * (Math.PI / 180), hi: 100 * (Math.PI / 180) } } } };
    expect(layoutPicture({ c, r: right, t: f.t, width: W, height: H, source: 'video', words, format }).arrow).toBe(1);
  });

  it('says so on a frame without figures, and wraps words inside a narrow picture', () => {
    const p = layoutPicture({ c, r, t: 0.05, width: W, height: H, source: 'video', words, format });
    expect(p.lines.join(' ')).toContain('no figures');
    expect(p.shapes.filter((s) => s.kind === 'dot')).toHaveLength(0);
    const lines = wrap(SUMMARY_CAUTIONS.join(' '), 200, 10);
    expect(lines.length).toBeGreaterThan(1);
    for (const l of lines) expect(textWidth(l, 10)).toBeLessThanOrEqual(200);
    expect(lines.join(' ')).toBe(SUMMARY_CAUTIONS.join(' '));
  });
});
