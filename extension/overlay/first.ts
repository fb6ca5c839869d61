import { drawShell } from './shell';
import { findVideos, foreignFrameOrigins } from './videos';

/*
 * The overlay's first stage, injected just before the rest (background/inject.ts): a few kilobytes
 * that draw the panel over the only video on the page at once, while the full overlay is still
 * being read and compiled; the session then wires these same elements (index.ts, session.ts).
 * With several videos, frames from other sites, or an overlay already up, it draws nothing and the
 * full overlay decides as before (the chooser, or focusing the open session).
 */
const REGISTRY = Symbol.for('clip-caliper.overlay');
if (!(globalThis as unknown as Record<symbol, unknown>)[REGISTRY]) {
  const videos = findVideos();
  if (videos.length === 1 && foreignFrameOrigins().length === 0) drawShell(videos[0]!);
}
