import { MAX_FRAME_PX } from './constants';
import { InputError } from './errors';
import { parseObjectPosition, type ObjectPosition, type PositionComponent } from './object-position';
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

// its CSS is read in object-position.ts; the name is still reached through this module
export { parseObjectPosition, type ObjectPosition, type PositionComponent };
