/** Every video in this document and its same-origin frames, in document order. */
export function findVideos(doc: Document = document): HTMLVideoElement[] {
  const found = [...doc.querySelectorAll('video')];
  for (const frame of doc.querySelectorAll('iframe, frame')) {
    const inner = sameOriginDocument(frame as HTMLIFrameElement);
    if (inner) found.push(...findVideos(inner));
  }
  return found;
}

/** Origins of frames whose content this page may not read (a video there needs that site's permission). */
export function foreignFrameOrigins(doc: Document = document): string[] {
  const origins = new Set<string>();
  for (const frame of doc.querySelectorAll('iframe, frame')) {
    const f = frame as HTMLIFrameElement;
    const inner = sameOriginDocument(f);
    if (inner) foreignFrameOrigins(inner).forEach((o) => origins.add(o));
    else if (f.src) {
      try {
        origins.add(new URL(f.src, doc.baseURI).origin);
      } catch {
        // not a URL we can name
      }
    }
  }
  return [...origins];
}

function sameOriginDocument(frame: HTMLIFrameElement): Document | null {
  try {
    return frame.contentDocument;
  } catch {
    return null;
  }
}
