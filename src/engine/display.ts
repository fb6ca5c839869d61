import { MAX_FRAME_PX } from './constants';
import { InputError } from './errors';
import { inRange, positive } from './validate';

/*
 * Where a <video>'s picture is drawn on screen, so that a pointer position (CSS px in the viewport)
 * can be turned into the video's intrinsic pixels and back. The rules are those of CSS Images 3,
 * "object-fit" and "object-position" (https://drafts.csswg.org/css-images-3/#the-object-fit): the
 * picture's concrete size comes from the fit, and the position places it in the content box like a
 * background position (a percentage of the free space, which is negative when the picture overflows,
 * plus a length). A video's natural size is videoWidth x videoHeight CSS px (HTML: the intrinsic
 * size, already corrected for non-square pixels), so intrinsic pixels and natural CSS px coincide.
 *
 * The device pixel ratio does not enter this mapping: pointer coordinates, getBoundingClientRect and
 * layout sizes are all CSS px, and the ratio scales every one of them alike when the page is painted,
 * so it cancels. It only says how many physical pixels show one video pixel, which matters to the
 * magnifier (devicePixelsPerIntrinsic).
 *
 * Transforms: only axis-aligned scaling is modelled (CSS scale, zoom, a scaled container). A rotation,
 * skew or mirror also changes getBoundingClientRect, but not in a way these inputs can undo, so the
 * overlay must check the element's transform first and refuse such videos with a notice.
 */

export type ObjectFit = 'contain' | 'cover' | 'fill' | 'none' | 'scale-down';

/** A position along one axis: `percent` % of the free space (box minus picture) plus `px`. */
export interface PositionComponent {
  percent: number;
  px: number;
}

export interface ObjectPosition {
  x: PositionComponent;
  y: PositionComponent;
}

/** The picture in CSS px of layout, relative to the content box's top-left (it may overflow it). */
export interface PictureRect {
  x: number;
  y: number;
  width: number;
  height: number;
}

export interface Mapping {
  picture: PictureRect;
  videoWidth: number;
  videoHeight: number;
  /** CSS px on screen per CSS px of layout, from transforms; 1 when none. */
  scaleX: number;
  scaleY: number;
  /** The content box's top-left in viewport CSS px. */
  originX: number;
  originY: number;
  /** The content box in CSS px of layout: the picture is clipped to it (HTML's `overflow: clip` on video). */
  boxWidth: number;
  boxHeight: number;
}

export interface Point {
  x: number;
  y: number;
}

export interface Edges {
  left: number;
  top: number;
  right: number;
  bottom: number;
}

export interface LayoutInput {
  /** getBoundingClientRect() of the element: after transforms, viewport CSS px. */
  rect: { left: number; top: number; width: number; height: number };
  /** offsetWidth / offsetHeight: the border box before transforms (browsers round these to whole px). */
  offsetWidth: number;
  offsetHeight: number;
  /** Computed border widths and padding, CSS px of layout. */
  border: Edges;
  padding: Edges;
  videoWidth: number;
  videoHeight: number;
  /** getComputedStyle(video).objectFit and .objectPosition. */
  objectFit: string;
  objectPosition: string;
}

/** Layout lengths beyond this are a broken page, not a video (common practice: far past any screen). */
const MAX_CSS_PX = 1_000_000;
const MAX_DPR = 16;

const FITS: readonly ObjectFit[] = ['contain', 'cover', 'fill', 'none', 'scale-down'];

function videoSize(field: string, v: number): number {
  if (v === 0) {
    throw new InputError(field, v, `more than 0 and at most ${MAX_FRAME_PX} px; 0 means the video has no intrinsic size yet (its metadata has not loaded)`);
  }
  return positive(field, v, MAX_FRAME_PX, ' px');
}

function cssLength(field: string, v: number): number {
  return inRange(field, v, -MAX_CSS_PX, MAX_CSS_PX, ' px');
}

function checkPosition(p: ObjectPosition): void {
  if (typeof p !== 'object' || p === null || typeof p.x !== 'object' || p.x === null || typeof p.y !== 'object' || p.y === null) {
    throw new InputError('object-position', p, 'an object with x and y, each { percent, px }');
  }
  cssLength('object-position x percent', p.x.percent);
  cssLength('object-position x offset', p.x.px);
  cssLength('object-position y percent', p.y.percent);
  cssLength('object-position y offset', p.y.px);
}

/** Reads a computed object-fit value. */
export function parseObjectFit(computed: string): ObjectFit {
  const s = typeof computed === 'string' ? computed.trim().toLowerCase() : '';
  const fit = FITS.find((f) => f === s);
  if (fit === undefined) throw new InputError('object-fit', computed, FITS.join(', '));
  return fit;
}

/**
 * The picture's rectangle for a content box of boxWidth x boxHeight CSS px (CSS Images 3, 5.5 and
 * 5.6): contain and cover scale uniformly to fit inside or to cover, fill stretches to the box, none
 * keeps the natural size, scale-down is whichever of none and contain is smaller.
 */
export function pictureRect(
  boxWidth: number,
  boxHeight: number,
  videoWidth: number,
  videoHeight: number,
  fit: ObjectFit,
  position: ObjectPosition,
): PictureRect {
  positive('content box width', boxWidth, MAX_CSS_PX, ' px');
  positive('content box height', boxHeight, MAX_CSS_PX, ' px');
  videoSize('video width', videoWidth);
  videoSize('video height', videoHeight);
  if (!FITS.includes(fit)) throw new InputError('object-fit', fit, FITS.join(', '));
  checkPosition(position);
  let w = boxWidth;
  let h = boxHeight;
  if (fit !== 'fill') {
    const contain = Math.min(boxWidth / videoWidth, boxHeight / videoHeight);
    const s =
      fit === 'contain' ? contain : fit === 'cover' ? Math.max(boxWidth / videoWidth, boxHeight / videoHeight) : fit === 'none' ? 1 : Math.min(1, contain);
    w = videoWidth * s;
    h = videoHeight * s;
  }
  return {
    x: ((boxWidth - w) * position.x.percent) / 100 + position.x.px,
    y: ((boxHeight - h) * position.y.percent) / 100 + position.y.px,
    width: w,
    height: h,
  };
}

function checkMapping(m: Mapping): void {
  if (typeof m !== 'object' || m === null || typeof m.picture !== 'object' || m.picture === null) {
    throw new InputError('display mapping', m, 'an object with picture, video size, scale and origin');
  }
  cssLength('picture x', m.picture.x);
  cssLength('picture y', m.picture.y);
  positive('picture width', m.picture.width, MAX_CSS_PX, ' px');
  positive('picture height', m.picture.height, MAX_CSS_PX, ' px');
  videoSize('video width', m.videoWidth);
  videoSize('video height', m.videoHeight);
  positive('display scale x', m.scaleX, 1000);
  positive('display scale y', m.scaleY, 1000);
  cssLength('content box left', m.originX);
  cssLength('content box top', m.originY);
  positive('content box width', m.boxWidth, MAX_CSS_PX, ' px');
  positive('content box height', m.boxHeight, MAX_CSS_PX, ' px');
}

/**
 * A viewport point (e.g. a pointer event's clientX, clientY) in intrinsic video pixels. Points in
 * the bars or beyond the picture come back outside [0, videoWidth] x [0, videoHeight], as they are.
 */
export function cssToIntrinsic(clientX: number, clientY: number, m: Mapping): Point {
  checkMapping(m);
  cssLength('pointer x', clientX);
  cssLength('pointer y', clientY);
  const p = m.picture;
  return {
    x: (((clientX - m.originX) / m.scaleX - p.x) * m.videoWidth) / p.width,
    y: (((clientY - m.originY) / m.scaleY - p.y) * m.videoHeight) / p.height,
  };
}

/** The inverse of cssToIntrinsic: an intrinsic video point in viewport CSS px. */
export function intrinsicToCss(x: number, y: number, m: Mapping): Point {
  checkMapping(m);
  inRange('video x', x, -MAX_CSS_PX, MAX_CSS_PX, ' px');
  inRange('video y', y, -MAX_CSS_PX, MAX_CSS_PX, ' px');
  const p = m.picture;
  return {
    x: m.originX + m.scaleX * (p.x + (x * p.width) / m.videoWidth),
    y: m.originY + m.scaleY * (p.y + (y * p.height) / m.videoHeight),
  };
}

/** Whether a viewport point falls on the visible picture: inside it and inside the content box that clips it. */
export function isOnPicture(clientX: number, clientY: number, m: Mapping): boolean {
  checkMapping(m);
  cssLength('pointer x', clientX);
  cssLength('pointer y', clientY);
  const lx = (clientX - m.originX) / m.scaleX;
  const ly = (clientY - m.originY) / m.scaleY;
  const p = m.picture;
  return (
    lx >= Math.max(0, p.x) &&
    lx <= Math.min(m.boxWidth, p.x + p.width) &&
    ly >= Math.max(0, p.y) &&
    ly <= Math.min(m.boxHeight, p.y + p.height)
  );
}

function edges(field: string, e: Edges): Edges {
  if (typeof e !== 'object' || e === null) throw new InputError(field, e, 'an object with left, top, right, bottom');
  inRange(`${field} left`, e.left, 0, MAX_CSS_PX, ' px');
  inRange(`${field} top`, e.top, 0, MAX_CSS_PX, ' px');
  inRange(`${field} right`, e.right, 0, MAX_CSS_PX, ' px');
  inRange(`${field} bottom`, e.bottom, 0, MAX_CSS_PX, ' px');
  return e;
}

/**
 * Offset sizes are whole px while the rectangle is exact, so an untransformed box of 400.6 px has
 * offsetWidth 401: a difference within that rounding is no transform, and the exact rectangle then
 * gives the layout size too.
 */
function scaleOf(rectSize: number, offsetSize: number): number {
  return Math.abs(rectSize - offsetSize) <= 0.5 ? 1 : rectSize / offsetSize;
}

/**
 * The mapping for an element laid out as measured, for axis-aligned scale transforms only (see the
 * note at the top of this file). The scale is the rectangle's size over the layout size; border and
 * padding are in layout px, so they are scaled too before they are taken off the rectangle.
 */
export function mappingFromLayout(input: LayoutInput): Mapping {
  if (typeof input !== 'object' || input === null || typeof input.rect !== 'object' || input.rect === null) {
    throw new InputError('layout', input, 'an object with rect, offset size, border, padding, video size, object-fit, object-position');
  }
  const r = input.rect;
  cssLength('element left', r.left);
  cssLength('element top', r.top);
  positive('element width on screen', r.width, MAX_CSS_PX, ' px');
  positive('element height on screen', r.height, MAX_CSS_PX, ' px');
  positive('element offset width', input.offsetWidth, MAX_CSS_PX, ' px');
  positive('element offset height', input.offsetHeight, MAX_CSS_PX, ' px');
  const b = edges('border', input.border);
  const p = edges('padding', input.padding);
  videoSize('video width', input.videoWidth);
  videoSize('video height', input.videoHeight);
  const fit = parseObjectFit(input.objectFit);
  const position = parseObjectPosition(input.objectPosition);
  const sx = scaleOf(r.width, input.offsetWidth);
  const sy = scaleOf(r.height, input.offsetHeight);
  const boxWidth = r.width / sx - b.left - b.right - p.left - p.right;
  const boxHeight = r.height / sy - b.top - b.bottom - p.top - p.bottom;
  if (!(boxWidth > 0)) throw new InputError('content box width', boxWidth, 'more than 0 px (border and padding leave no room for the picture)');
  if (!(boxHeight > 0)) throw new InputError('content box height', boxHeight, 'more than 0 px (border and padding leave no room for the picture)');
  return {
    picture: pictureRect(boxWidth, boxHeight, input.videoWidth, input.videoHeight, fit, position),
    videoWidth: input.videoWidth,
    videoHeight: input.videoHeight,
    scaleX: sx,
    scaleY: sy,
    originX: r.left + (b.left + p.left) * sx,
    originY: r.top + (b.top + p.top) * sy,
    boxWidth,
    boxHeight,
  };
}

/**
 * Physical screen pixels per intrinsic video pixel along each axis: below 1 the screen shows fewer
 * pixels than the video holds, and the magnifier must enlarge to show real detail.
 */
export function devicePixelsPerIntrinsic(m: Mapping, dpr: number): Point {
  checkMapping(m);
  positive('device pixel ratio', dpr, MAX_DPR);
  return {
    x: (dpr * m.scaleX * m.picture.width) / m.videoWidth,
    y: (dpr * m.scaleY * m.picture.height) / m.videoHeight,
  };
}

/* ---- object-position parsing ---- */

const POSITION_ALLOWED =
  'a CSS <position>: 1, 2 or 4 values of left, center, right, top, bottom, percentages, absolute lengths or calc() of them';

/** Absolute units in CSS px (CSS Values 4, 6.2: 1in = 96px = 2.54cm). */
const UNIT_PX = new Map<string, number>([
  ['px', 1],
  ['cm', 96 / 2.54],
  ['mm', 96 / 25.4],
  ['q', 96 / 101.6],
  ['in', 96],
  ['pt', 96 / 72],
  ['pc', 16],
]);

type Keyword = 'left' | 'right' | 'top' | 'bottom' | 'center';
type Token = { kw: Keyword } | { lp: PositionComponent };

function fail(computed: string): never {
  throw new InputError('object-position', computed, POSITION_ALLOWED);
}

/**
 * Reads a computed (or specified) object-position. Chromium computes keywords to percentages and
 * edge offsets to calc(): "right 10px bottom 20px" comes back as "calc(100% - 10px) calc(100% -
 * 20px)". Relative units (em, vw, ...) cannot be resolved here; the computed value never has them.
 */
export function parseObjectPosition(computed: string): ObjectPosition {
  if (typeof computed !== 'string') fail(computed);
  const parts = splitTopLevel(computed.trim().toLowerCase(), computed);
  const t = parts.map((s) => token(s, computed));
  const kw = (i: number): Keyword | undefined => {
    const x = t[i];
    return x !== undefined && 'kw' in x ? x.kw : undefined;
  };
  const lp = (i: number): PositionComponent | undefined => {
    const x = t[i];
    return x !== undefined && 'lp' in x ? x.lp : undefined;
  };
  const centre: PositionComponent = { percent: 50, px: 0 };
  if (t.length === 1) {
    const k = kw(0);
    if (k === 'top' || k === 'bottom') return { x: centre, y: keywordAt(k) };
    return { x: k !== undefined ? keywordAt(k) : lp(0)!, y: centre };
  }
  if (t.length === 2) {
    const k0 = kw(0);
    const k1 = kw(1);
    // "top left", "bottom center", "center right": two keywords in either order
    if (k0 === 'top' || k0 === 'bottom' || k1 === 'left' || k1 === 'right') {
      if (k0 === undefined || k1 === undefined || isHorizontal(k0) || isVertical(k1)) fail(computed);
      return { x: keywordAt(k1), y: keywordAt(k0) };
    }
    return { x: k0 !== undefined ? keywordAt(k0) : lp(0)!, y: k1 !== undefined ? keywordAt(k1) : lp(1)! };
  }
  if (t.length === 4) {
    const k0 = kw(0);
    const k2 = kw(2);
    const o1 = lp(1);
    const o3 = lp(3);
    if (k0 === undefined || k2 === undefined || o1 === undefined || o3 === undefined) fail(computed);
    const h0 = k0 === 'left' || k0 === 'right';
    const v0 = k0 === 'top' || k0 === 'bottom';
    const h2 = k2 === 'left' || k2 === 'right';
    const v2 = k2 === 'top' || k2 === 'bottom';
    if (h0 && v2) return { x: fromEdge(k0, o1), y: fromEdge(k2, o3) };
    if (v0 && h2) return { x: fromEdge(k2, o3), y: fromEdge(k0, o1) };
    fail(computed);
  }
  // css-values-4 <position> has no 3-value form, and Chromium rejects it for object-position
  return fail(computed);
}

function isHorizontal(k: Keyword): boolean {
  return k === 'left' || k === 'right';
}

function isVertical(k: Keyword): boolean {
  return k === 'top' || k === 'bottom';
}

function keywordAt(k: Keyword): PositionComponent {
  return { percent: k === 'left' || k === 'top' ? 0 : k === 'center' ? 50 : 100, px: 0 };
}

/** An offset from the far edge (right, bottom) counts back from 100 %. */
function fromEdge(k: Keyword, o: PositionComponent): PositionComponent {
  return k === 'left' || k === 'top' ? { percent: o.percent, px: o.px } : { percent: 100 - o.percent, px: -o.px };
}

function splitTopLevel(s: string, computed: string): string[] {
  const out: string[] = [];
  let depth = 0;
  let cur = '';
  for (const ch of s) {
    if (ch === '(') depth++;
    if (ch === ')') {
      depth--;
      if (depth < 0) fail(computed);
    }
    if (depth === 0 && /\s/.test(ch)) {
      if (cur !== '') out.push(cur);
      cur = '';
    } else cur += ch;
  }
  if (depth !== 0) fail(computed);
  if (cur !== '') out.push(cur);
  if (out.length === 0) fail(computed);
  return out;
}

const KEYWORDS: readonly Keyword[] = ['left', 'right', 'top', 'bottom', 'center'];

function token(s: string, computed: string): Token {
  const k = KEYWORDS.find((w) => w === s);
  if (k !== undefined) return { kw: k };
  const v = new CalcParser(s, computed).parseWhole();
  if (v.kind !== 'length') {
    // a bare number is a length only when it is 0
    if (v.n !== 0) fail(computed);
    return { lp: { percent: 0, px: 0 } };
  }
  if (!Number.isFinite(v.pct) || !Number.isFinite(v.px)) fail(computed);
  return { lp: { percent: v.pct, px: v.px } };
}

/** A calc() value: a plain number, or percent % + px. */
interface Value {
  kind: 'number' | 'length';
  n: number;
  pct: number;
  px: number;
}

const NUMBER = /^[+-]?(\d+\.?\d*|\.\d+)(e[+-]?\d+)?/;

/** Recursive descent over one length-percentage: a dimension, a percentage, or calc() sums and products. */
class CalcParser {
  private i = 0;
  constructor(
    private readonly s: string,
    private readonly computed: string,
  ) {}

  parseWhole(): Value {
    const v = this.primary(false);
    if (this.i !== this.s.length) fail(this.computed);
    return v;
  }

  private ws(): void {
    while (this.i < this.s.length && /\s/.test(this.s[this.i]!)) this.i++;
  }

  private sum(): Value {
    let a = this.product();
    for (;;) {
      this.ws();
      const op = this.s[this.i];
      if (op !== '+' && op !== '-') return a;
      this.i++;
      const b = this.product();
      if (a.kind !== b.kind) fail(this.computed);
      const k = op === '+' ? 1 : -1;
      a = { kind: a.kind, n: a.n + k * b.n, pct: a.pct + k * b.pct, px: a.px + k * b.px };
    }
  }

  private product(): Value {
    let a = this.primary(true);
    for (;;) {
      this.ws();
      const op = this.s[this.i];
      if (op !== '*' && op !== '/') return a;
      this.i++;
      const b = this.primary(true);
      if (op === '*') {
        if (a.kind === 'length' && b.kind === 'length') fail(this.computed);
        const [num, other] = a.kind === 'number' ? [a.n, b] : [b.n, a];
        a = { kind: other.kind, n: num * other.n, pct: num * other.pct, px: num * other.px };
      } else {
        if (b.kind !== 'number' || b.n === 0) fail(this.computed);
        a = { kind: a.kind, n: a.n / b.n, pct: a.pct / b.n, px: a.px / b.n };
      }
    }
  }

  /** inCalc: inside calc() parentheses may group and whitespace may lead. */
  private primary(inCalc: boolean): Value {
    if (inCalc) this.ws();
    const rest = this.s.slice(this.i);
    if (rest.startsWith('calc(') || (inCalc && rest.startsWith('('))) {
      this.i += rest.startsWith('calc(') ? 5 : 1;
      const v = this.sum();
      this.ws();
      if (this.s[this.i] !== ')') fail(this.computed);
      this.i++;
      return v;
    }
    const m = NUMBER.exec(rest);
    if (m === null) fail(this.computed);
    this.i += m[0].length;
    const n = Number(m[0]);
    if (this.s[this.i] === '%') {
      this.i++;
      return { kind: 'length', n: 0, pct: n, px: 0 };
    }
    const u = /^[a-z]+/.exec(this.s.slice(this.i));
    if (u === null) return { kind: 'number', n, pct: 0, px: 0 };
    const f = UNIT_PX.get(u[0]);
    if (f === undefined) fail(this.computed);
    this.i += u[0].length;
    return { kind: 'length', n: 0, pct: 0, px: n * f };
  }
}
