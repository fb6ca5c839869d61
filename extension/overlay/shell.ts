import { OverlayHost } from './host';
import { buildPanel, type PanelParts } from './panel';

/*
 * What the first stage drew, handed to the session: the host over the video and the panel's
 * elements. Both stages run in the page's one isolated world for this extension, so a symbol from
 * the global registry reaches across the two scripts.
 */
export interface Shell {
  video: HTMLVideoElement;
  host: OverlayHost;
  parts: PanelParts;
}

const SHELL = Symbol.for('clip-caliper.overlay-shell');
const g = globalThis as unknown as Record<symbol, Shell | undefined>;

/** Draws the host and the panel over the video, to be taken by the session that follows. */
export function drawShell(video: HTMLVideoElement): void {
  if (g[SHELL]) return;
  const host = new OverlayHost(video);
  g[SHELL] = { video, host, parts: buildPanel(host.root) };
}

/** The shell drawn for this video, once; a shell drawn for another video is removed. */
export function takeShell(video: HTMLVideoElement): Shell | null {
  const s = g[SHELL];
  g[SHELL] = undefined;
  if (!s) return null;
  if (s.video === video) return s;
  s.host.destroy();
  return null;
}

/** Removes a shell nobody took (the page changed between the two stages). */
export function dropShell(): void {
  g[SHELL]?.host.destroy();
  g[SHELL] = undefined;
}
