/**
 * A case's id: one per video on one page, stable across reloads, so that calling the overlay up
 * again finds the marks. FNV-1a (32-bit) over the page address without its fragment and the media
 * address, twice with different offsets for 64 bits: short, deterministic, not a secret.
 */
export function caseIdFor(pageUrl: string, mediaSrc: string, index = 0): string {
  const key = `${stripFragment(pageUrl)}\n${mediaSrc || `#video-${index}`}`;
  return `${fnv1a(key, 0x811c9dc5)}${fnv1a(key, 0x01000193)}`;
}

export function stripFragment(url: string): string {
  const i = url.indexOf('#');
  return i < 0 ? url : url.slice(0, i);
}

function fnv1a(s: string, seed: number): string {
  let h = seed >>> 0;
  for (let i = 0; i < s.length; i++) {
    h ^= s.charCodeAt(i);
    h = Math.imul(h, 0x01000193) >>> 0;
  }
  return h.toString(16).padStart(8, '0');
}
