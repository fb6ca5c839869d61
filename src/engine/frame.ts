import { MAX_FRAME_PX } from './constants';
import { InputError, UndeterminedError } from './errors';
import { finite, inRange } from './validate';

/*
 * The camera frame: the rectangle of the video picture that the camera actually recorded, in the
 * video's intrinsic pixels (x right, y down). A re-upload may pillarbox, letterbox, crop or blur-fill
 * the recording, so this rectangle can be smaller than the video. The mapping from video to frame
 * pixels is a pure shift: the scale is the same on both axes, and angles only need ratios to the
 * frame width.
 */

export interface CameraFrame {
  left: number;
  right: number;
  top: number;
  bottom: number;
}

/** Edges may be marked up to this far outside the video (a mark sits on a pixel's far side). */
const EDGE_SLACK_PX = 1;
/** Narrowest frame accepted: below this no span could be measured. */
const MIN_FRAME_PX = 2;

function videoSize(field: string, px: number): number {
  return inRange(field, px, MIN_FRAME_PX, MAX_FRAME_PX, ' px');
}

function checkFrame(f: CameraFrame): void {
  if (typeof f !== 'object' || f === null) throw new InputError('camera frame', f, 'an object with left, right, top, bottom');
  finite('camera frame left edge', f.left);
  finite('camera frame right edge', f.right);
  finite('camera frame top edge', f.top);
  finite('camera frame bottom edge', f.bottom);
  const w = f.right - f.left;
  const h = f.bottom - f.top;
  if (!(w >= MIN_FRAME_PX && w <= MAX_FRAME_PX + 2 * EDGE_SLACK_PX)) {
    throw new InputError('camera frame width', w, `at least ${MIN_FRAME_PX} and at most ${MAX_FRAME_PX} px (right edge minus left edge)`);
  }
  if (!(h >= MIN_FRAME_PX && h <= MAX_FRAME_PX + 2 * EDGE_SLACK_PX)) {
    throw new InputError('camera frame height', h, `at least ${MIN_FRAME_PX} and at most ${MAX_FRAME_PX} px (bottom edge minus top edge)`);
  }
}

/** The default: the camera recorded the whole video. */
export function wholeVideoFrame(videoWidth: number, videoHeight: number): CameraFrame {
  videoSize('video width', videoWidth);
  videoSize('video height', videoHeight);
  return { left: 0, right: videoWidth, top: 0, bottom: videoHeight };
}

/** A frame from marked edges; top and bottom default to the video's own when only the sides were marked. */
export function cameraFrameFromEdges(
  videoWidth: number,
  videoHeight: number,
  left: number,
  right: number,
  top = 0,
  bottom = videoHeight,
): CameraFrame {
  videoSize('video width', videoWidth);
  videoSize('video height', videoHeight);
  inRange('camera frame left edge', left, -EDGE_SLACK_PX, videoWidth + EDGE_SLACK_PX, ' px');
  inRange('camera frame right edge', right, -EDGE_SLACK_PX, videoWidth + EDGE_SLACK_PX, ' px');
  inRange('camera frame top edge', top, -EDGE_SLACK_PX, videoHeight + EDGE_SLACK_PX, ' px');
  inRange('camera frame bottom edge', bottom, -EDGE_SLACK_PX, videoHeight + EDGE_SLACK_PX, ' px');
  if (right - left < MIN_FRAME_PX) {
    throw new InputError('camera frame width', right - left, `at least ${MIN_FRAME_PX} px (the right edge must lie right of the left edge)`);
  }
  if (bottom - top < MIN_FRAME_PX) {
    throw new InputError('camera frame height', bottom - top, `at least ${MIN_FRAME_PX} px (the bottom edge must lie below the top edge)`);
  }
  return { left, right, top, bottom };
}

/**
 * The centred pillarbox (recording narrower than the video) or letterbox (wider) rectangle for a
 * recording of known shape, e.g. a 9:16 portrait recording shown inside a 16:9 video.
 * recordedAspect is W/H of the recording.
 */
export function centredFrameForAspect(videoWidth: number, videoHeight: number, recordedAspect: number): CameraFrame {
  videoSize('video width', videoWidth);
  videoSize('video height', videoHeight);
  inRange('recorded aspect (width/height)', recordedAspect, 0.1, 10);
  let w = videoWidth;
  let h = videoHeight;
  if (recordedAspect < videoWidth / videoHeight) w = videoHeight * recordedAspect;
  else h = videoWidth / recordedAspect;
  if (w < MIN_FRAME_PX || h < MIN_FRAME_PX) {
    throw new UndeterminedError('camera frame', `a ${recordedAspect} recording inside a ${videoWidth} x ${videoHeight} video would be under ${MIN_FRAME_PX} px across`);
  }
  const left = (videoWidth - w) / 2;
  const top = (videoHeight - h) / 2;
  return { left, right: left + w, top, bottom: top + h };
}

export function frameWidthPx(f: CameraFrame): number {
  checkFrame(f);
  return f.right - f.left;
}

export function frameHeightPx(f: CameraFrame): number {
  checkFrame(f);
  return f.bottom - f.top;
}

/** Video x (intrinsic px) to camera-frame column. */
export function toFrameX(x: number, f: CameraFrame): number {
  checkFrame(f);
  finite('x', x);
  return x - f.left;
}

/** Video y (intrinsic px) to camera-frame row. */
export function toFrameY(y: number, f: CameraFrame): number {
  checkFrame(f);
  finite('y', y);
  return y - f.top;
}

/** Whether a video point lies in the frame, allowing slackPx beyond each edge. */
export function isInsideFrame(x: number, y: number, f: CameraFrame, slackPx = 1): boolean {
  checkFrame(f);
  finite('x', x);
  finite('y', y);
  inRange('slack', slackPx, 0, MAX_FRAME_PX, ' px');
  return x >= f.left - slackPx && x <= f.right + slackPx && y >= f.top - slackPx && y <= f.bottom + slackPx;
}
