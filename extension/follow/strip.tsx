import type { FollowedFrame } from '../../src/case';
import { message as t } from '../shared/browser';

/*
 * Every frame of the run at a glance: a bar per frame as tall as its span, as strong as the
 * follower's confidence; a lost frame is a red mark at the foot, never a bar. Hand marks (the seed
 * and any correction) are amber. A frame is picked to be seen and corrected by a click (trusted
 * events only) or, for the keyboard, with the arrow keys, Home and End on the focused strip.
 */
export interface StripProps {
  frames: readonly (FollowedFrame | undefined)[];
  count: number;
  picked?: number | null;
  /** Absent while a run is going: nothing is picked then. */
  onPick?: (index: number) => void;
}

export function FollowStrip({ frames, count, picked = null, onPick }: StripProps) {
  // Array.from, not map: a run in progress has holes, which map keeps and a spread turns into
  // undefined (Math.max then NaN: every bar's height NaN, an error logged per bar per render)
  const spans = Array.from(frames, (f) => (f?.ends ? Math.hypot(f.ends[1].x - f.ends[0].x, f.ends[1].y - f.ends[0].y) : 0));
  const top = Math.max(1, ...spans);
  const w = Math.max(count, 1);
  const followed = frames.filter((f) => f && f.status !== 'lost').length;
  const lost = frames.filter((f) => f?.status === 'lost').length;
  const click = (e: MouseEvent) => {
    if (!e.isTrusted || !onPick) return;
    const r = (e.currentTarget as Element).getBoundingClientRect();
    const k = Math.floor(((e.clientX - r.left) / r.width) * w);
    if (k >= 0 && k < count) onPick(k);
  };
  const key = (e: KeyboardEvent) => {
    if (!e.isTrusted || !onPick) return;
    const at = picked ?? -1;
    const next = e.key === 'ArrowRight' ? at + 1 : e.key === 'ArrowLeft' ? (at < 0 ? count - 1 : at - 1) : e.key === 'Home' ? 0 : e.key === 'End' ? count - 1 : null;
    if (next === null) return;
    e.preventDefault();
    onPick(Math.max(0, Math.min(count - 1, next)));
  };
  return (
    <svg
      class="follow-strip"
      viewBox={`0 0 ${w} 100`}
      preserveAspectRatio="none"
      role="img"
      tabIndex={onPick ? 0 : -1}
      aria-label={t('followStripLabel', [String(followed), String(lost), String(count)])}
      data-testid="follow-strip"
      onClick={click}
      onKeyDown={key}
    >
      {frames.map((f, i) => {
        if (!f) return null;
        if (f.status === 'lost') return <rect key={i} x={i} y={92} width={1} height={8} class="lost" data-lost={f.reason ?? ''} />;
        const h = (80 * spans[i]!) / top;
        return <rect key={i} x={i} y={90 - h} width={1} height={h} class={f.status === 'seed' ? 'seed' : 'followed'} fill-opacity={0.3 + 0.7 * f.confidence} />;
      })}
      {picked !== null && <rect x={picked} y={0.5} width={1} height={99} class="picked" vector-effect="non-scaling-stroke" />}
    </svg>
  );
}
