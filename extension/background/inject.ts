import { browser } from '../shared/browser';
import { injectOverlay } from './call-up';

/** Origins of the tab's frames that the top document cannot read (listed from the top frame). */
export async function foreignFrameOrigins(tabId: number): Promise<string[]> {
  const [result] = await browser.scripting.executeScript({
    target: { tabId },
    // self-contained (it runs in the page): frames inside open shadow roots and inside same-origin
    // frames count too, as the overlay finds them (overlay/videos.ts)
    func: () => {
      const origins = new Set<string>();
      const visit = (root: Document | ShadowRoot, base: string) => {
        for (const el of root.querySelectorAll('*')) {
          if (el.shadowRoot) visit(el.shadowRoot, base);
          if (el.localName !== 'iframe' && el.localName !== 'frame') continue;
          const f = el as HTMLIFrameElement;
          let inner: Document | null = null;
          try {
            inner = f.contentDocument;
          } catch {
            inner = null;
          }
          if (inner) visit(inner, inner.baseURI);
          else if (f.src) {
            try {
              origins.add(new URL(f.src, base).origin);
            } catch {
              // unnamed
            }
          }
        }
      };
      visit(document, document.baseURI);
      return [...origins];
    },
  });
  return (result?.result as string[] | undefined) ?? [];
}

/**
 * Injects the overlay into the tab's frames of one origin that hold a video. The frames are listed
 * by running a probe in every frame the extension may reach (executeScript reports each frame's
 * id), so no navigation permission is needed.
 */
export async function injectIntoOrigin(tabId: number, origin: string): Promise<number> {
  const probes = await browser.scripting.executeScript({
    target: { tabId, allFrames: true },
    // self-contained (it runs in each frame): counts videos in open shadow roots too, as the overlay finds them
    func: () => {
      const count = (root: Document | ShadowRoot): number => {
        let n = root.querySelectorAll('video').length;
        for (const el of root.querySelectorAll('*')) if (el.shadowRoot) n += count(el.shadowRoot);
        return n;
      };
      return { origin: location.origin, videos: count(document) };
    },
  });
  const frameIds = probes
    .filter((p) => {
      const r = p.result as { origin: string; videos: number } | undefined;
      return r && r.origin === origin && r.videos > 0 && p.frameId !== 0;
    })
    .map((p) => p.frameId);
  for (const frameId of frameIds) await injectOverlay(tabId, { frameId });
  return frameIds.length;
}
