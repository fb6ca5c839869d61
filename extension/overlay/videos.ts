/**
 * Every video in this document, inside the open shadow roots of its components and in its
 * same-origin frames (wherever they sit), in document order. A closed shadow root is the
 * component's own and stays shut: a video there cannot be found.
 */
export function findVideos(doc: Document = document): HTMLVideoElement[] {
  const found: HTMLVideoElement[] = [];
  const frames: HTMLIFrameElement[] = [];
  walkElements(doc, (el) => {
    if (el.localName === 'video') found.push(el as HTMLVideoElement);
    else if (el.localName === 'iframe' || el.localName === 'frame') frames.push(el as HTMLIFrameElement);
  });
  for (const frame of frames) {
    const inner = sameOriginDocument(frame);
    if (inner) found.push(...findVideos(inner));
  }
  return found;
}

/**
 * Where a video can appear: this document, its same-origin frames' documents and every open
 * shadow root in them (a MutationObserver on a document does not see into shadow roots).
 */
export function videoContainers(doc: Document = document): Node[] {
  const roots: Node[] = [doc.documentElement];
  walkElements(doc, (el) => {
    if (el.shadowRoot) roots.push(el.shadowRoot);
    if (el.localName === 'iframe' || el.localName === 'frame') {
      const inner = sameOriginDocument(el as HTMLIFrameElement);
      if (inner?.documentElement) roots.push(...videoContainers(inner));
    }
  });
  return roots;
}

// querySelectorAll does not enter shadow roots: one walk over the elements visits them all and
// enters every open root on the way, in document order
function walkElements(root: Document | ShadowRoot, visit: (el: Element) => void): void {
  const doc = root.nodeType === Node.DOCUMENT_NODE ? (root as Document) : root.ownerDocument!;
  const walk = doc.createTreeWalker(root, NodeFilter.SHOW_ELEMENT);
  for (let n = walk.nextNode(); n; n = walk.nextNode()) {
    const el = n as Element;
    visit(el);
    if (el.shadowRoot) walkElements(el.shadowRoot, visit);
  }
}

// by node type, not instanceof: a same-origin frame's nodes come from another realm
const isShadowRoot = (n: Node): n is ShadowRoot => n.nodeType === Node.DOCUMENT_FRAGMENT_NODE && 'host' in n;

/** The shadow roots between a node and its document, innermost first (none for light DOM). */
export function shadowRootsAround(node: Node): ShadowRoot[] {
  const roots: ShadowRoot[] = [];
  for (let r = node.getRootNode(); isShadowRoot(r); r = r.host.getRootNode()) roots.push(r);
  return roots;
}

/** Whether `node` is inside `ancestor`, across shadow roots (Node.contains stops at them). */
export function containsAcrossShadows(ancestor: Node, node: Node): boolean {
  for (let n: Node | null = node; n; n = isShadowRoot(n) ? n.host : n.parentNode) if (n === ancestor) return true;
  return false;
}

/**
 * The element really shown fullscreen: the document names a component's host for an element
 * inside its shadow root, and that root names the element itself.
 */
export function fullscreenTarget(doc: Document): Element | null {
  let fs = doc.fullscreenElement;
  while (fs?.shadowRoot?.fullscreenElement) fs = fs.shadowRoot.fullscreenElement;
  return fs;
}

/** Origins of frames whose content this page may not read (a video there needs that site's permission). */
export function foreignFrameOrigins(doc: Document = document): string[] {
  const origins = new Set<string>();
  walkElements(doc, (el) => {
    if (el.localName !== 'iframe' && el.localName !== 'frame') return;
    const f = el as HTMLIFrameElement;
    const inner = sameOriginDocument(f);
    if (inner) foreignFrameOrigins(inner).forEach((o) => origins.add(o));
    else if (f.src) {
      try {
        origins.add(new URL(f.src, doc.baseURI).origin);
      } catch {
        // not a URL we can name
      }
    }
  });
  return [...origins];
}

function sameOriginDocument(frame: HTMLIFrameElement): Document | null {
  try {
    return frame.contentDocument;
  } catch {
    return null;
  }
}
