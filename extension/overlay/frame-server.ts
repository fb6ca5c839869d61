import type { Gray } from '../../src/case';
import { measurePeriod } from '../shared/frame-period';
import { MAX_STEP, type FrameReply, type FrameRequest, type PictureReply, type RateReply } from '../shared/frames';

/*
 * Frames for an extension page that measures every frame (issue 15: following the object, the
 * landscape's turn). The page asks through the scripting API, whose answer goes straight back to
 * the extension: the page under review never sees it. This side only seeks, reads and packs; the
 * work is done off the page's thread, in the extension's own page.
 *
 * A frame crosses as 8-bit luma (ITU-R BT.709 weights, as gray.ts) in base64, for a region of the
 * video's intrinsic pixels, averaged over step x step blocks: the follower asks for a window round
 * the object at full resolution, the landscape for the whole picture at a coarser step.
 */

/** A seek that has not landed by then is given up (a stalled network, a page holding its thread). */
export const SEEK_MS = 4_000;

export function checkRequest(r: unknown): r is FrameRequest {
  const q = r as FrameRequest;
  const num = (v: unknown) => typeof v === 'number' && Number.isFinite(v);
  return (
    typeof r === 'object' && r !== null &&
    num(q.t) && q.t >= 0 && num(q.x) && num(q.y) && num(q.width) && num(q.height) && q.width >= 1 && q.height >= 1 &&
    Number.isInteger(q.step) && q.step >= 1 && q.step <= MAX_STEP
  );
}

/** Shows the frame at t: pauses, seeks, and waits for the browser's own 'seeked' (a page's forged event is not it). */
export async function seekTo(video: HTMLVideoElement, t: number, ms = SEEK_MS, always = false): Promise<boolean> {
  video.pause();
  // already there: nothing to wait for, unless a presented frame is wanted (a seek presents one)
  if (!always && Math.abs(video.currentTime - t) < 1e-6 && !video.seeking) return true;
  const view = video.ownerDocument.defaultView ?? window;
  return new Promise<boolean>((done) => {
    const timer = view.setTimeout(() => finish(false), ms);
    const onSeeked = (e: Event) => {
      if (e.isTrusted) finish(true);
    };
    function finish(ok: boolean): void {
      view.clearTimeout(timer);
      video.removeEventListener('seeked', onSeeked);
      done(ok);
    }
    video.addEventListener('seeked', onSeeked);
    video.currentTime = t;
  });
}

/** The region of `img` (RGBA or luma) as step-averaged 8-bit luma, packed in base64. */
export function packLuma(img: Gray, req: FrameRequest): { x: number; y: number; width: number; height: number; luma: string } {
  const x0 = Math.max(0, Math.min(img.width - 1, Math.floor(req.x)));
  const y0 = Math.max(0, Math.min(img.height - 1, Math.floor(req.y)));
  const s = req.step;
  const w = Math.max(1, Math.floor((Math.min(img.width, Math.floor(req.x + req.width)) - x0) / s));
  const h = Math.max(1, Math.floor((Math.min(img.height, Math.floor(req.y + req.height)) - y0) / s));
  const out = new Uint8Array(w * h);
  const d = img.data;
  const c = img.channels;
  for (let j = 0; j < h; j++) {
    for (let i = 0; i < w; i++) {
      let sum = 0;
      let n = 0;
      for (let b = 0; b < s; b++) {
        const yy = y0 + j * s + b;
        if (yy >= img.height) break;
        for (let a = 0; a < s; a++) {
          const xx = x0 + i * s + a;
          if (xx >= img.width) break;
          const k = (yy * img.width + xx) * c;
          sum += c === 1 ? d[k]! : 0.2126 * d[k]! + 0.7152 * d[k + 1]! + 0.0722 * d[k + 2]!;
          n++;
        }
      }
      out[j * w + i] = Math.round(sum / n);
    }
  }
  let bin = '';
  for (let k = 0; k < out.length; k += 0x8000) bin += String.fromCharCode(...out.subarray(k, k + 0x8000));
  return { x: x0, y: y0, width: w, height: h, luma: btoa(bin) };
}

/** One frame for an extension page: seek, read (the video's pixels, else the tab's picture), pack. */
export async function serveFrame(
  video: HTMLVideoElement,
  read: (region: Region) => Promise<{ img: Gray; x: number; y: number; direct: boolean } | null>,
  req: unknown,
): Promise<FrameReply> {
  if (!checkRequest(req)) return { ok: false, reason: 'bad-request' };
  if (!(await seekTo(video, req.t))) return { ok: false, reason: 'seek-timeout' };
  const region = pixelRegion(video.videoWidth, video.videoHeight, req);
  const got = await read(region);
  if (!got) return { ok: false, reason: 'no-pixels' };
  // packed from the pixels read, which start at got.x, got.y: the same blocks as from the whole picture
  const packed = packLuma(got.img, { ...req, x: req.x - got.x, y: req.y - got.y });
  return { ok: true, t: video.currentTime, step: req.step, source: got.direct ? 'video' : 'capture', ...packed, x: packed.x + got.x, y: packed.y + got.y };
}

export interface Region {
  x: number;
  y: number;
  width: number;
  height: number;
}

/** The whole pixels packLuma reads for req from a width x height picture (clamped as it clamps). */
export function pixelRegion(width: number, height: number, req: FrameRequest): Region {
  const x = Math.max(0, Math.min(width - 1, Math.floor(req.x)));
  const y = Math.max(0, Math.min(height - 1, Math.floor(req.y)));
  return {
    x,
    y,
    width: Math.max(1, Math.min(width, Math.floor(req.x + req.width)) - x),
    height: Math.max(1, Math.min(height, Math.floor(req.y + req.height)) - y),
  };
}

/**
 * The frame shown, whole and in colour, as a PNG: the video paused where it is (no seek: the user
 * chose this frame), its pixels read as for snapping (the video's own, else the tab's picture).
 */
export async function servePicture(video: HTMLVideoElement, read: () => Promise<{ img: Gray; direct: boolean } | null>): Promise<PictureReply> {
  video.pause();
  const got = await read();
  if (!got || got.img.channels !== 4) return { ok: false, reason: 'no-pixels' };
  const { img } = got;
  const canvas = video.ownerDocument.createElement('canvas');
  canvas.width = img.width;
  canvas.height = img.height;
  const ctx = canvas.getContext('2d');
  if (!ctx) return { ok: false, reason: 'no-pixels' };
  ctx.putImageData(new ImageData(new Uint8ClampedArray(img.data), img.width, img.height), 0, 0);
  return { ok: true, t: video.currentTime, width: img.width, height: img.height, source: got.direct ? 'video' : 'capture', png: canvas.toDataURL('image/png') };
}

/**
 * A presented frame not reported by then is taken as not told; the whole measure is bounded too. A
 * tab in the background (the follow page in front of it) presents about once a second (measured in
 * the e2e Chromium: 1.02 s from seek to callback), and the measure takes about 8 seeks.
 */
export const PRESENT_MS = 2_500;
export const RATE_MS = 30_000;

type FrameCallbackVideo = HTMLVideoElement & {
  requestVideoFrameCallback?: (cb: (now: number, meta: { mediaTime: number }) => void) => number;
  cancelVideoFrameCallback?: (id: number) => void;
};

/** Seeks to t and answers the media time of the frame the browser then presents, or null in `ms`. */
async function seekShown(video: FrameCallbackVideo, t: number, ms: number): Promise<number | null> {
  const view = video.ownerDocument.defaultView ?? window;
  let id = 0;
  let timer = 0;
  // asked before the seek, so that the frame it presents is the one reported
  const shown = new Promise<number | null>((done) => {
    timer = view.setTimeout(() => done(null), ms);
    id = video.requestVideoFrameCallback!((_now, meta) => done(Number.isFinite(meta.mediaTime) ? meta.mediaTime : null));
  });
  if (!(await seekTo(video, t, ms, true))) {
    view.clearTimeout(timer);
    video.cancelVideoFrameCallback?.(id);
    return null;
  }
  const m = await shown;
  view.clearTimeout(timer);
  return m;
}

/**
 * The media time of the frame the browser presents after a seek to t (requestVideoFrameCallback's
 * mediaTime), or null. Chromium presents (and reports) a frame after every seek, the same frame
 * again included; a browser that does not runs out of time here and the rate is "not told". A frame
 * not at or just before t (by at most a second) is not taken.
 */
export async function presentedAt(video: FrameCallbackVideo, t: number, ms = PRESENT_MS): Promise<number | null> {
  if (typeof video.requestVideoFrameCallback !== 'function') return null;
  const m = await seekShown(video, t, ms);
  return m !== null && m <= t + 1e-3 && m > t - 1 ? m : null;
}

/**
 * The clip's frame rate from the frames the browser presents round the current time (frame-period.ts),
 * within RATE_MS; the video is left paused where it was. A page that seeks its video meanwhile can
 * spoil the figure, which is why it is only offered, in a field the user can change.
 */
export async function serveRate(video: FrameCallbackVideo, ms = RATE_MS): Promise<RateReply> {
  video.pause();
  const was = video.currentTime;
  const view = video.ownerDocument.defaultView ?? window;
  let timer = 0;
  const late = new Promise<null>((done) => (timer = view.setTimeout(() => done(null), ms)));
  const r = await Promise.race([measurePeriod((t) => presentedAt(video, t), was, video.duration), late]);
  view.clearTimeout(timer);
  await seekTo(video, was);
  return r ? { ok: true, ...r } : { ok: false, reason: 'not-told' };
}
