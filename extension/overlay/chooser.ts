import { message } from '../shared/native';
import { forceStyle, h, trusted } from './dom';
import { OVERLAY_CSS } from './styles';

/**
 * A small panel of our own when the page has several videos (or none): one button per video, which
 * outlines its video on hover and focus. Lives in its own closed shadow root, on plain divs, like
 * the overlay (shell.ts), and answers only the user's own input.
 */
export class Chooser {
  readonly el: HTMLElement;
  /** Closed to the page; the test build's handle reaches it through the registry (index.ts). */
  readonly root: ShadowRoot;
  private readonly outline: HTMLElement;
  private readonly ac = new AbortController();

  constructor(videos: HTMLVideoElement[], foreignOrigins: string[], onChoose: (v: HTMLVideoElement) => void) {
    this.el = document.createElement('div');
    forceStyle(this.el, { all: 'initial', position: 'fixed', right: '12px', top: '12px', 'z-index': '2147483647', display: 'block' });
    const root = (this.root = this.el.attachShadow({ mode: 'closed' }));
    this.outline = document.createElement('div');
    forceStyle(this.outline, { all: 'initial', position: 'fixed', 'z-index': '2147483646', display: 'none', 'pointer-events': 'none', outline: '3px solid #0b63c7', 'outline-offset': '2px' });
    const signal = this.ac.signal;
    const list = h('div', { class: 'row tools', role: 'list' });
    videos.forEach((v, i) => {
      const [n, w, ht] = [String(i + 1), String(v.videoWidth || '?'), String(v.videoHeight || '?')];
      const label = Number.isFinite(v.duration) ? message('ovlVideoTimed', [n, w, ht, v.duration.toFixed(1)]) : message('ovlVideo', [n, w, ht]);
      const b = h('button', { type: 'button', role: 'listitem', 'data-video-index': i }, label);
      const show = () => this.show(v);
      b.addEventListener('mouseenter', show, { signal });
      b.addEventListener('focus', show, { signal });
      b.addEventListener('click', trusted(() => {
        this.destroy();
        onChoose(v);
      }), { signal });
      list.append(b);
    });
    const close = h('button', { type: 'button', class: 'close' }, message('ovlClose'));
    close.addEventListener('click', trusted(() => this.destroy()), { signal });
    const heading = videos.length
      ? message('ovlWhichVideo')
      : message('ovlNoVideo');
    const foreign = foreignOrigins.length
      ? h('div', { class: 'notice' }, message('ovlForeignFrames', foreignOrigins.join(', ')))
      : '';
    root.append(h('style', {}, OVERLAY_CSS), h('div', { class: 'panel', role: 'dialog', 'aria-label': message('ovlChooserLabel'), style: 'position: static' }, h('div', { 'data-testid': 'chooser-heading' }, heading), list, foreign, h('div', { class: 'row' }, close)));
    this.el.addEventListener('keydown', (e) => {
      e.stopPropagation();
      if (e.isTrusted && e.key === 'Escape') this.destroy();
    }, { signal });
    document.documentElement.append(this.outline, this.el);
    (root.querySelector('button') as HTMLButtonElement | null)?.focus();
  }

  private show(v: HTMLVideoElement): void {
    const r = v.getBoundingClientRect();
    forceStyle(this.outline, { display: 'block', left: `${r.left}px`, top: `${r.top}px`, width: `${r.width}px`, height: `${r.height}px` });
  }

  get alive(): boolean {
    return !this.ac.signal.aborted;
  }

  destroy(): void {
    this.ac.abort();
    this.el.remove();
    this.outline.remove();
  }
}
