import { annotatedFrameName, formatEstimate, layoutPicture, type CaseAnalysis, type CaseRecord, type PictureWords, type Shape, type UnitSystem } from '../../src/case';
import { readPagePicture } from '../follow/page-frames';
import { message } from '../shared/browser';
import { saveFile } from './download';

/*
 * The annotated frame's browser half (issue 15 point 7), loaded by import() on the button's click:
 * asks the tab's overlay for the paused frame through the scripting API (follow/page-frames.ts, the
 * follower's path: no message a page could read or forge), lets src/case/annotated-frame.ts lay out
 * what is drawn, rasterises that on a canvas and saves the PNG through the popup's one download
 * helper. The canvas is the frame's own size: the marks land on the pixels they were placed on.
 */

const WORDS: PictureWords = {
  title: (time, title) => message('caseFrameTitle', [title, time]),
  range: (e) => message('caseFrameRange', e),
  rangeFrameAlone: (e) => message('caseFrameRangeAlone', e),
  speedSame: (e) => message('caseFrameSpeedSame', e),
  speedOpposite: (e) => message('caseFrameSpeedOpposite', e),
  speedOpen: (e) => message('caseFrameSpeedOpen', e),
  pointLandmark: (e) => message('caseFramePointLandmark', e),
  pointColumn: (e) => message('caseFramePointColumn', e),
  pointNone: message('caseFramePointNone'),
  arrow: message('caseFrameArrow'),
  arrowNoSide: (way) => message('caseFrameArrowNoSide', way),
  waySame: message('caseFrameWaySame'),
  wayOpposite: message('caseFrameWayOpposite'),
  noFigures: message('caseFrameNoFigures'),
  source: (s) => message(s === 'video' ? 'caseFrameSourceVideo' : 'caseFrameSourceCapture'),
};

/** The PNG data URL's bytes (decoded here: no fetch of a data URL, whatever the page's policy says of it). */
function pngBlob(dataUrl: string): Blob {
  const bin = atob(dataUrl.slice(dataUrl.indexOf(',') + 1));
  const bytes = new Uint8Array(bin.length);
  for (let k = 0; k < bin.length; k++) bytes[k] = bin.charCodeAt(k);
  return new Blob([bytes], { type: 'image/png' });
}

export function drawShapes(ctx: CanvasRenderingContext2D, shapes: readonly Shape[]): void {
  ctx.lineCap = 'round';
  for (const s of shapes) {
    ctx.save();
    if (s.kind === 'line') {
      if (s.dash) ctx.setLineDash(s.dash);
      const path = () => {
        ctx.beginPath();
        ctx.moveTo(s.x1, s.y1);
        ctx.lineTo(s.x2, s.y2);
      };
      if (s.halo) {
        // a dark edge under the colour, as the overlay draws a span, so it shows on a light sky
        path();
        ctx.strokeStyle = 'rgba(0, 0, 0, 0.5)';
        ctx.lineWidth = s.width + 2;
        ctx.stroke();
      }
      path();
      ctx.strokeStyle = s.colour;
      ctx.lineWidth = s.width;
      ctx.stroke();
    } else if (s.kind === 'dot' || s.kind === 'ring') {
      ctx.beginPath();
      ctx.arc(s.x, s.y, s.r, 0, 2 * Math.PI);
      if (s.kind === 'dot') {
        ctx.fillStyle = s.colour;
        ctx.fill();
        ctx.strokeStyle = '#000';
        ctx.lineWidth = 1;
      } else {
        ctx.strokeStyle = s.colour;
        ctx.lineWidth = s.width;
      }
      ctx.stroke();
    } else if (s.kind === 'arrow') {
      const a = Math.atan2(s.y2 - s.y1, s.x2 - s.x1);
      ctx.strokeStyle = s.colour;
      ctx.fillStyle = s.colour;
      ctx.lineWidth = s.width;
      ctx.beginPath();
      ctx.moveTo(s.x1, s.y1);
      ctx.lineTo(s.x2 - s.head * 0.8 * Math.cos(a), s.y2 - s.head * 0.8 * Math.sin(a));
      ctx.stroke();
      ctx.beginPath();
      ctx.moveTo(s.x2, s.y2);
      ctx.lineTo(s.x2 - s.head * Math.cos(a - 0.45), s.y2 - s.head * Math.sin(a - 0.45));
      ctx.lineTo(s.x2 - s.head * Math.cos(a + 0.45), s.y2 - s.head * Math.sin(a + 0.45));
      ctx.closePath();
      ctx.fill();
    } else if (s.kind === 'band') {
      ctx.fillStyle = s.colour;
      ctx.fillRect(0, s.y, ctx.canvas.width, s.height);
    } else {
      // monospace: the layout measured each line by its characters (CHAR_EM)
      ctx.font = `${s.fontPx}px monospace`;
      ctx.textBaseline = 'top';
      ctx.fillStyle = s.colour;
      ctx.fillText(s.text, s.x, s.y);
    }
    ctx.restore();
  }
}

/** Reads the tab's paused frame, draws the case's marks and figures on it and saves it as a PNG named like the case file. */
export async function saveAnnotatedFrame(tabId: number, c: CaseRecord, r: CaseAnalysis, system: UnitSystem): Promise<{ name: string; source: 'video' | 'capture' }> {
  const pic = await readPagePicture(tabId, 0);
  const bitmap = await createImageBitmap(pngBlob(pic.png));
  const layout = layoutPicture({ c, r, t: pic.t, width: pic.width, height: pic.height, source: pic.source, words: WORDS, format: (e, q) => formatEstimate(e, q, system) });
  const canvas = document.createElement('canvas');
  canvas.width = pic.width;
  canvas.height = pic.height;
  const ctx = canvas.getContext('2d')!;
  ctx.drawImage(bitmap, 0, 0);
  bitmap.close();
  drawShapes(ctx, layout.shapes);
  const png = await new Promise<Blob>((ok, fail) => canvas.toBlob((b) => (b ? ok(b) : fail(new Error('no PNG'))), 'image/png'));
  const name = annotatedFrameName(c);
  saveFile(png, name);
  return { name, source: pic.source };
}
