import type { Registry } from './index';
import { serveFrame, servePicture, serveRate } from './frame-server';

/*
 * Injected beside the overlay only when an extension page first asks for frames (follow/page-frames.ts),
 * so the overlay's first bundle does not carry it: it hangs the frame server on the registry the
 * overlay left in this isolated world. Without an overlay here it leaves nothing, and the page's
 * request is answered 'no-session'.
 */
const reg = (globalThis as unknown as Record<symbol, Registry | undefined>)[Symbol.for('clip-caliper.overlay')];
if (reg) {
  reg.frame ??= (req) => {
    const open = [...reg.sessions.values()][0];
    return open ? serveFrame(open.video, (region) => open.readPixels(region), req) : Promise.resolve({ ok: false, reason: 'no-session' });
  };
  reg.picture ??= () => {
    const open = [...reg.sessions.values()][0];
    return open ? servePicture(open.video, () => open.readPixels()) : Promise.resolve({ ok: false, reason: 'no-session' });
  };
  reg.rate ??= () => {
    const open = [...reg.sessions.values()][0];
    return open ? serveRate(open.video) : Promise.resolve({ ok: false, reason: 'no-session' });
  };
}
