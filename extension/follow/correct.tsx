import { useEffect, useRef, useState } from 'preact/hooks';
import { message as t } from '../shared/browser';
import { nudge, toVideo, toView, zoomFor, type Pt, type Zoom } from './corrections';
import { readPageFrame } from './page-frames';

/*
 * One frame of the run, to correct: the picture round the object read from the video (the region
 * the follower reads, at full resolution) drawn enlarged, with the two ends on it. The user drags
 * an end there (trusted pointer events only) or chooses one and moves it with the arrow keys; the
 * page then follows again from this frame (view.tsx).
 */

export interface CorrectProps {
  tabId: number;
  frameId: number;
  /** Media time of the frame, s, and a label for it. */
  t: number;
  video: { width: number; height: number };
  /** Where the ends start (the frame's own, or the nearest trusted ones for a lost frame). */
  start: [Pt, Pt];
  busy: boolean;
  onApply(ends: [Pt, Pt]): void;
}

const fmt = (v: number) => v.toFixed(2);

export function CorrectFrame(p: CorrectProps) {
  const [zoom] = useState<Zoom>(() => zoomFor(p.start, p.video.width, p.video.height));
  const [ends, setEnds] = useState<[Pt, Pt]>(p.start);
  const [which, setWhich] = useState<0 | 1>(0);
  const [ready, setReady] = useState(false);
  const [problem, setProblem] = useState<string | null>(null);
  const canvas = useRef<HTMLCanvasElement>(null);
  const dragging = useRef<0 | 1 | null>(null);

  useEffect(() => {
    let live = true;
    readPageFrame(p.tabId, p.frameId, { t: p.t, x: zoom.x, y: zoom.y, width: zoom.width, height: zoom.height, step: 1 }).then(
      (f) => {
        const c = canvas.current;
        if (!live || !c) return;
        // the luma as grey at one pixel a pixel, then drawn enlarged without smoothing: each video pixel a square
        const small = new OffscreenCanvas(f.gray.width, f.gray.height);
        const img = new ImageData(f.gray.width, f.gray.height);
        for (let k = 0; k < f.gray.data.length; k++) img.data.set([f.gray.data[k]!, f.gray.data[k]!, f.gray.data[k]!, 255], 4 * k);
        small.getContext('2d')!.putImageData(img, 0, 0);
        const g = c.getContext('2d')!;
        g.imageSmoothingEnabled = false;
        g.drawImage(small, (f.x - zoom.x) * zoom.scale, (f.y - zoom.y) * zoom.scale, f.gray.width * zoom.scale, f.gray.height * zoom.scale);
        setReady(true);
      },
      (e: Error) => live && setProblem(e.message),
    );
    return () => {
      live = false;
    };
  }, []);

  const at = (e: PointerEvent): Pt => {
    const r = (e.currentTarget as Element).getBoundingClientRect();
    return toVideo(zoom, e.clientX - r.left, e.clientY - r.top);
  };
  const place = (k: 0 | 1, q: Pt) => setEnds((old) => (k === 0 ? [q, old[1]] : [old[0], q]));
  const down = (e: PointerEvent) => {
    if (!e.isTrusted || p.busy) return;
    const q = at(e);
    // the nearer end follows the pointer
    const k: 0 | 1 = Math.hypot(q.x - ends[0].x, q.y - ends[0].y) <= Math.hypot(q.x - ends[1].x, q.y - ends[1].y) ? 0 : 1;
    dragging.current = k;
    setWhich(k);
    (e.currentTarget as Element).setPointerCapture?.(e.pointerId);
    place(k, q);
  };
  const move = (e: PointerEvent) => {
    if (!e.isTrusted || dragging.current === null) return;
    place(dragging.current, at(e));
  };
  const up = (e: PointerEvent) => {
    if (!e.isTrusted) return;
    dragging.current = null;
  };
  const key = (e: KeyboardEvent) => {
    if (!e.isTrusted || p.busy) return;
    const n = nudge(ends, which, e.key, e.shiftKey);
    if (!n) return;
    e.preventDefault();
    setEnds(n);
  };

  const W = zoom.width * zoom.scale;
  const H = zoom.height * zoom.scale;
  const v = ends.map((q) => toView(zoom, q));
  return (
    <section class="follow-correct" data-testid="follow-correct">
      {problem && <p class="error" role="alert">{problem}</p>}
      {!ready && !problem && <p class="muted">{t('followZoomReading')}</p>}
      <div
        class="follow-zoom"
        style={{ width: `${W}px`, height: `${H}px` }}
        tabIndex={0}
        role="application"
        aria-label={t('followZoomLabel', [p.t.toFixed(3), String(zoom.scale)])}
        data-testid="follow-zoom"
        data-x={zoom.x}
        data-y={zoom.y}
        data-scale={zoom.scale}
        onPointerDown={down}
        onPointerMove={move}
        onPointerUp={up}
        onPointerCancel={up}
        onKeyDown={key}
      >
        <canvas ref={canvas} width={W} height={H} />
        <svg width={W} height={H} viewBox={`0 0 ${W} ${H}`} aria-hidden="true">
          <line x1={v[0]!.x} y1={v[0]!.y} x2={v[1]!.x} y2={v[1]!.y} class="span" />
          {v.map((q, k) => (
            <circle key={k} cx={q.x} cy={q.y} r={6} class={k === which ? 'end active' : 'end'} />
          ))}
        </svg>
      </div>
      <p class="follow-correct-row">
        {([0, 1] as const).map((k) => (
          <label key={k}>
            <input type="radio" name="follow-end" checked={which === k} data-testid={`follow-end-${k + 1}`} onChange={() => setWhich(k)} />
            {t('followEnd', String(k + 1))}
          </label>
        ))}
        <span data-testid="follow-ends-at">{t('followEndsAt', [fmt(ends[0].x), fmt(ends[0].y), fmt(ends[1].x), fmt(ends[1].y)])}</span>
      </p>
      <button type="button" class="primary" data-testid="follow-reseed" disabled={p.busy || !ready} onClick={(e) => e.isTrusted && p.onApply(ends)}>
        {t('followReseed')}
      </button>
    </section>
  );
}
