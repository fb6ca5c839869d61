import type { FollowedFrame } from '../../src/case';
import { message as t } from '../shared/browser';

/*
 * Every frame of the run at a glance: a bar per frame as tall as its span, as strong as the
 * follower's confidence; a lost frame is a red mark at the foot, never a bar. The seed is outlined.
 */
export function FollowStrip({ frames, count }: { frames: readonly (FollowedFrame | undefined)[]; count: number }) {
  // Array.from, not map: a run in progress has holes, which map keeps and a spread turns into
  // undefined (Math.max then NaN: every bar's height NaN, an error logged per bar per render)
  const spans = Array.from(frames, (f) => (f?.ends ? Math.hypot(f.ends[1].x - f.ends[0].x, f.ends[1].y - f.ends[0].y) : 0));
  const top = Math.max(1, ...spans);
  const w = Math.max(count, 1);
  const followed = frames.filter((f) => f && f.status !== 'lost').length;
  const lost = frames.filter((f) => f?.status === 'lost').length;
  return (
    <svg class="follow-strip" viewBox={`0 0 ${w} 100`} preserveAspectRatio="none" role="img" aria-label={t('followStripLabel', [String(followed), String(lost), String(count)])} data-testid="follow-strip">
      {frames.map((f, i) => {
        if (!f) return null;
        if (f.status === 'lost') return <rect key={i} x={i} y={92} width={1} height={8} class="lost" data-lost={f.reason ?? ''} />;
        const h = (80 * spans[i]!) / top;
        return <rect key={i} x={i} y={90 - h} width={1} height={h} class={f.status === 'seed' ? 'seed' : 'followed'} fill-opacity={0.3 + 0.7 * f.confidence} />;
      })}
    </svg>
  );
}
