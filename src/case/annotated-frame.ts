import type { Estimate } from '../engine/stats';
import type { Quantity } from '../engine/units';
import type { CaseAnalysis, TimestampFigures } from './analysis-types';
import { marksAt } from './frames';
import type { CaseRecord, Mark, MarkKind } from './schema';
import { SUMMARY_CAUTIONS } from './summary';

/*
 * The annotated frame (issue 15 point 7): the paused frame as a PNG with the frame's marks, the
 * motionless point, the sight line's direction of motion and the headline figures with their 5-95 %
 * intervals drawn on it, for a moderator to attach beside the text summary. This module decides
 * what is drawn where, as a list of shapes in the video's own pixels; the popup's
 * annotated-frame.ts only rasterises that list over the frame's pixels. The picture keeps the
 * video's size (a moderator compares it with the clip pixel for pixel), so the figures sit in a band
 * over the bottom of the frame rather than below it.
 */

/** The marks' colours, as the overlay draws them (extension/overlay/drawing.ts, its fallbacks). */
export const MARK_COLOURS: Readonly<Record<MarkKind, string>> = {
  'object-span': '#e8590c',
  'landmark-span': '#2b8a3e',
  'frame-edges': '#7048e8',
  'lane-dash': '#0b7285',
  'object-centre': '#e8590c',
  'frame-top-bottom': '#7048e8',
  horizon: '#7048e8',
  'road-ahead': '#0b7285',
};
/** The motionless point and the arrow: a colour no mark uses, light enough on a dark sky and on a road. */
export const POINT_COLOUR = '#ffd43b';
export const ARROW_COLOUR = '#ffd43b';
export const TEXT_COLOUR = '#ffffff';
export const BAND_COLOUR = 'rgba(0, 0, 0, 0.72)';

/**
 * The rasteriser draws text in a monospace face, so a line's width is known here without a DOM:
 * 0.6 em a character is DejaVu Sans Mono's advance (1233 of 2048 units, 0.602 em; from memory) and
 * within a few per cent of the other common monospace faces; 0.62 leaves room for them.
 */
export const CHAR_EM = 0.62;
export const LINE_EM = 1.25;

export type Shape =
  | { kind: 'line'; x1: number; y1: number; x2: number; y2: number; colour: string; width: number; dash?: number[]; halo?: boolean }
  | { kind: 'dot'; x: number; y: number; r: number; colour: string }
  | { kind: 'ring'; x: number; y: number; r: number; colour: string; width: number }
  | { kind: 'arrow'; x1: number; y1: number; x2: number; y2: number; colour: string; width: number; head: number }
  | { kind: 'band'; y: number; height: number; colour: string }
  | { kind: 'text'; x: number; y: number; text: string; colour: string; fontPx: number; boxed?: boolean };

/** The words the picture carries, from the extension's message table (the tests give their own). */
export interface PictureWords {
  /** The picture's time, with the case's title. */
  title: (time: string, title: string) => string;
  range: (est: string) => string;
  rangeFrameAlone: (est: string) => string;
  speedSame: (est: string) => string;
  speedOpposite: (est: string) => string;
  speedOpen: (est: string) => string;
  pointLandmark: (est: string) => string;
  pointColumn: (est: string) => string;
  pointNone: string;
  arrow: string;
  arrowNoSide: (way: string) => string;
  waySame: string;
  wayOpposite: string;
  noFigures: string;
  source: (which: 'video' | 'capture') => string;
}

export interface PictureInput {
  c: CaseRecord;
  r: CaseAnalysis;
  /** The media time the frame shows, s. */
  t: number;
  width: number;
  height: number;
  source: 'video' | 'capture';
  words: PictureWords;
  format: (e: Estimate, kind: Quantity) => string;
}

export interface PictureLayout {
  width: number;
  height: number;
  fontPx: number;
  /** The band's top: everything drawn on the frame stays above it. */
  bandTop: number;
  shapes: Shape[];
  /** The sight line's way across the picture, +1 right, -1 left, null when the figures leave it open. */
  arrow: 1 | -1 | null;
  /** The band's lines as drawn, top to bottom (wrapped; the cautions last). */
  lines: string[];
}

/** The case file's name without its extension: case-view's export and the picture share it. */
export function caseFileStem(c: Pick<CaseRecord, 'id' | 'updatedAt' | 'video'>): string {
  const day = new Date(c.updatedAt).toISOString().slice(0, 10);
  const title = (c.video.pageTitle || 'case').replace(/[^\w-]+/g, '-').replace(/^-+|-+$/g, '').slice(0, 40) || 'case';
  return `clip-caliper-${title}-${day}-${c.id.slice(0, 8)}`;
}

export const annotatedFrameName = (c: Pick<CaseRecord, 'id' | 'updatedAt' | 'video'>): string => `${caseFileStem(c)}.png`;

/** The size text is drawn at: about a fortieth of the picture's height, 10 to 28 px. */
export function fontFor(height: number): number {
  return Math.max(10, Math.min(28, Math.round(height / 40)));
}

/** A line's width in pixels at fontPx, by the monospace advance. */
export const textWidth = (text: string, fontPx: number): number => text.length * CHAR_EM * fontPx;

/** Words wrapped to lines no wider than maxPx (a word longer than a line is cut). */
export function wrap(text: string, maxPx: number, fontPx: number): string[] {
  const per = Math.max(8, Math.floor(maxPx / (CHAR_EM * fontPx)));
  const out: string[] = [];
  let line = '';
  for (let word of text.split(/\s+/).filter(Boolean)) {
    while (word.length > per) {
      if (line) out.push(line);
      out.push(word.slice(0, per));
      word = word.slice(per);
      line = '';
    }
    if (!line) line = word;
    else if (line.length + 1 + word.length <= per) line += ` ${word}`;
    else {
      out.push(line);
      line = word;
    }
  }
  if (line) out.push(line);
  return out;
}

/**
 * Which way the object, and with it the sight line where the object is, moves along the road: +1
 * with the observer's travel, -1 against it, null when the interval holds both. From this frame's
 * implied speed (a landmark it seems pinned over), else from the one direction the pass leaves.
 */
export function wayAlongRoad(ts: TimestampFigures | null, r: CaseAnalysis): 1 | -1 | null {
  const s = ts?.result.impliedSpeed;
  if (s) return s.p05 > 0 ? 1 : s.p95 < 0 ? -1 : null;
  const dirs = new Set(r.readings.filter((x) => x.pass).map((x) => (x.pass!.direction === 'opposite' ? -1 : 1)));
  return dirs.size === 1 ? ([...dirs][0] as 1 | -1) : null;
}

/**
 * The observer's direction of travel across the picture, from a fixed camera's aim (0 ahead, +90
 * to the right): looking to the right of the road, the road ahead lies to the picture's left.
 * Null when the aim is not known to one side (a handheld camera, an aim band across ahead).
 */
export function travelAcrossPicture(r: CaseAnalysis): 1 | -1 | null {
  const aim = r.assumptions.fixedCamera?.axisHeading;
  if (!aim) return null;
  if (aim.lo > 0 && aim.hi < Math.PI) return -1;
  if (aim.hi < 0 && aim.lo > -Math.PI) return 1;
  return null;
}

/** Where a point lies inside [lo, hi]. */
const clamp = (v: number, lo: number, hi: number) => Math.max(lo, Math.min(hi, v));

/** The picture's shapes and lines: the frame's marks, the motionless point, the arrow, the figures, the cautions. */
export function layoutPicture(p: PictureInput): PictureLayout {
  const { c, r, t, width: W, height: H, words, format } = p;
  const fontPx = fontFor(H);
  const lineH = Math.round(fontPx * LINE_EM);
  const pad = Math.round(fontPx / 2);
  const ts = r.timestamps.find((x) => Math.abs(x.t - t) < 1 / 48) ?? null;

  // the band's lines first: their count sets the band's top
  const lines: string[] = [words.title(t.toFixed(3), c.video.pageTitle || c.video.pageUrl)];
  const way = wayAlongRoad(ts, r);
  const across = travelAcrossPicture(r);
  const arrow = way !== null && across !== null ? ((way * across) as 1 | -1) : null;
  if (ts) {
    lines.push(ts.fitted ? words.range(format(ts.fitted.range, 'distance')) : words.rangeFrameAlone(format(ts.result.range, 'distance')));
    const s = ts.result.impliedSpeed;
    if (s) lines.push((s.p95 < 0 ? words.speedOpposite : s.p05 > 0 ? words.speedSame : words.speedOpen)(format(s, 'speed')));
    const d = ts.result.landmarkHorizontalRange ?? ts.result.landmarkRange;
    if (ts.landmarkMark && d && ts.result.fixedPointFraction) lines.push(words.pointLandmark(format(d, 'distance')));
    else if (ts.result.fixedPointDistance) lines.push(words.pointColumn(format(ts.result.fixedPointDistance, 'distance')));
    else lines.push(words.pointNone);
  } else lines.push(words.noFigures);
  if (way !== null) lines.push(arrow !== null ? words.arrow : words.arrowNoSide(way > 0 ? words.waySame : words.wayOpposite));
  lines.push(words.source(p.source));
  const cautions = SUMMARY_CAUTIONS.join(' ');
  const maxPx = W - 2 * pad;
  // the figures run on after one another, a line each would hide a third of a small frame
  const [title, ...figures] = lines;
  const wrapped = [...wrap(title!, maxPx, fontPx), ...wrap(figures.join(' \u00b7 '), maxPx, fontPx), ...wrap(cautions, maxPx, fontPx)];
  const bandH = Math.min(H, wrapped.length * lineH + 2 * pad);
  const bandTop = H - bandH;

  const shapes: Shape[] = [];
  const inside = (x: number, y: number) => ({ x: clamp(x, 0, W), y: clamp(y, 0, bandTop) });
  const dotR = Math.max(3, Math.round(fontPx / 3));
  const here = marksAt(c.marks, t);
  // the picture's edges hold for the whole clip, as the overlay draws them always
  const drawn = c.marks.filter((m) => here.includes(m) || m.kind === 'frame-edges' || m.kind === 'frame-top-bottom');
  for (const m of drawn) shapes.push(...markShapes(m, W, bandTop, dotR));

  // the motionless point: the landmark the object seems pinned over, else the object's column
  if (ts?.result.fixedPointFraction && ts.landmarkMark && ts.landmarkMark.points.length === 2) {
    const [a, b] = ts.landmarkMark.points as [{ x: number; y: number }, { x: number; y: number }];
    const m = inside((a.x + b.x) / 2, (a.y + b.y) / 2);
    shapes.push({ kind: 'ring', x: m.x, y: m.y, r: Math.max(2 * dotR, Math.hypot(b.x - a.x, b.y - a.y) / 2 + dotR), colour: POINT_COLOUR, width: 2 });
  } else if (ts?.result.fixedPointDistance) {
    const x = objectCentre(ts.objectMark).x;
    shapes.push({ kind: 'line', x1: x, y1: 0, x2: x, y2: bandTop, colour: POINT_COLOUR, width: 1.5, dash: [4, 4] });
  }
  // the arrow, above the object: a tenth of the picture's width, inside the picture
  if (arrow !== null && ts) {
    const o = objectCentre(ts.objectMark);
    const len = Math.max(20, W / 10);
    const y = clamp(o.y - 3 * dotR - fontPx, fontPx, bandTop - fontPx);
    const x1 = clamp(o.x - len / 2, fontPx, W - fontPx - len); // the arrow's left end, centred over the object
    const x0 = arrow > 0 ? x1 : x1 + len;
    shapes.push({ kind: 'arrow', x1: x0, y1: y, x2: x0 + arrow * len, y2: y, colour: ARROW_COLOUR, width: 3, head: Math.max(8, fontPx) });
  }

  shapes.push({ kind: 'band', y: bandTop, height: bandH, colour: BAND_COLOUR });
  wrapped.forEach((text, k) => shapes.push({ kind: 'text', x: pad, y: bandTop + pad + k * lineH, text, colour: TEXT_COLOUR, fontPx }));
  return { width: W, height: H, fontPx, bandTop, shapes, arrow, lines: wrapped };
}

function objectCentre(m: Mark): { x: number; y: number } {
  const [a, b] = m.points as [{ x: number; y: number }, { x: number; y: number } | undefined];
  return b ? { x: (a.x + b.x) / 2, y: (a.y + b.y) / 2 } : a;
}

/** One mark as the overlay draws it (drawing.ts), in the video's pixels, kept above the band. */
function markShapes(m: Mark, W: number, bottom: number, dotR: number): Shape[] {
  const colour = MARK_COLOURS[m.kind];
  const out: Shape[] = [];
  const pts = m.points;
  if (m.kind === 'frame-edges') for (const p of pts) out.push({ kind: 'line', x1: p.x, y1: 0, x2: p.x, y2: bottom, colour, width: 2, dash: [6, 4] });
  else if (m.kind === 'frame-top-bottom') for (const p of pts) out.push({ kind: 'line', x1: 0, y1: p.y, x2: W, y2: p.y, colour, width: 2, dash: [6, 4] });
  else if (m.kind === 'horizon' && pts.length === 2) {
    const [a, b] = pts as [{ x: number; y: number }, { x: number; y: number }];
    const k = b.x !== a.x ? (b.y - a.y) / (b.x - a.x) : 0;
    out.push({ kind: 'line', x1: 0, y1: a.y - k * a.x, x2: W, y2: a.y + k * (W - a.x), colour, width: 2, dash: [10, 4] });
  } else if (pts.length === 2) {
    const [a, b] = pts as [{ x: number; y: number }, { x: number; y: number }];
    out.push({ kind: 'line', x1: a.x, y1: a.y, x2: b.x, y2: b.y, colour, width: 2, halo: true });
  }
  // the ends last, so each end's own pixel carries the mark's colour; ends under the band are left out
  for (const p of pts) if (p.y < bottom && p.x >= 0 && p.x <= W) out.push({ kind: 'dot', x: p.x, y: p.y, r: dotR, colour });
  return out;
}
